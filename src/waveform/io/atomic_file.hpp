// A file written under a temporary name beside its target and renamed into
// place on commit; removed if never committed (an error on the way).
#pragma once

#include <filesystem>
#include <string>
#include <system_error>

#include <unistd.h>

#include "breathbeat/errors.hpp"

namespace bb::wave::detail {

class AtomicFile {
 public:
  explicit AtomicFile(std::filesystem::path target)
      : target_(std::move(target)),
        temp_(target_.parent_path() / (target_.stem().string() + ".tmp" +
                                       std::to_string(::getpid()) + target_.extension().string())) {
  }
  ~AtomicFile() {
    if (!committed_) {
      std::error_code ignored;
      std::filesystem::remove(temp_, ignored);
    }
  }
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  const std::filesystem::path& temp() const { return temp_; }
  const std::filesystem::path& target() const { return target_; }

  void commit() {
    std::error_code ec;
    std::filesystem::rename(temp_, target_, ec);
    if (ec) {
      throw InputError("output", target_.string(),
                       "cannot move the written file into place (" + ec.message() + ")",
                       "a writable output directory");
    }
    committed_ = true;
  }

 private:
  std::filesystem::path target_;
  std::filesystem::path temp_;
  bool committed_ = false;
};

// Throws InputError unless the directory of `out` exists.
inline void require_output_dir(const std::filesystem::path& out) {
  const auto dir = out.parent_path().empty() ? std::filesystem::path(".") : out.parent_path();
  if (!std::filesystem::is_directory(dir)) {
    throw InputError("output", out.string(), "the output directory does not exist",
                     "a path in an existing directory");
  }
}

}  // namespace bb::wave::detail
