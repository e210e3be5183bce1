// A trial step that names a recorded waveform: PPV and heart rate come from the
// signals, marked as such.
#include "breathbeat/trial/waveform_step.hpp"
#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "breathbeat/waveform/synth.hpp"
#include "breathbeat/waveform/writers.hpp"

#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "cli_runner.hpp"

namespace bb {
namespace {

const char* kTrial = R"([patient]
sex = "male"
height = "178 cm"

[[step]]
label = "PEEP 8"
[step.ventilator]
set_peep = "8"
vt = "600 mL"
rr = "16"
[step.waveform]
file = "rec.wfdb.hea"
start = "20 s"
end = "140 s"
)";

struct TrialWithRecord : ::testing::Test {
  std::string dir = test::temp_dir("trial_wave");
  void SetUp() override {
    wave::SynthParams p;
    p.duration = minutes(3);
    p.heart_rate = per_min(96);
    p.respiratory_rate = per_min(16);
    p.ppv = percent(14);
    wave::SyntheticRecord record(p);
    wave::write_record(record, dir + "/rec.wfdb.hea", wave::RecordFormat::wfdb);
    std::ofstream(dir + "/trial.toml") << kTrial;
  }
  void TearDown() override { std::filesystem::remove_all(dir); }
};

TEST_F(TrialWithRecord, PpvAndHeartRateComeFromTheSignals) {
  LoadedTrial loaded = load_trial_file(dir + "/trial.toml", {});
  apply_step_waveforms(loaded.trial, loaded.limits);
  const TrialCirculation& c = loaded.trial.steps[0].circulation;
  ASSERT_TRUE(c.ppv_monitor);
  // Synthetic truth: the record was made with PPV 14 % (within 1 point, issue 5 criterion).
  EXPECT_NEAR(in_percent(*c.ppv_monitor), 14.0, 1.0);
  ASSERT_TRUE(c.hr);
  EXPECT_NEAR(in_per_min(*c.hr), 96.0, 1.0);  // synthetic truth
  ASSERT_TRUE(c.signals_origin);
  EXPECT_NE(c.signals_origin->find("rec.wfdb.hea"), std::string::npos);
  EXPECT_TRUE(loaded.trial.steps[0].waveform->analysed);
}

TEST_F(TrialWithRecord, ArterialPressureAloneTakesPpvOverCyclesOfTheSetRate) {
  // The same record with its airway pressure and flow dropped (wave convert --channels ABP):
  // once refused, now its PPV comes over whole cycles of the step's set rate (16/min).
  const auto cut = test::run_cli({"wave", "convert", dir + "/rec.wfdb.hea", "-o", dir + "/abp.csv",
                                  "--format", "csv", "--channels", "ABP"});
  ASSERT_EQ(cut.exit_code, 0) << cut.err;
  std::string trial = kTrial;
  trial.replace(trial.find("rec.wfdb.hea"), std::string("rec.wfdb.hea").size(), "abp.csv");
  std::ofstream(dir + "/trial.toml") << trial;
  LoadedTrial loaded = load_trial_file(dir + "/trial.toml", {});
  apply_step_waveforms(loaded.trial, loaded.limits);
  const TrialCirculation& c = loaded.trial.steps[0].circulation;
  ASSERT_TRUE(c.ppv_monitor);
  EXPECT_NEAR(in_percent(*c.ppv_monitor), 14.0, 1.0);  // synthetic truth, within 1 point
  ASSERT_TRUE(c.hr);
  EXPECT_NEAR(in_per_min(*c.hr), 96.0, 1.0);  // synthetic truth
  ASSERT_TRUE(c.signals_origin);
  EXPECT_NE(c.signals_origin->find("cycles of the set rate"), std::string::npos)
      << *c.signals_origin;
  // Without breaths the signals cannot speak to effort: the step states none, so it stays open.
  EXPECT_FALSE(c.passive_from_signals);
}

TEST_F(TrialWithRecord, SignalsLeaveRhythmAndEffortNotContradictedNotMet) {
  // The synthetic record has regular beats and passive breaths (synthetic truth): the signals do
  // not contradict "regular rhythm" and "no breathing effort", but cannot prove them
  // (common practice, no source), so the PPV reading stays conditional on both.
  LoadedTrial loaded = load_trial_file(dir + "/trial.toml", {});
  apply_step_waveforms(loaded.trial, loaded.limits);
  const TrialAnalysis a = analyse_trial(loaded.trial, loaded.limits, std::nullopt);
  ASSERT_EQ(a.steps.size(), 1u);
  const PreloadIndexReading* ppv = nullptr;
  for (const auto& i : a.steps[0].preload) {
    if (i.key == "ppv_signals") ppv = &i;
  }
  ASSERT_NE(ppv, nullptr);
  for (const Gate& g : ppv->gates) {
    if (g.key == "regular_rhythm" || g.key == "passive_ventilation")
      EXPECT_EQ(g.state, GateState::not_contradicted) << g.key;
  }
  EXPECT_TRUE(ppv->conditional);
  // In the presenter's words (src/present/gate_words.cpp).
  EXPECT_NE(reading_text(ppv->reading).find("which the signals do not contradict but cannot prove"),
            std::string::npos)
      << reading_text(ppv->reading);
  // The report's circulation rows say where the facts came from.
  const std::string text = report_text(a);
  EXPECT_NE(text.find("regular by the signals (not proven)"), std::string::npos);
  // Recorded in the file, the same facts are met.
  std::ofstream(dir + "/trial.toml")
      << kTrial << "[step.circulation]\nrhythm_regular = true\nspontaneous_effort = false\n";
  LoadedTrial stated = load_trial_file(dir + "/trial.toml", {});
  apply_step_waveforms(stated.trial, stated.limits);
  const TrialAnalysis b = analyse_trial(stated.trial, stated.limits, std::nullopt);
  for (const auto& i : b.steps[0].preload) {
    for (const Gate& g : i.gates) {
      if (g.key == "regular_rhythm" || g.key == "passive_ventilation")
        EXPECT_EQ(g.state, GateState::met) << g.key;
    }
  }
}

TEST_F(TrialWithRecord, MonitorValuesInTheFileWin) {
  std::string text = kTrial;
  text.insert(text.find("[step.waveform]"), "[step.circulation]\nppv = \"9%\"\nhr = \"80\"\n");
  std::ofstream(dir + "/trial.toml") << text;
  LoadedTrial loaded = load_trial_file(dir + "/trial.toml", {});
  apply_step_waveforms(loaded.trial, loaded.limits);
  const TrialCirculation& c = loaded.trial.steps[0].circulation;
  EXPECT_NEAR(in_percent(*c.ppv_monitor), 9.0, 1e-9);  // as written in the file (identity)
  EXPECT_NEAR(in_per_min(*c.hr), 80.0, 1e-9);          // as written in the file (identity)
  EXPECT_FALSE(c.signals_origin);
}

TEST_F(TrialWithRecord, MissingRecordIsALocatedError) {
  std::string text = kTrial;
  text.replace(text.find("rec.wfdb.hea"), 12, "missing.hea");
  std::ofstream(dir + "/trial.toml") << text;
  LoadedTrial loaded = load_trial_file(dir + "/trial.toml", {});
  try {
    apply_step_waveforms(loaded.trial, loaded.limits);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("trial.toml:"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("missing.hea"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace bb
