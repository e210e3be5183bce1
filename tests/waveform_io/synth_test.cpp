// Synthetic records: the samples against their own known truth (synthetic
// truth), and the PPV definition of Michard F et al. Am J Respir Crit Care Med
// 2000;162:134-138: PPV = (PPmax - PPmin) / ((PPmax + PPmin) / 2).
#include <gtest/gtest.h>

#include <cmath>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/synth.hpp"

namespace bb::wave {
namespace {

std::vector<std::vector<double>> read_all_synth(SignalSource& src, double seconds) {
  std::vector<std::vector<double>> all(src.channels().size());
  Chunk chunk;
  while (src.next(chunk, seconds)) {
    for (std::size_t c = 0; c < all.size(); ++c) {
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    }
  }
  return all;
}

SynthParams clean(double fs) {
  SynthParams p;
  p.duration = seconds(120);
  p.fs = fs;
  p.volume_channel = true;
  p.keep_truth = true;
  return p;
}

// Per-breath PPV measured on the samples: pulse pressure of each normal beat
// is the largest minus the smallest sample between its onset and the next.
void expect_ppv_per_breath(const SynthParams& p, double tolerance) {
  SyntheticRecord rec(p);
  const auto all = read_all_synth(rec, 7.0);
  const auto& beats = rec.truth().beats;
  const auto& breaths = rec.truth().breaths;
  ASSERT_GT(breaths.size(), 10u);
  std::vector<double> lo(breaths.size(), 1e9), hi(breaths.size(), -1e9);
  for (std::size_t b = 0; b + 1 < beats.size(); ++b) {
    if (beats[b].ectopic) continue;
    const auto first = static_cast<std::size_t>(std::ceil(beats[b].onset * p.fs - 1e-9));
    const auto last = static_cast<std::size_t>(std::ceil(beats[b + 1].onset * p.fs - 1e-9));
    if (last > all[0].size()) break;
    double mx = -1e9, mn = 1e9;
    for (std::size_t i = first; i < last; ++i) {
      mx = std::max(mx, all[0][i]);
      mn = std::min(mn, all[0][i]);
    }
    const auto k = static_cast<std::size_t>(beats[b].breath);
    if (k >= breaths.size()) continue;
    lo[k] = std::min(lo[k], mx - mn);
    hi[k] = std::max(hi[k], mx - mn);
  }
  int checked = 0;
  for (std::size_t k = 0; k + 1 < breaths.size(); ++k) {
    if (!breaths[k].ppv_defined) continue;
    const double ppv = (hi[k] - lo[k]) / ((hi[k] + lo[k]) / 2.0);  // Michard et al. 2000
    EXPECT_NEAR(ppv * 100.0, in_percent(p.ppv), tolerance) << "breath " << k;  // synthetic truth
    ++checked;
  }
  EXPECT_GT(checked, 10);
}

TEST(Synth, PpvPerBreathIsExactOnCleanSignalsAtEveryRate) {
  for (double fs : {100.0, 125.0, 250.0, 500.0}) {
    SCOPED_TRACE(fs);
    SynthParams p = clean(fs);
    p.ppv = percent(15);
    expect_ppv_per_breath(p, 1e-9);  // synthetic truth: exact by construction
    p.ppv = percent(7);
    p.heart_rate = per_min(71);  // beats not locked to breaths
    p.respiratory_rate = per_min(13);
    expect_ppv_per_breath(p, 1e-9);  // synthetic truth
  }
}

TEST(Synth, ChannelsLengthAndBeatCount) {
  SynthParams p = clean(125);
  SyntheticRecord rec(p);
  ASSERT_EQ(rec.channels().size(), 4u);
  EXPECT_EQ(rec.channels()[0].unit, "mmHg");
  EXPECT_EQ(rec.channels()[1].role, Role::airway_pressure);
  EXPECT_EQ(rec.channels()[2].unit, "L/min");
  EXPECT_EQ(rec.channels()[3].unit, "mL");
  const auto all = read_all_synth(rec, 3.3);
  EXPECT_EQ(all[0].size(), 15000u);  // 120 s x 125 Hz (synthetic truth)
  // 90 /min for 120 s, first onset a quarter interval in (synthetic truth)
  EXPECT_EQ(rec.truth().beats.size(), 180u);
  EXPECT_EQ(rec.truth().breaths.size(), 36u);  // 18 /min for 120 s (synthetic truth)
}

TEST(Synth, EquationOfMotionHoldsAtEverySample) {
  SynthParams p = clean(250);
  p.resistance = cmH2O_per_L_per_s(12);
  p.elastance = cmH2O_per_L(30);
  p.peep = cmH2O(8);
  SyntheticRecord rec(p);
  const auto all = read_all_synth(rec, 10.0);
  for (std::size_t i = 0; i < all[1].size(); ++i) {
    // Paw = R V' + E V + PEEP (synthetic truth), flow in L/min, volume in mL
    const double model = 12.0 * all[2][i] / 60.0 + 30.0 * all[3][i] / 1000.0 + 8.0;
    ASSERT_NEAR(all[1][i], model, 1e-9) << i;
  }
}

TEST(Synth, InspiredVolumePerBreathIsTheTidalVolume) {
  SynthParams p = clean(500);
  SyntheticRecord rec(p);
  const auto all = read_all_synth(rec, 10.0);
  const double ti = 60.0 / 18.0 / 3.0;
  const auto per_breath = static_cast<std::size_t>(std::llround(60.0 / 18.0 * 500));
  // Inspiratory flow integrated over the first breath: VT (synthetic truth),
  // within one sample of flow (the rectangle rule at 500 Hz).
  double volume = 0.0;
  for (std::size_t i = 0; i < per_breath; ++i) {
    if (all[2][i] > 0) volume += all[2][i] / 60.0 / 500.0;
  }
  EXPECT_NEAR(volume * 1000.0, 450.0, 0.45 / ti * 1000.0 / 500.0 + 1e-9);
  EXPECT_NEAR(in_mL(rec.truth().breaths[3].tidal_volume), 450.0, 1e-9);  // synthetic truth
}

TEST(Synth, ChunkingAndSeekingDoNotChangeTheSamples) {
  SynthParams p = clean(125);
  p.noise = fraction(0.05);
  p.drift = mmHg(5);
  p.ectopy = fraction(0.1);
  SyntheticRecord a(p), b(p);
  const auto x = read_all_synth(a, 0.37);
  const auto y = read_all_synth(b, 60.0);
  for (std::size_t c = 0; c < x.size(); ++c) EXPECT_EQ(x[c], y[c]);
  SyntheticRecord s(p);
  s.seek(50.0);
  Chunk chunk;
  ASSERT_TRUE(s.next(chunk, 2.0));
  EXPECT_DOUBLE_EQ(chunk.start_time, 50.0);
  for (std::size_t i = 0; i < chunk.samples[0].size(); ++i) {
    ASSERT_EQ(chunk.samples[0][i], x[0][6250 + i]);
  }
}

TEST(Synth, EctopicBeatsAndGapsAreWhereTheTruthSays) {
  SynthParams p = clean(125);
  p.duration = minutes(10);
  p.ectopy = fraction(0.1);
  p.gaps = 3;
  SyntheticRecord rec(p);
  const auto all = read_all_synth(rec, 10.0);
  int ectopic = 0;
  for (const auto& b : rec.truth().beats) {
    if (!b.ectopic) continue;
    ++ectopic;
    EXPECT_NEAR(in_mmHg(b.pulse_pressure), 20.0, 1e-9);  // 0.5 x PP0 (synthetic truth)
  }
  // About 10 % of some 850 beats (synthetic truth); a binomial spread of
  // +/- 4 SD (common practice, no source).
  EXPECT_GT(ectopic, 85 - 4 * 9);
  EXPECT_LT(ectopic, 85 + 4 * 9);
  ASSERT_EQ(rec.truth().gaps.size(), 3u);
  for (std::size_t i = 0; i < all[0].size(); ++i) {
    const double t = static_cast<double>(i) / 125.0;
    bool in_gap = false;
    for (const auto& g : rec.truth().gaps) in_gap = in_gap || (t >= g.first && t < g.second);
    ASSERT_EQ(std::isnan(all[0][i]), in_gap) << t;  // synthetic truth
    ASSERT_FALSE(std::isnan(all[1][i]));
  }
}

TEST(Synth, RefusesParametersOutsideItsRange) {
  SynthParams p;
  p.ppv = percent(90);
  EXPECT_THROW(SyntheticRecord{p}, InputError);
  p = SynthParams{};
  p.heart_rate = per_min(0);
  EXPECT_THROW(SyntheticRecord{p}, InputError);
  p = SynthParams{};
  p.fs = 1.0;
  EXPECT_THROW(SyntheticRecord{p}, InputError);
}

}  // namespace
}  // namespace bb::wave
