// The waveform engine on a real bedside recording: MIMIC Database record
// 03700181 (Moody GB, Mark RG, Computers in Cardiology 1996;23:657; Goldberger
// AL et al., Circulation 2000;101:e215), read in place from ../shared/data.
// Expected values: the data README (heart rate near 120/min, regular
// respiration near 20/min, respiration-modulated pulse pressure) and
// consistency between independent channels.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/pipeline.hpp"
#include "breathbeat/waveform/source.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

std::filesystem::path record() {
  return std::filesystem::path(test::shared_data_dir()) / "mimicdb" / "03700181.hea";
}

// Dominant period (in samples) of x by autocorrelation over lags [lo, hi].
int dominant_lag(const std::vector<double>& x, int lo, int hi) {
  double mean = 0;
  for (double v : x) mean += v;
  mean /= static_cast<double>(x.size());
  int best = lo;
  double best_r = -1e300;
  for (int lag = lo; lag <= hi; ++lag) {
    double r = 0;
    for (std::size_t i = static_cast<std::size_t>(lag); i < x.size(); ++i)
      r += (x[i] - mean) * (x[i - lag] - mean);
    r /= static_cast<double>(x.size() - lag);
    if (r > best_r) {
      best_r = r;
      best = lag;
    }
  }
  return best;
}

TEST(Mimic03700181, BeatsBreathsAndPpvAreConsistentAcrossChannels) {
  if (!std::filesystem::exists(record())) {
    GTEST_SKIP() << "MIMIC record 03700181 not found at " << record() << " (shared data absent)";
  }
  std::unique_ptr<SignalSource> source = open_record(record());
  const Thresholds t = Thresholds::built_in();
  std::vector<double> pulse_pressures;
  PipelineOptions o;
  o.on_beat = [&](const Beat& b) {
    if (b.verdict == BeatVerdict::accepted) pulse_pressures.push_back(in_mmHg(b.pulse_pressure));
  };
  std::vector<WindowResult> windows;
  o.on_window = [&](const WindowResult& w) { windows.push_back(w); };
  const RecordSummary s = analyse_record(*source, o, t);

  EXPECT_NEAR(in_seconds(s.duration), 600, 0.1);  // 75000 frames at 125 Hz (record header)
  EXPECT_EQ(s.breath_signal, BreathSignal::respiration);
  ASSERT_TRUE(s.heart_rate && s.respiratory_rate);
  // Heart rate near 120/min (data README); beat count = HR x duration within 3 %.
  EXPECT_NEAR(in_per_min(*s.heart_rate), 120, 12);
  EXPECT_NEAR(static_cast<double>(s.beats.total()), in_per_min(*s.heart_rate) * 10,
              0.03 * s.beats.total());
  EXPECT_LT(s.beats.rejected(), s.beats.total() / 10);  // a clean arterial trace (data README)
  // Respiratory rate near 20/min (data README); breaths = RR x duration within 5 %.
  EXPECT_NEAR(in_per_min(*s.respiratory_rate), 20, 3);
  EXPECT_NEAR(static_cast<double>(s.breaths), in_per_min(*s.respiratory_rate) * 10,
              0.05 * s.breaths);

  // Independent heart rate: the ECG's dominant period by autocorrelation (no beat detector).
  std::unique_ptr<SignalSource> again = open_record(record());
  int ecg = -1;
  for (std::size_t i = 0; i < again->channels().size(); ++i) {
    if (again->channels()[i].role == Role::ecg) ecg = static_cast<int>(i);
  }
  ASSERT_GE(ecg, 0);
  const double ecg_fs = again->channels()[static_cast<std::size_t>(ecg)].fs;
  Chunk chunk;
  std::vector<double> ecg_samples;
  while (again->next(chunk, 10.0) && ecg_samples.size() < static_cast<std::size_t>(60 * ecg_fs)) {
    for (double v : chunk.samples[static_cast<std::size_t>(ecg)])
      ecg_samples.push_back(std::isnan(v) ? 0 : v);
  }
  const int lag =
      dominant_lag(ecg_samples, static_cast<int>(0.3 * ecg_fs), static_cast<int>(1.5 * ecg_fs));
  const double ecg_hr = 60.0 * ecg_fs / lag;
  EXPECT_NEAR(in_per_min(*s.heart_rate), ecg_hr, 0.05 * ecg_hr);

  // Independent respiratory rate: the period of the pulse-pressure modulation, in beats.
  ASSERT_GT(pulse_pressures.size(), 200u);
  const int beats_per_breath = dominant_lag(pulse_pressures, 3, 12);
  const double rr_from_ppv = in_per_min(*s.heart_rate) / beats_per_breath;
  EXPECT_NEAR(in_per_min(*s.respiratory_rate), rr_from_ppv, 0.15 * rr_from_ppv);

  // PPV computed with its gates: a value, a trend, and HR/RR ~ 6 > 3.6 (De Backer 2009).
  ASSERT_TRUE(s.ppv);
  EXPECT_GT(in_percent(s.ppv->median), 0);
  EXPECT_LE(in_percent(s.ppv->p10), in_percent(s.ppv->median));
  EXPECT_EQ(windows.size(), 20u);  // 600 s / 30 s
  bool hr_rr_gate = false;
  for (const Gate& g : s.gates) {
    if (g.key == "hr_rr_ratio") hr_rr_gate = g.state == GateState::met;
  }
  EXPECT_TRUE(hr_rr_gate);
  ASSERT_TRUE(s.reading);
}

