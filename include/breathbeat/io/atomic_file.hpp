// The one way breathbeat writes a file: into a temporary file in the same
// folder, flushed and fsync'd, with the permissions of the file it replaces,
// then renamed over the target. A reader sees the old file or the new one,
// never half of either. Every failure is an InputError (exit 2) and leaves the
// target as it was.
#pragma once

#include <filesystem>
#include <memory>
#include <ostream>
#include <string_view>

namespace bb {

// What commit() does when the target exists by then: replace it (the rename),
// or keep it and fail (a hard link that refuses an existing name, so that a
// file created meanwhile is never overwritten: `trial new`).
enum class AtomicCommit { replace, keep_existing };

// Writes `text` to `file` atomically.
void write_file_atomically(const std::filesystem::path& file, std::string_view text,
                           AtomicCommit mode = AtomicCommit::replace);

// The streaming form, for outputs too large to hold in memory: write through
// stream() (or let a library write to temp_path()), then commit(). Destroyed
// without commit() (an error on the way), it removes the temporary file and
// the target is untouched.
class AtomicFile {
 public:
  // Creates the temporary file beside `target`; InputError if it cannot.
  explicit AtomicFile(std::filesystem::path target, AtomicCommit mode = AtomicCommit::replace);
  ~AtomicFile();
  AtomicFile(const AtomicFile&) = delete;
  AtomicFile& operator=(const AtomicFile&) = delete;

  const std::filesystem::path& target() const { return target_; }
  // The temporary file, for a library that opens files by name (EDFlib).
  const std::filesystem::path& temp_path() const { return temp_; }
  std::ostream& stream();

  // Flushes, fsyncs and renames the temporary file over the target (or, with
  // AtomicCommit::keep_existing, links it to the target only if no file is there).
  void commit();

 private:
  class Buffer;
  std::filesystem::path target_;
  std::filesystem::path temp_;
  AtomicCommit mode_ = AtomicCommit::replace;
  int fd_ = -1;
  std::unique_ptr<Buffer> buffer_;
  std::unique_ptr<std::ostream> stream_;
  bool committed_ = false;
};

}  // namespace bb
