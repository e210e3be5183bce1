// The one way breathbeat writes a file: into a temporary file in the same
// folder, flushed and fsync'd, with the permissions of the file it replaces,
// then renamed over the target. A reader sees the old file or the new one,
// never half of either. Every failure is an InputError (exit 2) and leaves the
// target as it was.
#pragma once

#include <filesystem>
#include <string_view>

namespace bb {

// Writes `text` to `file` atomically.
void write_file_atomically(const std::filesystem::path& file, std::string_view text);

}  // namespace bb
