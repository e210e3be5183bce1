// One name for the output file of every command that writes one: -o,--output, as `report` and
// `wave` spell it. `wave synth` and `wave convert` once called it --out: that old spelling still
// works, with the project's one-line note on stderr (the same words as the field registry's old
// spellings). Names and words are this project's own (common practice, no source).
#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const char* kNote = "note: '--out' is an old spelling of '--output'";

TEST(OutputOption, WaveSynthAndConvertTakeOutputAndTheOldOutWithANote) {
  const std::string dir = temp_dir("output_option");
  CliResult r = run_cli({"wave", "synth", "--output", dir + "/a.csv", "--duration", "20s"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.err.find("old spelling"), std::string::npos) << r.err;
  EXPECT_TRUE(std::filesystem::exists(dir + "/a.csv"));

  r = run_cli({"wave", "synth", "--out", dir + "/b.csv", "--duration", "20s"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.err.find(kNote), std::string::npos) << r.err;
  EXPECT_TRUE(std::filesystem::exists(dir + "/b.csv"));

  r = run_cli({"wave", "convert", dir + "/a.csv", "--output", dir + "/c.csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(std::filesystem::exists(dir + "/c.csv"));
  r = run_cli({"wave", "convert", dir + "/a.csv", "--out", dir + "/d.csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.err.find(kNote), std::string::npos) << r.err;
  EXPECT_TRUE(std::filesystem::exists(dir + "/d.csv"));
}

TEST(OutputOption, HelpNamesOutputOnlyAndTheSameAsReport) {
  for (const std::vector<std::string> command : {std::vector<std::string>{"report", "--help"},
                                                 {"wave", "--help"},
                                                 {"wave", "synth", "--help"},
                                                 {"wave", "convert", "--help"}}) {
    const CliResult r = run_cli(command);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    EXPECT_NE(r.out.find("-o,--output TEXT"), std::string::npos) << command[0] << r.out;
    EXPECT_EQ(r.out.find("--out "), std::string::npos) << r.out;
  }
}

TEST(OutputOption, NoneOrBothAreRefusedWithNothingWritten) {
  const std::string dir = temp_dir("output_option_refused");
  CliResult r = run_cli({"wave", "synth", "--duration", "20s"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("--output"), std::string::npos) << r.err;
  r = run_cli(
      {"wave", "synth", "--out", dir + "/x.csv", "--output", dir + "/y.csv", "--duration", "20s"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("'--out'"), std::string::npos) << r.err;
  EXPECT_FALSE(std::filesystem::exists(dir + "/x.csv"));
  EXPECT_FALSE(std::filesystem::exists(dir + "/y.csv"));
}

}  // namespace
}  // namespace bb::test
