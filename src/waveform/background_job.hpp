// One background thread that runs one job at a time (fork and join): the
// pipeline finds the breaths of one chunk in it while reading the next, and the
// CSV reader parses half of a chunk in it. Internal to the waveform engine.
#pragma once

#include <condition_variable>
#include <exception>
#include <functional>
#include <mutex>
#include <thread>
#include <utility>

namespace bb::wave {

class BackgroundJob {
 public:
  // Without `threaded`, jobs run in the caller's thread.
  explicit BackgroundJob(bool threaded) {
    if (!threaded) return;
    try {
      thread_ = std::thread([this] { loop(); });
    } catch (const std::system_error&) {
      // No thread to be had: jobs run in the caller's thread instead.
    }
  }

  ~BackgroundJob() {
    if (!thread_.joinable()) return;
    {
      std::unique_lock lock(mutex_);
      idle_.wait(lock, [this] { return !job_; });
      stop_ = true;
    }
    wake_.notify_one();
    thread_.join();
  }

  BackgroundJob(const BackgroundJob&) = delete;
  BackgroundJob& operator=(const BackgroundJob&) = delete;

  // Starts `job`; the previous job must have been waited for.
  void start(std::function<void()> job) {
    if (!thread_.joinable()) {
      run(job);
      return;
    }
    {
      std::lock_guard lock(mutex_);
      job_ = std::move(job);
    }
    wake_.notify_one();
  }

  // Blocks until the job has finished; rethrows what it threw.
  void wait() {
    std::unique_lock lock(mutex_);
    idle_.wait(lock, [this] { return !job_; });
    if (error_) std::rethrow_exception(std::exchange(error_, nullptr));
  }

 private:
  void run(const std::function<void()>& job) {
    try {
      job();
    } catch (...) {
      error_ = std::current_exception();
    }
  }

  void loop() {
    std::unique_lock lock(mutex_);
    for (;;) {
      wake_.wait(lock, [this] { return stop_ || job_; });
      if (stop_) return;
      lock.unlock();
      run(job_);
      lock.lock();
      job_ = nullptr;
      idle_.notify_all();
    }
  }

  std::mutex mutex_;
  std::condition_variable wake_, idle_;
  std::function<void()> job_;
  std::exception_ptr error_;
  bool stop_ = false;
  std::thread thread_;
};

}  // namespace bb::wave
