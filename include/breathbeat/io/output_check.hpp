// Outputs never touch inputs. Before a command writes a file (always through
// the one atomic writer, breathbeat/io/atomic_file.hpp) it checks the output
// here against every file the same command reads and every other file it
// writes. Files are compared by device and inode, not by name: a hard link, a
// symbolic link, "./x" and "x" are all the same file. An output that exists
// already is replaced only when the user asked for it (--force), and some
// files (a trial file) never are. Every refusal is an InputError (exit 2)
// naming both files, raised before anything is written.
#pragma once

#include <filesystem>
#include <string>
#include <vector>

namespace bb {

// A file a command names, with the option or argument that named it
// ("--beats", "FILE").
struct CommandFile {
  std::string option;
  std::filesystem::path path;
};

// What may happen to an output file that exists already.
enum class ExistingOutput {
  refuse,   // refused, suggesting --force
  replace,  // replaced (--force was given)
  never,    // never replaced, --force or not (a trial file)
};

// True when `a` and `b` name the same existing file (same device and inode);
// false when either does not exist.
bool same_file(const std::filesystem::path& a, const std::filesystem::path& b);

// The files of one command.
class CommandFiles {
 public:
  // A file the command reads; one that does not exist is kept too (it cannot
  // be an output's file, and reading it will fail on its own).
  void add_input(std::string option, std::filesystem::path path);

  // Checks that `path` may be written as the output `option`: it is not any
  // input (nor, once it exists, any earlier output), not the same path as an
  // earlier output, and either does not exist or may be replaced. Throws
  // InputError naming `option` and the file it collides with; nothing is
  // written. A passed output is remembered for the next checks.
  void add_output(std::string option, std::filesystem::path path, ExistingOutput existing);

  const std::vector<CommandFile>& inputs() const { return inputs_; }
  const std::vector<CommandFile>& outputs() const { return outputs_; }

 private:
  std::vector<CommandFile> inputs_;
  std::vector<CommandFile> outputs_;
};

}  // namespace bb
