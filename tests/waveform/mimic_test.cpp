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

}  // namespace
}  // namespace bb::wave
