// A PEEP release recorded with `trial add-step --delta-eelv --peep-high --peep-low --pplat-low`
// and reported: the recruitment-to-inflation ratio of Chen et al., Am J Respir Crit Care Med
// 2020;201:178, with a released volume below the one the low-PEEP compliance predicts read as no
// recruitment only within the volume measurement error, and as not interpretable beyond it.
#include <gtest/gtest.h>

#include <string>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

// One step: release from PEEP 15 to 5 cmH2O, Pplat 25 at the low PEEP, VT 400 mL:
// Crs,low = 400 / (25 - 5) = 20 mL/cmH2O and 20 x 10 = 200 mL predicted without recruitment
// (Chen et al. 2020).
std::string release_trial(const std::string& name, const std::string& delta_eelv) {
  const std::string file = temp_dir("peep_release_" + name) + "/t.toml";
  CliResult r = run_cli({"trial", "new", file, "--sex", "male", "--height", "175"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  r = run_cli({"trial", "add-step",     file,       "--label",      "PEEP 15", "--time",
               "11:00", "--set-peep",   "15",       "--vt",         "400",     "--pplat",
               "30",    "--delta-eelv", delta_eelv, "--peep-high",  "15",      "--peep-low",
               "5",     "--pplat-low",  "25",       "--release-vt", "400"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return file;
}

json finding(const std::string& file) {
  const CliResult r = run_cli({"report", file, "--format", "json"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const json j = parse_json(r);
  for (const json& f : j["comparison"]) {
    if (f["key"] == "recruitment_to_inflation") return f;
  }
  ADD_FAILURE() << j["comparison"].dump(1);
  return nullptr;
}

TEST(PeepRelease, WellBelowThePredictionIsFlaggedAsNotInterpretable) {
  // 150 - 200 = -50 mL, R/I = (-50 / 10) / 20 = -0.25 (Chen et al. 2020); the volume error of
  // 150 mL is 4 + 0.15 x 150 = 26.5 mL (ISO 80601-2-12 expired-volume accuracy, from memory).
  const std::string file = release_trial("below", "150 mL");
  const json f = finding(file);
  EXPECT_NEAR(f["values"]["recruitment_to_inflation"]["value"].get<double>(), -0.25, 1e-3);
  EXPECT_NEAR(f["values"]["predicted_volume"]["value"].get<double>(), 200.0, 1e-6);
  EXPECT_NEAR(f["values"]["volume_tolerance"]["value"].get<double>(), 26.5, 1e-6);
  EXPECT_TRUE(f["flagged"]);
  const std::string text = f["text"];
  EXPECT_NE(text.find("cannot be interpreted"), std::string::npos) << text;
  EXPECT_EQ(text.find("suggests low recruitability"), std::string::npos) << text;

  const std::string t = unwrapped_report_text(file);
  EXPECT_NE(t.find("! 'PEEP 15': recruitment-to-inflation ratio -0.25 cannot be interpreted"),
            std::string::npos)
      << t;
  EXPECT_EQ(t.find("within measurement error"), std::string::npos) << t;
  EXPECT_NE(t.find("leak"), std::string::npos) << t;
}

TEST(PeepRelease, SlightlyBelowThePredictionIsNoRecruitmentWithinTheError) {
  // 190 - 200 = -10 mL, R/I -0.05 (Chen et al. 2020), within 4 + 0.15 x 190 = 32.5 mL (ISO
  // 80601-2-12, from memory): no recruitment, below 0.5 (Chen et al. 2020).
  const std::string file = release_trial("within", "190 mL");
  const json f = finding(file);
  EXPECT_NEAR(f["values"]["recruitment_to_inflation"]["value"].get<double>(), -0.05, 1e-3);
  EXPECT_FALSE(f["flagged"]);
  EXPECT_NE(f["text"].get<std::string>().find("suggests low recruitability"), std::string::npos);
  const std::string t = unwrapped_report_text(file);
  EXPECT_NE(t.find("within the volume measurement error (32 mL): no recruitment detected"),
            std::string::npos)
      << t;
}

TEST(PeepRelease, AboveThePredictionIsReadByTheCutOff) {
  // 300 - 200 = +100 mL, R/I 0.5 at the 0.5 cut-off: high recruitability (Chen et al. 2020).
  const json f = finding(release_trial("above", "300 mL"));
  EXPECT_NEAR(f["values"]["recruitment_to_inflation"]["value"].get<double>(), 0.5, 1e-3);
  EXPECT_TRUE(f["flagged"]);
  EXPECT_NE(f["text"].get<std::string>().find("suggests high recruitability"), std::string::npos);
}

}  // namespace
}  // namespace bb::test
