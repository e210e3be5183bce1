// Outputs never touch inputs, through the command line: every writing command
// refuses an output that is one of its inputs (by device and inode: a hard
// link or another spelling of the path), refuses an existing output unless
// --force, never replaces a trial file, and a process stopped in the middle of
// a write leaves the old file byte-identical. Expected behaviour: link(2),
// rename(2), setrlimit(RLIMIT_FSIZE) and SIGXFSZ as in POSIX.1-2017 (common
// practice, no source).
#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

namespace fs = std::filesystem;

std::vector<std::string> names_in(const fs::path& dir) {
  std::vector<std::string> out;
  for (const auto& e : fs::directory_iterator(dir)) out.push_back(e.path().filename().string());
  std::sort(out.begin(), out.end());
  return out;
}

const char* kTrial =
    "[patient]\n"
    "sex = \"female\"\n"
    "height = 165\n"
    "\n"
    "[[step]]\n"
    "label = \"PEEP 8\"\n"
    "[step.hold]\n"
    "pplat = 22\n"
    "peep_total = 8\n"
    "[step.ventilator]\n"
    "vt = 400\n";

class OutputSafety : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = temp_dir("output_safety");
    trial_ = dir_ / "t.toml";
    std::ofstream(trial_, std::ios::binary) << kTrial;
  }
  void TearDown() override { fs::remove_all(dir_); }

  // A short synthetic record (`name` decides the format).
  fs::path record(const std::string& name) {
    const fs::path out = dir_ / name;
    const CliResult r = run_cli({"wave", "synth", "-o", out.string(), "--duration", "40s"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return out;
  }

  // Runs `args`; expects exit 2, nothing on stdout, every word of `said` in
  // stderr, and every file of the folder byte-identical and no file added.
  void expect_refused(const std::vector<std::string>& args, const std::vector<std::string>& said) {
    std::map<std::string, std::string> before;
    for (const std::string& n : names_in(dir_)) before[n] = slurp(dir_ / n);
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_EQ(r.out, "");
    for (const std::string& s : said) EXPECT_NE(r.err.find(s), std::string::npos) << s << r.err;
    std::map<std::string, std::string> after;
    for (const std::string& n : names_in(dir_)) after[n] = slurp(dir_ / n);
    EXPECT_TRUE(before == after) << "a file changed or appeared";
  }

  fs::path dir_;
  fs::path trial_;
};

TEST_F(OutputSafety, AReportOntoItsTrialIsRefusedByAnyName) {
  fs::create_hard_link(trial_, dir_ / "linked.toml");
  fs::create_directory(dir_ / "sub");
  for (const fs::path& out :
       {trial_, dir_ / "." / "t.toml", dir_ / "sub" / ".." / "t.toml", dir_ / "linked.toml"}) {
    SCOPED_TRACE(out.string());
    expect_refused({"report", trial_.string(), "-o", out.string()},
                   {"--output", "same file as the input FILE", trial_.string()});
    // --force never lets an output replace an input.
    expect_refused({"report", trial_.string(), "-o", out.string(), "--force"},
                   {"--output", "same file as the input FILE"});
  }
}

TEST_F(OutputSafety, AReportOntoItsThresholdsFileOrAnotherTrialIsRefused) {
  const fs::path site = dir_ / "site.toml";
  std::ofstream(site) << "# site thresholds\n";
  expect_refused({"report", trial_.string(), "--thresholds", site.string(), "-o", site.string()},
                 {"--output", "--thresholds"});
  const fs::path other = dir_ / "other.toml";
  std::ofstream(other, std::ios::binary) << kTrial;
  expect_refused({"report", trial_.string(), "-o", other.string(), "--force"},
                 {"--output", "never replaced"});
}

TEST_F(OutputSafety, AnExistingReportIsReplacedOnlyWithForce) {
  const fs::path out = dir_ / "report.txt";
  std::ofstream(out) << "old report\n";
  expect_refused({"report", trial_.string(), "-o", out.string()},
                 {"--output", "already exists", "--force"});
  const CliResult r = run_cli({"report", trial_.string(), "-o", out.string(), "--force"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(slurp(out), "old report\n");
  EXPECT_NE(slurp(out).find("PEEP 8"), std::string::npos);
  EXPECT_EQ(slurp(trial_), kTrial);
  EXPECT_EQ(names_in(dir_), (std::vector<std::string>{"report.txt", "t.toml"}));
}

TEST_F(OutputSafety, WaveRefusesToWriteOverItsRecord) {
  const fs::path csv = record("r.csv");
  expect_refused({"wave", csv.string(), "--beats", csv.string()},
                 {"--beats", "same file as the input FILE"});
  expect_refused({"wave", csv.string(), "--breaths", (dir_ / "." / "r.csv").string(), "--force"},
                 {"--breaths", "same file as the input FILE"});
  // A WFDB record is its header and the signal file the header names.
  const fs::path hea = record("w.hea");
  expect_refused({"wave", hea.string(), "--beats", (dir_ / "w.dat").string(), "--force"},
                 {"--beats", "w.dat"});
  // Two outputs on one file, before either exists.
  expect_refused({"wave", csv.string(), "--beats", (dir_ / "b.csv").string(), "--breaths",
                  (dir_ / "." / "b.csv").string()},
                 {"--breaths", "same file as the output --beats"});
}

TEST_F(OutputSafety, WaveReplacesAnExistingTableOnlyWithForce) {
  const fs::path csv = record("r.csv");
  const fs::path beats = dir_ / "beats.csv";
  std::ofstream(beats) << "old\n";
  expect_refused({"wave", csv.string(), "--beats", beats.string()},
                 {"--beats", "already exists", "--force"});
  const CliResult r = run_cli({"wave", csv.string(), "--beats", beats.string(), "--force"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(slurp(beats).rfind("onset [s],", 0), 0u)
      << slurp(beats).substr(0, 80);  // the beat table
}

TEST_F(OutputSafety, SynthReplacesAnExistingRecordOnlyWithForce) {
  const fs::path csv = record("r.csv");
  expect_refused({"wave", "synth", "-o", csv.string(), "--duration", "20s"},
                 {"--output", "already exists", "--force"});
  // WFDB: an existing .dat alone is enough to refuse.
  std::ofstream(dir_ / "w.dat") << "not mine\n";
  expect_refused({"wave", "synth", "-o", (dir_ / "w.hea").string(), "--duration", "20s"},
                 {"--output", "w.dat", "already exists"});
  const std::string before = slurp(csv);
  const CliResult r =
      run_cli({"wave", "synth", "-o", csv.string(), "--duration", "20s", "--force"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(slurp(csv), before);  // 20 s instead of 40 s
}

TEST_F(OutputSafety, TrialNewNeverOverwritesAndAddStepOnlyAppends) {
  expect_refused({"trial", "new", trial_.string(), "--sex", "male", "--height", "180"},
                 {"already exists"});
  const CliResult r = run_cli({"trial", "add-step", trial_.string(), "--label", "PEEP 12",
                               "--pplat", "26", "--peep-total", "12"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const std::string after = slurp(trial_);
  EXPECT_EQ(after.substr(0, std::string(kTrial).size()), kTrial);  // earlier text byte-identical
  EXPECT_NE(after.find("PEEP 12", std::string(kTrial).size()), std::string::npos);
}

// Runs breathbeat through sh with a file-size limit of `kib` KiB; `ignore`
// makes SIGXFSZ ignored (the write then fails with EFBIG), otherwise the signal
// kills the process in the middle of the write. Returns the wait status.
int run_limited(const std::vector<std::string>& args, int kib, bool ignore, const fs::path& err) {
  std::string command = std::string(ignore ? "trap '' XFSZ; " : "") + "ulimit -f " +
                        std::to_string(kib) + "; exec '" + BREATHBEAT_EXE + "'";
  for (const std::string& a : args) command += " '" + a + "'";
  command += " >/dev/null 2>'" + err.string() + "'";
  return std::system(command.c_str());
}

TEST_F(OutputSafety, AWriteStoppedMidwayLeavesTheOldRecordByteIdentical) {
  const fs::path csv = record("r.csv");  // 40 s x 3 channels at 125 /s: well over 64 KiB
  const std::string before = slurp(csv);
  ASSERT_GT(before.size(), 128u * 1024u);
  const fs::path err = fs::path(temp_dir("output_safety_err")) / "stderr";
  // The write fails (EFBIG): exit 2 with the reason, old file as it was, no temporary left.
  const int failed = run_limited(
      {"wave", "synth", "-o", csv.string(), "--duration", "10min", "--force"}, 64, true, err);
  ASSERT_TRUE(WIFEXITED(failed));
  EXPECT_EQ(WEXITSTATUS(failed), 2) << slurp(err);
  EXPECT_NE(slurp(err).find("could not be written"), std::string::npos) << slurp(err);
  EXPECT_EQ(slurp(csv), before);
  EXPECT_EQ(names_in(dir_), (std::vector<std::string>{"r.csv", "t.toml"}));
  // The process is killed in the middle of the write: the old file is still whole.
  const int killed = run_limited(
      {"wave", "synth", "-o", csv.string(), "--duration", "10min", "--force"}, 64, false, err);
  ASSERT_TRUE(WIFSIGNALED(killed)) << killed;
  EXPECT_EQ(WTERMSIG(killed), SIGXFSZ);
  EXPECT_EQ(slurp(csv), before);
  fs::remove_all(err.parent_path());
}

}  // namespace
}  // namespace bb::test
