// The one atomic writer (breathbeat/io/atomic_file.hpp).
#include "breathbeat/io/atomic_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstring>
#include <streambuf>
#include <string>
#include <system_error>
#include <vector>

#include "breathbeat/errors.hpp"

namespace bb {

namespace {

namespace fs = std::filesystem;

[[noreturn]] void fail(const fs::path& target, const std::string& problem, int error) {
  throw InputError("output", target.string(), problem + ": " + std::strerror(error),
                   "a writable file in an existing folder; nothing was changed");
}

// Writes all of `data` to `fd`; false with errno set on failure.
bool write_all(int fd, const char* data, std::size_t size) {
  while (size > 0) {
    const ssize_t n = ::write(fd, data, size);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) {
      if (n == 0) errno = EIO;
      return false;
    }
    data += n;
    size -= static_cast<std::size_t>(n);
  }
  return true;
}

// The permissions the new file gets: those of the file it replaces, or the
// usual ones of a new file (0666 less the umask).
mode_t mode_for(const fs::path& target) {
  struct stat st {};
  if (::stat(target.c_str(), &st) == 0 && S_ISREG(st.st_mode)) return st.st_mode & 07777;
  const mode_t mask = ::umask(0);
  ::umask(mask);
  return 0666 & ~mask;
}

}  // namespace

// A write buffer over the temporary file's descriptor; remembers the first
// error so that commit() can name it.
class AtomicFile::Buffer : public std::streambuf {
 public:
  explicit Buffer(int fd) : fd_(fd), data_(1 << 16) {
    setp(data_.data(), data_.data() + data_.size());
  }
  int error() const { return error_; }

 protected:
  int_type overflow(int_type ch) override {
    if (!drain()) return traits_type::eof();
    if (!traits_type::eq_int_type(ch, traits_type::eof())) {
      *pptr() = traits_type::to_char_type(ch);
      pbump(1);
    }
    return traits_type::not_eof(ch);
  }
  int sync() override { return drain() ? 0 : -1; }

 private:
  bool drain() {
    if (error_ != 0) return false;
    const std::size_t n = static_cast<std::size_t>(pptr() - pbase());
    if (n > 0 && !write_all(fd_, pbase(), n)) {
      error_ = errno;
      return false;
    }
    setp(data_.data(), data_.data() + data_.size());
    return true;
  }
  int fd_;
  std::vector<char> data_;
  int error_ = 0;
};

AtomicFile::AtomicFile(fs::path target, AtomicCommit mode)
    : target_(std::move(target)), mode_(mode) {
  if (target_.filename().empty()) fail(target_, "is not a file name", EISDIR);
  std::error_code ec;
  if (fs::is_directory(target_, ec)) fail(target_, "is a folder", EISDIR);
  const fs::path dir = target_.has_parent_path() ? target_.parent_path() : fs::path(".");
  std::string name = (dir / ("." + target_.filename().string() + ".tmp-XXXXXX")).string();
  fd_ = ::mkstemp(name.data());
  if (fd_ < 0) fail(target_, "cannot create a file in its folder", errno);
  temp_ = name;
  if (::fchmod(fd_, mode_for(target_)) != 0) {
    const int error = errno;
    ::close(fd_);
    ::unlink(temp_.c_str());
    fail(target_, "cannot set the permissions of the new file", error);
  }
}

AtomicFile::~AtomicFile() {
  if (committed_) return;
  stream_.reset();
  buffer_.reset();
  if (fd_ >= 0) ::close(fd_);
  ::unlink(temp_.c_str());
}

std::ostream& AtomicFile::stream() {
  if (!stream_) {
    buffer_ = std::make_unique<Buffer>(fd_);
    stream_ = std::make_unique<std::ostream>(buffer_.get());
  }
  return *stream_;
}

void AtomicFile::commit() {
  if (committed_) return;
  if (stream_) {
    stream_->flush();
    if (buffer_->error() != 0 || !*stream_) {
      fail(target_, "could not be written", buffer_->error() != 0 ? buffer_->error() : EIO);
    }
  }
  if (::fsync(fd_) != 0) fail(target_, "could not be written to disk", errno);
  const int closed = ::close(fd_);
  fd_ = -1;
  if (closed != 0) fail(target_, "could not be written to disk", errno);
  if (mode_ == AtomicCommit::keep_existing) {
    // link(2) fails with EEXIST rather than replace a file that is there.
    if (::link(temp_.c_str(), target_.c_str()) != 0) {
      const int error = errno;
      if (error == EEXIST) {
        throw InputError("output", target_.string(), "already exists and is never replaced",
                         "a new file name; nothing was changed");
      }
      fail(target_, "could not be created", error);
    }
    ::unlink(temp_.c_str());
  } else if (std::rename(temp_.c_str(), target_.c_str()) != 0) {
    fail(target_, "could not replace the file", errno);
  }
  committed_ = true;
  // Make the rename itself durable; the file is in place either way.
  const fs::path dir = target_.has_parent_path() ? target_.parent_path() : fs::path(".");
  const int dfd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY);
  if (dfd >= 0) {
    ::fsync(dfd);
    ::close(dfd);
  }
}

void write_file_atomically(const fs::path& file, std::string_view text, AtomicCommit mode) {
  AtomicFile out(file, mode);
  out.stream().write(text.data(), static_cast<std::streamsize>(text.size()));
  out.commit();
}

}  // namespace bb
