// Trials of one patient side by side (`breathbeat report A.toml B.toml`): the finding that names
// each trial's best step shows that step's settings (PEEP, VT) and what changed between the
// trials' best settings, judged by the settings rather than by the steps' labels.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

struct Step {
  std::string label, peep, vt, pplat;
};

std::string record_trial(const std::string& dir, const std::string& date,
                         const std::vector<Step>& steps) {
  const std::string file = dir + "/" + date + ".toml";
  CliResult r = run_cli({"trial", "new", file, "--sex", "male", "--height", "175", "--date", date});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  for (const Step& s : steps) {
    r = run_cli({"trial", "add-step", file, "--label", s.label, "--set-peep", s.peep, "--vt", s.vt,
                 "--pplat", s.pplat, "--rr", "20"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
  }
  return file;
}

std::string best_compliance_text(const std::string& a, const std::string& b) {
  const CliResult r = run_cli({"report", a, b, "--format", "json"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const json j = parse_json(r);
  for (const json& f : j["comparison"]) {
    if (f["key"] == "best_across_trials.best_compliance") return f["text"];
  }
  ADD_FAILURE() << j["comparison"].dump(1);
  return "";
}

// Crs = VT / (Pplat - PEEP) (Suter, Fairley & Isenberg, N Engl J Med 1975;292:284):
// day 1: 420/14 = 30.0 at PEEP 8, 420/13 = 32.3 at PEEP 12 (best); day 2: 420/16 = 26.3 at
// PEEP 8, 380/12 = 31.7 at PEEP 12 (best). PBW of a man of 175 cm: 50 + 0.91 x (175 - 152.4) =
// 70.6 kg (ARDS Network, N Engl J Med 2000;342:1301), so 420 mL = 6.0 and 380 mL = 5.4 mL/kg.
TEST(BestAcrossTrials, TheBestStepsSettingsAndWhatChangedAreShown) {
  const std::string dir = temp_dir("best_across_trials_vt");
  const std::string a = record_trial(
      dir, "2026-12-01", {{"PEEP 8", "8", "420", "22"}, {"PEEP 12", "12", "420", "25"}});
  const std::string b = record_trial(
      dir, "2026-12-03", {{"PEEP 8", "8", "420", "24"}, {"PEEP 12", "12", "380", "24"}});
  const std::string text = best_compliance_text(a, b);
  EXPECT_NE(text.find("2026-12-01 at 'PEEP 12' (set PEEP 12 cmH2O, VT 420 mL = 6.0 mL/kg PBW)"),
            std::string::npos)
      << text;
  EXPECT_NE(text.find("2026-12-03 at 'PEEP 12' (set PEEP 12 cmH2O, VT 380 mL = 5.4 mL/kg PBW)"),
            std::string::npos)
      << text;
  // The same label, but VT 420 -> 380 mL: the best setting is not the same.
  EXPECT_NE(text.find("differs between the trials"), std::string::npos) << text;
  EXPECT_NE(text.find("from 2026-12-01 to 2026-12-03: set PEEP unchanged, VT -40 mL"),
            std::string::npos)
      << text;
}

// Labels differ ("PEEP 12" and "P12"), the settings do not: the same best setting.
TEST(BestAcrossTrials, TheSameSettingsUnderAnotherLabelAreTheSameSetting) {
  const std::string dir = temp_dir("best_across_trials_label");
  const std::string a = record_trial(
      dir, "2026-12-01", {{"PEEP 8", "8", "420", "22"}, {"PEEP 12", "12", "420", "25"}});
  const std::string b =
      record_trial(dir, "2026-12-03", {{"P8", "8", "420", "23"}, {"P12", "12", "420", "25"}});
  const std::string text = best_compliance_text(a, b);
  EXPECT_NE(text.find("is the same in each trial"), std::string::npos) << text;
  EXPECT_NE(text.find("set PEEP unchanged, VT unchanged"), std::string::npos) << text;
}

// The best PEEP moved: day 1 best at PEEP 12 (32.3 above), day 2 best at PEEP 8 (420/12 = 35.0
// against 420/14 = 30.0; Suter et al. 1975).
TEST(BestAcrossTrials, AMovedPeepIsSaidWithItsSign) {
  const std::string dir = temp_dir("best_across_trials_peep");
  const std::string a = record_trial(
      dir, "2026-12-01", {{"PEEP 8", "8", "420", "22"}, {"PEEP 12", "12", "420", "25"}});
  const std::string b = record_trial(
      dir, "2026-12-03", {{"PEEP 8", "8", "420", "20"}, {"PEEP 12", "12", "420", "26"}});
  const std::string text = best_compliance_text(a, b);
  EXPECT_NE(text.find("differs between the trials"), std::string::npos) << text;
  EXPECT_NE(text.find("set PEEP -4 cmH2O, VT unchanged"), std::string::npos) << text;
}

}  // namespace
}  // namespace bb::test
