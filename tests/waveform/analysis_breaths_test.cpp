// Breaths from airway pressure, flow or a respiration channel; the
// equation-of-motion fit (Bates, Lung Mechanics: An Inverse Modeling Approach,
// 2009) and the stress index (Ranieri et al., Anesthesiology 2000;93:1320).
#include <gtest/gtest.h>

#include <cmath>
#include <numbers>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/breaths.hpp"
#include "breathbeat/waveform/mechanics_fit.hpp"
#include "synthetic_signals.hpp"

namespace bb::wave {
namespace {

using test::make_synth;
using test::SynthSpec;

std::vector<Breath> run(const test::Synth& s, double fs, BreathSignal signal, bool pressure,
                        bool flow, const std::vector<double>& resp = {}) {
  BreathDetector d(breath_settings(Thresholds::built_in(), fs, signal, pressure, flow));
  std::vector<Breath> out;
  d.push(pressure ? std::span<const double>(s.paw) : std::span<const double>(),
         flow ? std::span<const double>(s.flow) : std::span<const double>(), resp, 0.0, out);
  d.finish(out);
  return out;
}

class BreathRates : public ::testing::TestWithParam<double> {};

TEST_P(BreathRates, PressureAndFlowGiveEveryBreathAndItsMechanics) {
  SynthSpec spec;
  spec.fs = GetParam();
  const test::Synth s = make_synth(spec);
  const std::vector<Breath> breaths = run(s, spec.fs, BreathSignal::airway_pressure, true, true);
  // Complete breaths: start to next start inside the record (synthetic truth).
  ASSERT_EQ(breaths.size(), s.breath_starts.size() - 1);
  const double ti = spec.ti_fraction * 60 / spec.rr;
  for (std::size_t j = 0; j < breaths.size(); ++j) {
    const Breath& b = breaths[j];
    ASSERT_FALSE(b.gap);
    // Within the 50 ms smoothing window (synthetic truth).
    EXPECT_NEAR(in_seconds(b.start), s.breath_starts[j], 0.025);
    EXPECT_NEAR(in_per_min(b.rate), spec.rr, 0.3);  // synthetic truth
    EXPECT_NEAR(in_seconds(b.ti), ti, 0.025);       // synthetic truth
    ASSERT_TRUE(b.vt && b.peep && b.ppeak && b.fit);
    EXPECT_NEAR(in_mL(*b.vt), 1000 * spec.vt_L, 0.02 * 1000 * spec.vt_L);  // synthetic truth
    // Ppeak = PEEPtot + R F + E VT at end-inspiration (synthetic truth).
    const double ppeak = s.p0[j] + spec.resistance * spec.vt_L / ti + spec.elastance * spec.vt_L;
    EXPECT_NEAR(in_cmH2O(*b.ppeak), ppeak, 0.02 * ppeak);
    EXPECT_NEAR(in_cmH2O(*b.peep), spec.peep,
                0.2);  // synthetic truth (expiration complete: tau 0.4 s)
    // Equation of motion, noiseless: R and E within 2 % (Bates 2009; synthetic truth).
    EXPECT_NEAR(in_cmH2O_per_L_per_s(b.fit->resistance), spec.resistance, 0.02 * spec.resistance);
    EXPECT_NEAR(in_cmH2O_per_L(b.fit->elastance), spec.elastance, 0.02 * spec.elastance);
    EXPECT_NEAR(in_cmH2O(b.fit->p0), s.p0[j], 0.1);  // synthetic truth: total PEEP
    EXPECT_GT(b.fit->r_squared, 0.999);
    // Linear single compartment under constant flow: stress index 1 (Ranieri 2000).
    ASSERT_TRUE(b.stress_index);
    EXPECT_NEAR(b.stress_index->b, 1.0, 0.02);
  }
}

INSTANTIATE_TEST_SUITE_P(Rates, BreathRates, ::testing::Values(100.0, 125.0, 250.0, 500.0));

TEST(Breaths, MeanAirwayPressureIsTheTimeAverageOverWholeBreaths) {
  SynthSpec spec;
  spec.fs = 125;
  const test::Synth s = make_synth(spec);
  const std::vector<Breath> breaths = run(s, spec.fs, BreathSignal::airway_pressure, true, false);
  ASSERT_GE(breaths.size(), 10u);
  for (const Breath& b : breaths) {
    const auto from = static_cast<std::size_t>(std::llround(in_seconds(b.start) * spec.fs));
    const auto n = static_cast<std::size_t>(std::llround(in_seconds(b.duration) * spec.fs));
    double sum = 0;
    for (std::size_t i = from; i < from + n; ++i) sum += s.paw[i];
    EXPECT_NEAR(in_cmH2O(*b.mean_airway_pressure), sum / n,
                1e-9);  // synthetic truth: the samples' mean
    // Marini & Ravenscraft, Crit Care Med 1992;20:1461: square-wave VC, between PEEP and Ppeak.
    EXPECT_GT(in_cmH2O(*b.mean_airway_pressure), spec.peep);
    EXPECT_LT(in_cmH2O(*b.mean_airway_pressure), in_cmH2O(*b.ppeak));
  }
}

TEST(Breaths, NoiseAndFlowDriftKeepCountsAndMechanics) {
  SynthSpec spec;
  spec.fs = 250;
  spec.noise_paw_cmH2O = 0.2;
  spec.flow_offset_L_s = 0.02;  // sensor offset: 20 mL/s
  const test::Synth s = make_synth(spec);
  const std::vector<Breath> breaths = run(s, spec.fs, BreathSignal::airway_pressure, true, true);
  ASSERT_EQ(breaths.size(), s.breath_starts.size() - 1);  // synthetic truth
  for (const Breath& b : breaths) {
    // Drift correction per breath removes the offset from VT (synthetic truth).
    EXPECT_NEAR(in_mL(*b.vt), 500, 15);
    EXPECT_NEAR(in_cmH2O_per_L(b.fit->elastance), spec.elastance, 0.05 * spec.elastance);
    EXPECT_NEAR(in_cmH2O_per_L_per_s(b.fit->resistance), spec.resistance, 0.05 * spec.resistance);
  }
}

TEST(Breaths, FlowAloneAndARespirationChannelCountTheSameBreaths) {
  SynthSpec spec;
  spec.fs = 125;
  const test::Synth s = make_synth(spec);
  const std::vector<Breath> by_flow = run(s, spec.fs, BreathSignal::flow, false, true);
  EXPECT_EQ(by_flow.size(), s.breath_starts.size() - 1);  // synthetic truth
  for (std::size_t j = 0; j < by_flow.size(); ++j) {
    EXPECT_NEAR(in_seconds(by_flow[j].start), s.breath_starts[j],
                0.025);  // within the 50 ms smoothing
  }
  // An impedance-like respiration signal: the lung volume plus a baseline.
  std::vector<double> resp(s.flow.size());
  double v = 0;
  for (std::size_t i = 0; i < resp.size(); ++i) {
    v += s.flow[i] / spec.fs;
    resp[i] = 1000 + 400 * v;
  }
  const std::vector<Breath> by_resp =
      run(s, spec.fs, BreathSignal::respiration, false, false, resp);
  EXPECT_EQ(by_resp.size(), s.breath_starts.size() - 1);  // synthetic truth
  for (const Breath& b : by_resp) EXPECT_NEAR(in_per_min(b.rate), spec.rr, 0.5);
}

TEST(Breaths, EffortShowsAsANegativeSwing) {
  SynthSpec spec;
  spec.fs = 125;
  spec.effort_cmH2O = 4;
  const test::Synth s = make_synth(spec);
  const std::vector<Breath> breaths = run(s, spec.fs, BreathSignal::airway_pressure, true, false);
  ASSERT_EQ(breaths.size(), s.breath_starts.size() - 1);
  int with_swing = 0;
  for (const Breath& b : breaths) with_swing += in_cmH2O(*b.negative_swing) > 2.0;
  EXPECT_GE(with_swing, static_cast<int>(breaths.size()) -
                            1);  // synthetic truth: every trigger has a 4 cmH2O dip
}

TEST(MechanicsFit, RecoversResistanceElastanceAndP0FromAnAnalyticBreath) {
  // Bates 2009 single compartment: R 12 cmH2O/L/s, E 30 cmH2O/L, P0 6 cmH2O (synthetic truth),
  // sinusoidal flow so that V' and V are not collinear.
  const double fs = 100, r = 12, e = 30, p0 = 6;
  std::vector<double> paw, flow, vol;
  for (int i = 0; i < 300; ++i) {
    const double t = i / fs;
    const double f = 0.5 * std::sin(2 * std::numbers::pi * t / 3.0);
    const double v =
        0.5 * 3.0 / (2 * std::numbers::pi) * (1 - std::cos(2 * std::numbers::pi * t / 3.0));
    flow.push_back(f);
    vol.push_back(v);
    paw.push_back(p0 + r * f + e * v);
  }
  const auto fit = fit_equation_of_motion(paw, flow, vol);
  ASSERT_TRUE(fit);
  EXPECT_NEAR(in_cmH2O_per_L_per_s(fit->resistance), r, 1e-9);
  EXPECT_NEAR(in_cmH2O_per_L(fit->elastance), e, 1e-9);
  EXPECT_NEAR(in_mL_per_cmH2O(fit->compliance), 1000.0 / e, 1e-6);  // C = 1/E (textbook)
  EXPECT_NEAR(in_cmH2O(fit->p0), p0, 1e-9);
  EXPECT_NEAR(fit->r_squared, 1.0, 1e-12);
  // No flow: the problem is degenerate and there is no fit.
  std::vector<double> zeros(50, 0.0), flat(50, 5.0);
  EXPECT_FALSE(fit_equation_of_motion(flat, zeros, zeros));
  // Volume proportional to flow: R and E cannot be told apart (collinear columns), no fit.
  std::vector<double> doubled(flow.size());
  for (std::size_t i = 0; i < flow.size(); ++i) doubled[i] = 2 * flow[i];
  EXPECT_FALSE(fit_equation_of_motion(paw, flow, doubled));
  // Unequal lengths and fewer than 5 samples: no fit.
  EXPECT_FALSE(fit_equation_of_motion(std::span(paw).first(4), std::span(flow).first(4),
                                      std::span(vol).first(4)));
  EXPECT_FALSE(fit_equation_of_motion(paw, std::span(flow).first(10), vol));
}

TEST(StressIndex, RecoversTheExponentOfAPowerCurve) {
  // P = c + a t^b (Ranieri et al., Anesthesiology 2000;93:1320); b, a, c synthetic truth.
  for (double b : {0.7, 1.0, 1.3}) {
    std::vector<double> t, p;
    for (int i = 1; i <= 100; ++i) {
      t.push_back(i / 100.0);
      p.push_back(10 + 12 * std::pow(i / 100.0, b));
    }
    const auto fit = fit_stress_index(t, p);
    ASSERT_TRUE(fit);
    EXPECT_NEAR(fit->b, b, 1e-4);
    EXPECT_NEAR(fit->a, 12, 1e-2);
    EXPECT_NEAR(in_cmH2O(fit->c), 10, 1e-2);
  }
}

TEST(StressIndex, SampleAtTimeZeroAndEdgesOfTheSearch) {
  // Inflation timed from its first sample (t = 0, where t^b = 0): same exponent (synthetic truth,
  // Ranieri 2000 model P = c + a t^b).
  std::vector<double> t, p;
  for (int i = 0; i <= 100; ++i) {
    t.push_back(i / 100.0);
    p.push_back(4 + 15 * std::pow(i / 100.0, 0.8));
  }
  auto fit = fit_stress_index(t, p);
  ASSERT_TRUE(fit);
  EXPECT_NEAR(fit->b, 0.8, 1e-4);
  EXPECT_NEAR(fit->r_squared, 1.0, 1e-9);
  // A curve steeper than the search allows ends on the upper edge (b = 5), never beyond.
  for (std::size_t i = 0; i < t.size(); ++i) p[i] = 4 + 15 * std::pow(t[i], 7.0);
  fit = fit_stress_index(t, p);
  ASSERT_TRUE(fit);
  EXPECT_DOUBLE_EQ(fit->b, 5.0);
  // Negative times, NaN pressures and too few samples give no fit.
  std::vector<double> negative = t;
  negative[3] = -0.01;
  EXPECT_FALSE(fit_stress_index(negative, p));
  std::vector<double> with_nan = p;
  with_nan[10] = std::nan("");
  EXPECT_FALSE(fit_stress_index(t, with_nan));
  EXPECT_FALSE(fit_stress_index(std::span(t).first(7), std::span(p).first(7)));
}

}  // namespace
}  // namespace bb::wave