// Arterial pressure alone (issue 13 item 6): the record's ABP channel written to
// a CSV without its RESP channel. The respiratory rate found in the pulse-pressure
// modulation (Lomb-Scargle periodogram) must agree with the breaths the RESP
// channel marks, and the PPV over its cycles with the PPV over those breaths:
// two independent ways to the same respiratory cycle on one real record.
TEST(Mimic03700181, ArterialPressureAloneAgreesWithTheRespirationChannel) {
  if (!std::filesystem::exists(record())) {
    GTEST_SKIP() << "MIMIC record 03700181 not found at " << record() << " (shared data absent)";
  }
  const std::filesystem::path dir = test::temp_dir("mimic_abp_alone");
  const std::filesystem::path abp = dir / "abp.csv";
  const auto cut = test::run_cli({"wave", "convert", record().string(), "-o", abp.string(),
                                  "--format", "csv", "--channels", "ABP"});
  ASSERT_EQ(cut.exit_code, 0) << cut.err;
  const auto full = test::run_cli({"wave", record().string(), "--format", "json"});
  const auto alone = test::run_cli({"wave", abp.string(), "--format", "json"});
  ASSERT_EQ(full.exit_code, 0) << full.err;
  ASSERT_EQ(alone.exit_code, 0) << alone.err;
  const nlohmann::json f = test::parse_json(full), a = test::parse_json(alone);
  EXPECT_EQ(f["cycles"], "breaths");
  EXPECT_EQ(a["cycles"], "pulse_modulation");
  // The same beats: the same heart rate.
  EXPECT_NEAR(a["heart_rate"]["value"].get<double>(), f["heart_rate"]["value"].get<double>(), 0.5);
  // Respiration regular near 20/min (data README); the modulation's rate within 10 % of
  // the RESP channel's.
  const double rr_resp = f["respiratory_rate"]["value"].get<double>();
  EXPECT_NEAR(a["respiratory_rate"]["value"].get<double>(), rr_resp, 0.1 * rr_resp);
  // Window by window, where both found a rate, within 15 % (the RESP channel's timing
  // changes in some windows).
  ASSERT_EQ(a["windows"].size(), f["windows"].size());
  int compared = 0;
  for (std::size_t i = 0; i < a["windows"].size(); ++i) {
    const auto& wa = a["windows"][i];
    const auto& wf = f["windows"][i];
    if (!wa["respiratory_rate"].is_object() || !wf["respiratory_rate"].is_object()) continue;
    const double r = wf["respiratory_rate"]["value"].get<double>();
    EXPECT_NEAR(wa["respiratory_rate"]["value"].get<double>(), r, 0.15 * r) << "window " << i;
    ++compared;
  }
  EXPECT_GE(compared, 15);  // of 20: a clearly respiration-modulated pulse pressure (README)
  // PPV over the modulation's cycles within 3 points of PPV over the RESP breaths.
  ASSERT_TRUE(a["ppv"].is_object() && f["ppv"].is_object());
  EXPECT_NEAR(a["ppv"]["value"].get<double>(), f["ppv"]["value"].get<double>(), 3.0);
  // Arterial pressure cannot show breathing effort: unknown, said first in the reading.
  for (const auto& g : a["gates"]) {
    if (g["key"] == "passive_ventilation") EXPECT_EQ(g["state"], "unknown");
  }
  ASSERT_TRUE(a["reading"].is_object());
  EXPECT_TRUE(a["reading"]["conditional"].get<bool>());
}

}  // namespace
}  // namespace bb::wave
