// A waveform window outside its record, end to end through the command line: `trial add-step`
// and `check` refuse it (exit 2, file untouched, named by option or file:line:column), and a
// report of a file written by hand says it on that step and reports the other steps. The record
// is the program's own synthetic one (`wave synth`), 300 s long: its length is the test's input.
#include <gtest/gtest.h>

#include <fstream>
#include <sstream>
#include <string>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

struct WaveformWindow : ::testing::Test {
  std::string dir = temp_dir("waveform_window");
  std::string record = dir + "/rec.hea";
  std::string trial = dir + "/t.toml";
  void SetUp() override {
    ASSERT_EQ(run_cli({"wave", "synth", "-o", record, "--duration", "300s"}).exit_code, 0);
    ASSERT_EQ(run_cli({"trial", "new", trial, "--sex", "female", "--height", "165"}).exit_code, 0);
    ASSERT_EQ(
        run_cli({"trial", "add-step", trial, "--label", "PEEP 8", "--set-peep", "8"}).exit_code, 0);
  }
};

TEST_F(WaveformWindow, AddStepRefusesAnEndAfterTheRecord) {
  const std::string before = slurp(trial);
  const CliResult r = run_cli({"trial", "add-step", trial, "--label", "PEEP 10", "--set-peep", "10",
                               "--record", record, "--from", "250s", "--to", "2000s"});
  EXPECT_EQ(r.exit_code, 2) << r.out << r.err;
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("--to"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("after the end of the record"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("300.0 s"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(trial), before);
  // A start past the end names --from.
  const CliResult s = run_cli(
      {"trial", "add-step", trial, "--label", "PEEP 10", "--record", record, "--from", "400s"});
  EXPECT_EQ(s.exit_code, 2);
  EXPECT_NE(s.err.find("--from"), std::string::npos) << s.err;
  EXPECT_EQ(slurp(trial), before);
  // Inside the record it is accepted.
  EXPECT_EQ(run_cli({"trial", "add-step", trial, "--label", "PEEP 10", "--record", record, "--from",
                     "20s", "--to", "140s"})
                .exit_code,
            0);
}

TEST_F(WaveformWindow, CheckRefusesAndTheReportGoesOnWithoutThatStep) {
  std::ofstream(trial, std::ios::app) << R"(
[[step]]
label = "PEEP 12"
[step.ventilator]
set_peep = 12
[step.waveform]
file = "rec.hea"
start = "250 s"
end = "2000 s"
)";
  const CliResult c = run_cli({"check", trial});
  EXPECT_EQ(c.exit_code, 2) << c.out;
  EXPECT_TRUE(c.out.empty()) << c.out;
  EXPECT_NE(c.err.find("t.toml:"), std::string::npos) << c.err;
  EXPECT_NE(c.err.find("waveform.end"), std::string::npos) << c.err;

  const CliResult r = run_cli({"report", trial, "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  ASSERT_EQ(j["steps"].size(), 2u);
  EXPECT_EQ(j["steps"][0]["label"], "PEEP 8");
  EXPECT_EQ(j["steps"][1]["label"], "PEEP 12");
  bool said = false;
  for (const auto& n : j["notes"]) {
    const std::string t = n.get<std::string>();
    said |= t.find("'PEEP 12': waveform window not analysed") != std::string::npos &&
            t.find("after the end of the record") != std::string::npos;
  }
  EXPECT_TRUE(said) << j["notes"].dump(1);
}

}  // namespace
}  // namespace bb::test
