// A passive leg raise or an end-expiratory occlusion recorded at the bedside with `trial new` and
// `trial add-step --manoeuvre`, then reported: the manoeuvre step's own PPV is not the patient's
// state, in the heart-lung table as in the preload table, and the step it is read against says
// that it is its baseline while the reading stays at the manoeuvre step.
#include <gtest/gtest.h>

#include <string>
#include <vector>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

// The steps' common settings: VC, 420 mL, passive, chest closed (the conditions under which a
// PPV or a leg raise is read at all; common practice, no source).
std::vector<std::string> step_args(const std::string& file, const std::string& label,
                                   const std::string& time, const std::string& peep,
                                   const std::string& pplat, const std::string& co,
                                   const std::string& ppv) {
  return {"trial",     "add-step",
          file,        "--label",
          label,       "--time",
          time,        "--mode",
          "vc",        "--set-peep",
          peep,        "--vt",
          "420",       "--rr",
          "20",        "--fio2",
          "60%",       "--pplat",
          pplat,       "--hr",
          "110",       "--regular",
          "--map",     "65",
          "--co",      co,
          "--ppv",     ppv,
          "--passive", "--closed-chest",
          "--no-iah",  "--no-rv-failure"};
}

// Baseline at PEEP 10 (PPV 14 %, CO 5.0 L/min), a manoeuvre step (PPV 8 %, CO 5.8 L/min) and
// PEEP 14 (PPV 16 %, CO 4.7 L/min). Fixture values.
std::string record(const std::string& name, const std::string& manoeuvre) {
  const std::string file = temp_dir("manoeuvre_baseline_" + name) + "/t.toml";
  CliResult r = run_cli({"trial", "new", file, "--sex", "male", "--height", "175cm"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  r = run_cli(step_args(file, "PEEP 10", "10:00", "10", "24", "5.0", "14"));
  EXPECT_EQ(r.exit_code, 0) << r.err;
  std::vector<std::string> m = step_args(file, "Manoeuvre", "10:02", "10", "24", "5.8", "8");
  m.insert(m.end(), {"--manoeuvre", manoeuvre});
  if (manoeuvre == "eeo") m.insert(m.end(), {"--challenge-hold", "15s"});
  r = run_cli(m);
  EXPECT_EQ(r.exit_code, 0) << r.err;
  r = run_cli(step_args(file, "PEEP 14", "10:15", "14", "27", "4.7", "16"));
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return file;
}

json baseline_report_json(const std::string& file, const std::vector<std::string>& extra = {}) {
  std::vector<std::string> args = {"report", file, "--format", "json"};
  args.insert(args.end(), extra.begin(), extra.end());
  const CliResult r = run_cli(args);
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return parse_json(r);
}

const json& heart_lung_at(const json& j, const std::string& step) {
  for (const json& h : j["heart_lung"]) {
    if (h["step"] == step) return h;
  }
  static const json none;
  ADD_FAILURE() << "no heart-lung entry for " << step;
  return none;
}

// ---- finding 1: the heart-lung table does not read a PPV taken during a leg raise or an EEO ----

TEST(ManoeuvreBaseline, HeartLungTableDoesNotReadPpvOfALegRaiseOrAnOcclusion) {
  for (const std::string kind : {"plr", "eeo"}) {
    SCOPED_TRACE(kind);
    const std::string file = record(kind, kind);
    const json j = baseline_report_json(file);
    // The preload table leaves the manoeuvre step's own PPV out (docs/report.md) ...
    for (const json& idx : j["steps"][1]["preload"]["indices"])
      EXPECT_NE(idx["key"], "ppv_monitor") << idx.dump();
    // ... and the heart-lung table says it is not read, naming the step, instead of 8 - 14 = -6.
    const json& obs = heart_lung_at(j, "Manoeuvre")["observed"];
    ASSERT_TRUE(obs.contains("observed_ppv_change")) << obs.dump(1);
    EXPECT_EQ(obs["observed_ppv_change"]["text"], "not read");
    EXPECT_FALSE(obs["observed_ppv_change"].contains("value"));
    EXPECT_NE(obs["observed_ppv_change"]["note"].get<std::string>().find("'Manoeuvre'"),
              std::string::npos);
    // A setting step keeps its change: 16 - 14 = +2 percentage points (arithmetic on the
    // recorded values; a PPV difference in points: common practice, no source).
    const json& later = heart_lung_at(j, "PEEP 14")["observed"];
    EXPECT_NEAR(later["observed_ppv_change"]["value"].get<double>(), 2.0, 1e-9);
    // Cardiac output is what a leg raise is judged by (Monnet et al., Crit Care Med
    // 2006;34:1402): (5.8 - 5.0) / 5.0 = +16 %, by hand.
    EXPECT_NEAR(obs["observed_co_change"]["value"].get<double>(), 16.0, 1e-6);
  }
}

TEST(ManoeuvreBaseline, ReferenceAtALegRaiseReadsNoPpvChangeAnywhere) {
  const std::string file = record("ref", "plr");
  const json j = baseline_report_json(file, {"--reference", "Manoeuvre"});
  for (const std::string step : {"PEEP 10", "PEEP 14"}) {
    const json& obs = heart_lung_at(j, step)["observed"];
    ASSERT_TRUE(obs.contains("observed_ppv_change")) << step << obs.dump(1);
    EXPECT_EQ(obs["observed_ppv_change"]["text"], "not read") << step;
  }
}

TEST(ManoeuvreBaseline, TextTableMarksThePpvChangeNotRead) {
  const std::string text = unwrapped_report_text(record("text", "plr"));
  EXPECT_NE(text.find("Observed change in PPV [points] - not read"), std::string::npos) << text;
  EXPECT_NE(text.find("PPV at 'Manoeuvre' was measured during a passive leg raise"),
            std::string::npos)
      << text;
}

// ---- finding 4: the baseline step says it is the baseline of the manoeuvre -------------------

// With its own PPV, the baseline keeps its own statement and adds the pointer.
TEST(ManoeuvreBaseline, BaselineWithItsOwnIndexPointsToTheManoeuvreStep) {
  const std::string file = record("own", "plr");
  const json j = baseline_report_json(file);
  const json& base = j["steps"][0];
  EXPECT_EQ(base["settings"]["manoeuvre_baseline"]["text"], "plr");
  EXPECT_NE(base["settings"]["manoeuvre_baseline"]["note"].get<std::string>().find(
                "read at step 'Manoeuvre'"),
            std::string::npos);
  // PPV 14 % above 13 %: its own reading stays (Michard et al., Am J Respir Crit Care Med
  // 2000;162:134; Cannesson et al., Anesthesiology 2011;115:231).
  EXPECT_EQ(base["preload"]["statement"]["category"], "likely_responsive");
  const std::string text = base["preload"]["statement"]["text"];
  EXPECT_NE(text.find("also the baseline of the passive leg raising read at step 'Manoeuvre'"),
            std::string::npos)
      << text;
  // The reading itself stays at the manoeuvre step: (5.8 - 5.0) / 5.0 = 16 % >= 10 %
  // (Monnet et al., Crit Care Med 2006;34:1402).
  bool at_manoeuvre = false;
  for (const json& idx : j["steps"][1]["preload"]["indices"]) {
    if (idx["key"] == "plr_steps") at_manoeuvre = idx["reading"]["category"] == "responsive";
  }
  EXPECT_TRUE(at_manoeuvre) << j["steps"][1]["preload"].dump(1);
  for (const json& idx : base["preload"]["indices"]) EXPECT_NE(idx["key"], "plr_steps");
}

// Without an index of its own (LVOT VTI only), the baseline's statement is the pointer and the
// summary says "baseline", not "n/a".
TEST(ManoeuvreBaseline, BaselineWithoutAnIndexSaysBaselineNotNotAssessable) {
  const std::string file = temp_dir("manoeuvre_baseline_vti") + "/t.toml";
  ASSERT_EQ(run_cli({"trial", "new", file, "--sex", "female", "--height", "165"}).exit_code, 0);
  ASSERT_EQ(run_cli({"trial", "add-step", file, "--label", "Baseline", "--time", "10:00",
                     "--passive", "--no-iah", "--vti", "16cm"})
                .exit_code,
            0);
  ASSERT_EQ(run_cli({"trial", "add-step", file, "--label", "Leg raise", "--time", "10:02",
                     "--manoeuvre", "plr", "--no-iah", "--vti", "18.2cm"})
                .exit_code,
            0);
  const json j = baseline_report_json(file);
  const std::string text = j["steps"][0]["preload"]["statement"]["text"];
  EXPECT_EQ(text.rfind("Baseline of the passive leg raising read at step 'Leg raise'", 0), 0u)
      << text;
  EXPECT_EQ(j["steps"][0]["preload"]["statement"]["category"], "not_assessable");
  // VTI (18.2 - 16) / 16 = +13.75 % >= 10 %: responsive at the leg-raise step (Monnet et al.,
  // Crit Care Med 2006;34:1402).
  EXPECT_EQ(j["steps"][1]["preload"]["statement"]["category"], "likely_responsive");

  const std::string t = unwrapped_report_text(file);
  EXPECT_NE(t.find("Preload statement baseline likely"), std::string::npos) << t;
  EXPECT_NE(t.find("Passive leg raising (with the step before) baseline yes"), std::string::npos)
      << t;
  EXPECT_EQ(t.find("Baseline: Not assessable"), std::string::npos) << t;
}

}  // namespace
}  // namespace bb::test
