// The one atomic writer (breathbeat/io/atomic_file.hpp): a failure leaves the
// old file as it was and is an InputError (exit 2); a new file keeps the
// permissions of the one it replaces; nothing is left behind. Expected
// behaviour: rename(2) replaces a file atomically and refuses to replace a
// directory with a file (POSIX.1-2017, rename(); common practice, no source).
#include <gtest/gtest.h>
#include <sys/stat.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "breathbeat/errors.hpp"
#include "breathbeat/io/atomic_file.hpp"
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

TEST(AtomicFile, ReplacesAndKeepsThePermissions) {
  const fs::path dir = test::temp_dir("atomic_mode");
  const fs::path file = dir / "report.txt";
  std::ofstream(file) << "old\n";
  fs::permissions(file, fs::perms::owner_read | fs::perms::owner_write);  // 0600
  write_file_atomically(file, "new\n");
  EXPECT_EQ(read(file), "new\n");
  struct stat st {};
  ASSERT_EQ(::stat(file.c_str(), &st), 0);
  EXPECT_EQ(st.st_mode & 07777, 0600u);
  EXPECT_EQ(entries(dir), 1);  // no temporary file left
}

TEST(AtomicFile, ATargetThatIsAFolderIsAnInputErrorAndChangesNothing) {
  const fs::path dir = test::temp_dir("atomic_folder");
  const fs::path target = dir / "out.csv";
  fs::create_directory(target);
  std::ofstream(target / "inside.txt") << "kept\n";
  try {
    write_file_atomically(target, "new\n");
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "output");
  }
  EXPECT_TRUE(fs::is_directory(target));
  EXPECT_EQ(read(target / "inside.txt"), "kept\n");
  EXPECT_EQ(entries(dir), 1);
}

TEST(AtomicFile, AMissingFolderIsAnInputError) {
  const fs::path dir = test::temp_dir("atomic_missing");
  EXPECT_THROW(write_file_atomically(dir / "no" / "such" / "r.txt", "x"), InputError);
  EXPECT_EQ(entries(dir), 0);
}

TEST(AtomicFile, NotCommittedLeavesTheOldFile) {
  const fs::path dir = test::temp_dir("atomic_uncommitted");
  const fs::path file = dir / "beats.csv";
  std::ofstream(file) << "old\n";
  {
    AtomicFile out(file);
    out.stream() << std::string(1 << 20, 'x');  // more than the buffer holds
  }                                             // an error on the way: destroyed without commit()
  EXPECT_EQ(read(file), "old\n");
  EXPECT_EQ(entries(dir), 1);
}

TEST(AtomicFile, AWaveformWriterOnAFolderFailsWithExit2AndKeepsTheFolder) {
  const fs::path dir = test::temp_dir("atomic_wave_cli");
  const fs::path target = dir / "rec.edf";
  fs::create_directory(target);
  const test::CliResult r =
      test::run_cli({"wave", "synth", "-o", target.string(), "--duration", "10s"});
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_TRUE(fs::is_directory(target));
  EXPECT_EQ(entries(dir), 1);
}

}  // namespace
}  // namespace bb
