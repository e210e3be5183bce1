// The one atomic writer (breathbeat/io/atomic_file.hpp).
#include "breathbeat/io/atomic_file.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>

#include "breathbeat/errors.hpp"

namespace bb {

void write_file_atomically(const std::filesystem::path& file, std::string_view text) {
  namespace fs = std::filesystem;
  const fs::path dir = file.has_parent_path() ? file.parent_path() : fs::path(".");
  std::string name = ".";
  name += file.filename().string();
  name += ".tmp-XXXXXX";
  std::string temp = (dir / name).string();
  const int fd = mkstemp(temp.data());
  if (fd < 0) {
    throw InputError("output", file.string(),
                     std::string("cannot create a file in that folder: ") + std::strerror(errno),
                     "a folder you can write to");
  }
  struct stat st {};
  mode_t mode = 0644;
  if (::stat(file.c_str(), &st) == 0) mode = st.st_mode & 07777;
  ::fchmod(fd, mode);
  std::size_t done = 0;
  bool ok = true;
  while (ok && done < text.size()) {
    const ssize_t n = ::write(fd, text.data() + done, text.size() - done);
    if (n < 0 && errno == EINTR) continue;
    ok = n > 0;
    if (ok) done += static_cast<std::size_t>(n);
  }
  ok = ok && ::fsync(fd) == 0;
  ok = (::close(fd) == 0) && ok;
  if (!ok || std::rename(temp.c_str(), file.c_str()) != 0) {
    const std::string why = std::strerror(errno);
    ::unlink(temp.c_str());
    throw InputError("output", file.string(), "could not be written: " + why,
                     "a writable file; nothing was changed");
  }
}

}  // namespace bb
