// Outputs never touch inputs (breathbeat/io/output_check.hpp).
#include "breathbeat/io/output_check.hpp"

#include <sys/stat.h>

#include <system_error>
#include <utility>

#include "breathbeat/errors.hpp"

namespace bb {

namespace {

namespace fs = std::filesystem;

// "FILE 'trial.toml'", "--beats 'b.csv'".
std::string named(const CommandFile& f) {
  return f.option + " '" + f.path.string() + "'";
}

// The path with '.', '..' and symbolic links of its existing part resolved, for
// two outputs that do not exist yet; the path as given if that fails.
fs::path resolved(const fs::path& p) {
  std::error_code ec;
  fs::path out = fs::weakly_canonical(fs::absolute(p, ec), ec);
  return ec ? p : out;
}

bool exists_at_all(const fs::path& p) {
  struct stat st {};
  return ::lstat(p.c_str(), &st) == 0;
}

}  // namespace

bool same_file(const fs::path& a, const fs::path& b) {
  struct stat sa {
  }, sb{};
  if (::stat(a.c_str(), &sa) != 0 || ::stat(b.c_str(), &sb) != 0) return false;
  return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
}

void CommandFiles::add_input(std::string option, fs::path path) {
  inputs_.push_back({std::move(option), std::move(path)});
}

void CommandFiles::add_output(std::string option, fs::path path, ExistingOutput existing) {
  const CommandFile out{std::move(option), std::move(path)};
  for (const CommandFile& in : inputs_) {
    if (same_file(out.path, in.path)) {
      throw InputError(out.option, out.path.string(), "is the same file as the input " + named(in),
                       "an output file that is not one of the command's inputs; nothing was "
                       "written and " +
                           in.path.string() + " is unchanged");
    }
  }
  for (const CommandFile& earlier : outputs_) {
    if (same_file(out.path, earlier.path) || resolved(out.path) == resolved(earlier.path)) {
      throw InputError(out.option, out.path.string(),
                       "is the same file as the output " + named(earlier),
                       "a different file for each output; nothing was written");
    }
  }
  if (exists_at_all(out.path)) {
    std::error_code ec;
    if (fs::is_directory(out.path, ec)) {
      throw InputError(out.option, out.path.string(), "is a folder",
                       "a file name in an existing folder; nothing was written");
    }
    if (existing == ExistingOutput::never) {
      throw InputError(out.option, out.path.string(), "already exists and is never replaced",
                       "a new file name; nothing was written");
    }
    if (existing == ExistingOutput::refuse) {
      throw InputError(out.option, out.path.string(), "already exists",
                       "a new file name, or --force to replace it; nothing was written");
    }
  }
  outputs_.push_back(out);
}

}  // namespace bb
