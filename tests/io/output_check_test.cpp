// Outputs never touch inputs (breathbeat/io/output_check.hpp), and the atomic
// writer keeps the old file when a write fails or the process dies midway.
// Expected behaviour from the system calls: a hard link and a symbolic link
// reach the same inode, stat(2) reports st_dev/st_ino; a write past
// RLIMIT_FSIZE fails with EFBIG when SIGXFSZ is ignored, and otherwise the
// signal ends the process; link(2) refuses an existing name with EEXIST
// (POSIX.1-2017, link(), rename(), setrlimit(); common practice, no source).
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "breathbeat/errors.hpp"
#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/io/output_check.hpp"
#include "cli_runner.hpp"

namespace bb {
namespace {

namespace fs = std::filesystem;

std::string read(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

int entries(const fs::path& dir) {
  int n = 0;
  for ([[maybe_unused]] const auto& e : fs::directory_iterator(dir)) ++n;
  return n;
}

// A folder with `in.csv` holding some text.
struct Folder {
  fs::path dir = test::temp_dir("output_check");
  fs::path input = dir / "in.csv";
  Folder() { std::ofstream(input, std::ios::binary) << "time_s,ABP_mmHg\n0,80\n"; }
  ~Folder() { fs::remove_all(dir); }
};

// The InputError `add_output` throws; fails the test when there is none.
InputError refusal(CommandFiles& files, const std::string& option, const fs::path& out,
                   ExistingOutput existing) {
  try {
    files.add_output(option, out, existing);
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "no refusal for " << out;
  return InputError("", "", "", "");
}

TEST(OutputCheck, AHardLinkToAnInputIsTheSameFile) {
  Folder f;
  const fs::path link = f.dir / "other_name.csv";
  fs::create_hard_link(f.input, link);
  CommandFiles files;
  files.add_input("FILE", f.input);
  const InputError e = refusal(files, "--beats", link, ExistingOutput::replace);
  EXPECT_EQ(e.field(), "--beats");
  EXPECT_NE(e.problem().find("FILE"), std::string::npos) << e.what();
  EXPECT_NE(e.problem().find(f.input.string()), std::string::npos) << e.what();
  EXPECT_TRUE(files.outputs().empty());
}

TEST(OutputCheck, AnotherSpellingOrASymbolicLinkIsTheSameFile) {
  Folder f;
  const fs::path symlink = f.dir / "sym.csv";
  fs::create_symlink(f.input, symlink);
  for (const fs::path& out : {f.dir / "." / "in.csv", f.dir / "sub" / ".." / "in.csv", symlink}) {
    SCOPED_TRACE(out.string());
    fs::create_directories(f.dir / "sub");
    CommandFiles files;
    files.add_input("FILE", f.input);
    // Even --force does not let an output replace an input.
    refusal(files, "--output", out, ExistingOutput::replace);
  }
  EXPECT_EQ(read(f.input), "time_s,ABP_mmHg\n0,80\n");
}

TEST(OutputCheck, ADifferentFileWithTheSameContentIsNotTheInput) {
  Folder f;
  const fs::path copy = f.dir / "copy.csv";
  fs::copy_file(f.input, copy);
  EXPECT_FALSE(same_file(f.input, copy));
  EXPECT_TRUE(same_file(f.input, f.dir / "." / "in.csv"));
  CommandFiles files;
  files.add_input("FILE", f.input);
  EXPECT_NO_THROW(files.add_output("--beats", copy, ExistingOutput::replace));
  EXPECT_EQ(files.outputs().size(), 1u);
}

TEST(OutputCheck, AnExistingOutputNeedsForceAndATrialFileIsNeverReplaced) {
  Folder f;
  const fs::path old = f.dir / "beats.csv";
  std::ofstream(old) << "old\n";
  CommandFiles files;
  const InputError e = refusal(files, "--beats", old, ExistingOutput::refuse);
  EXPECT_EQ(e.problem(), "already exists");
  EXPECT_NE(e.expected().find("--force"), std::string::npos) << e.what();
  EXPECT_NO_THROW(files.add_output("--beats", old, ExistingOutput::replace));
  CommandFiles trial;
  const InputError never = refusal(trial, "--output", old, ExistingOutput::never);
  EXPECT_EQ(never.expected().find("--force"), std::string::npos) << never.what();
  EXPECT_EQ(read(old), "old\n");
}

TEST(OutputCheck, TwoOutputsOnOneFileAreRefusedBeforeEitherExists) {
  Folder f;
  CommandFiles files;
  files.add_output("--beats", f.dir / "b.csv", ExistingOutput::refuse);
  const InputError e = refusal(files, "--breaths", f.dir / "." / "b.csv", ExistingOutput::refuse);
  EXPECT_NE(e.problem().find("--beats"), std::string::npos) << e.what();
  EXPECT_EQ(entries(f.dir), 1);  // nothing written
}

TEST(OutputCheck, AFolderIsNoOutput) {
  Folder f;
  CommandFiles files;
  const InputError e = refusal(files, "--output", f.dir, ExistingOutput::replace);
  EXPECT_EQ(e.problem(), "is a folder");
}

// The child writes 1 MiB through the atomic writer over `file` with a file-size
// limit of 64 KiB, so that the write fails (or, with SIGXFSZ at its default,
// the process is killed) in the middle; returns the wait status.
int write_over_the_limit(const fs::path& file, bool ignore_signal) {
  const pid_t pid = ::fork();
  if (pid == 0) {
    if (ignore_signal) ::signal(SIGXFSZ, SIG_IGN);
    const rlimit limit{64 * 1024, 64 * 1024};
    if (::setrlimit(RLIMIT_FSIZE, &limit) != 0) ::_exit(10);
    try {
      AtomicFile out(file);
      for (int i = 0; i < 1024; ++i) out.stream() << std::string(1024, 'n');
      out.commit();
    } catch (const InputError&) {
      ::_exit(3);  // the failure was reported as bad output
    } catch (...) {
      ::_exit(4);
    }
    ::_exit(0);
  }
  int status = 0;
  ::waitpid(pid, &status, 0);
  return status;
}

TEST(AtomicWriterFailure, AWriteFailingMidwayKeepsTheOldFileAndLeavesNothing) {
  Folder f;
  const fs::path old = f.dir / "report.txt";
  const std::string before(10000, 'o');
  std::ofstream(old, std::ios::binary) << before;
  const int status = write_over_the_limit(old, true);
  ASSERT_TRUE(WIFEXITED(status));
  EXPECT_EQ(WEXITSTATUS(status), 3);  // EFBIG became an InputError
  EXPECT_EQ(read(old), before);
  EXPECT_EQ(entries(f.dir), 2);  // in.csv and report.txt: the temporary file was removed
}

TEST(AtomicWriterFailure, AProcessKilledMidwayKeepsTheOldFile) {
  Folder f;
  const fs::path old = f.dir / "report.txt";
  const std::string before(10000, 'o');
  std::ofstream(old, std::ios::binary) << before;
  const int status = write_over_the_limit(old, false);
  ASSERT_TRUE(WIFSIGNALED(status));
  EXPECT_EQ(WTERMSIG(status), SIGXFSZ);
  EXPECT_EQ(read(old), before);  // only the temporary file beside it was cut short
}

TEST(AtomicWriterFailure, KeepExistingNeverReplacesAFileMadeMeanwhile) {
  Folder f;
  const fs::path target = f.dir / "trial.toml";
  {
    AtomicFile out(target, AtomicCommit::keep_existing);
    out.stream() << "new\n";
    std::ofstream(target) << "made meanwhile\n";
    try {
      out.commit();
      ADD_FAILURE() << "replaced";
    } catch (const InputError& e) {
      EXPECT_EQ(e.problem(), "already exists and is never replaced");
    }
  }  // the temporary file goes with the writer
  EXPECT_EQ(read(target), "made meanwhile\n");
  const fs::path fresh = f.dir / "fresh.toml";
  write_file_atomically(fresh, "x\n", AtomicCommit::keep_existing);
  EXPECT_EQ(read(fresh), "x\n");
  EXPECT_EQ(entries(f.dir), 3);  // in.csv, trial.toml, fresh.toml: no temporary file left
}

}  // namespace
}  // namespace bb
