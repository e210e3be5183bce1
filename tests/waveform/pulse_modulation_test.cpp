// The respiratory modulation of pulse pressure (arterial pressure alone, issue 13
// item 6): the Lomb-Scargle periodogram peak (Lomb NR, Astrophys Space Sci
// 1976;39:447; Scargle JD, Astrophys J 1982;263:835) and PPV over whole cycles
// (Michard F et al., Am J Respir Crit Care Med 2000;162:134).
#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <vector>

#include "breathbeat/waveform/ppv_waveform.hpp"

namespace bb::wave {
namespace {

// Beats at a fixed heart rate whose pulse pressure is mean x (1 + depth sin(2 pi f t)).
std::vector<Beat> modulated(double hr_per_min, double rr_per_min, double mean, double depth,
                            double seconds_long) {
  std::vector<Beat> beats;
  const double interval = 60.0 / hr_per_min;
  for (double t = 0; t < seconds_long; t += interval) {
    Beat b;
    b.onset = seconds(t);
    const double pp = mean * (1 + depth * std::sin(2 * M_PI * rr_per_min / 60.0 * t));
    b.diastolic = mmHg(60);
    b.pulse_pressure = mmHg(pp);
    b.systolic = mmHg(60 + pp);
    beats.push_back(b);
  }
  return beats;
}

TEST(PulseModulation, FindsTheRateOfASinusoidalModulation) {
  // A pure modulation at 18/min sampled by beats at 90/min over 30 s: the periodogram
  // peaks at the modulation's frequency (Scargle 1982), resolution about 1/(8 x 30 s).
  const std::vector<Beat> beats = modulated(90, 18, 40, 0.075, 30);
  const auto m = find_pulse_modulation(beats, per_min(6), per_min(40), 12);
  ASSERT_TRUE(m);
  EXPECT_NEAR(in_per_min(m->rate), 18.0, 0.3);
  EXPECT_LT(m->false_alarm, 1e-6);  // a noiseless modulation stands far above noise
  EXPECT_EQ(m->beats, static_cast<int>(beats.size()));
}

TEST(PulseModulation, NoiseAloneHasNoSignificantPeak) {
  // White noise in the pulse pressure: the peak's false-alarm probability is not small
  // (under the null hypothesis it is uniform on [0, 1], Scargle 1982); this seed gives
  // a value above the 1 % level of waveform.modulation_false_alarm_max.
  std::vector<Beat> beats = modulated(90, 18, 40, 0, 30);
  std::mt19937 gen(7);
  std::normal_distribution<double> noise(0, 2);
  for (Beat& b : beats) b.pulse_pressure = mmHg(40 + noise(gen));
  const auto m = find_pulse_modulation(beats, per_min(6), per_min(40), 12);
  ASSERT_TRUE(m);
  EXPECT_GT(m->false_alarm, 0.01);
}

TEST(PulseModulation, TheBandStopsAtHalfTheBeatRate) {
  // Beats at 50/min sample the pulse pressure at 0.83 Hz: a modulation above 25/min
  // cannot be told from its alias (Nyquist), so a 30/min modulation is not reported as such.
  const std::vector<Beat> beats = modulated(50, 30, 40, 0.1, 60);
  const auto m = find_pulse_modulation(beats, per_min(6), per_min(40), 12);
  ASSERT_TRUE(m);
  EXPECT_LE(in_per_min(m->rate), 25.0 + 1e-9);
}

TEST(PulseModulation, TooFewBeatsOrNoVariationGiveNothing) {
  EXPECT_FALSE(find_pulse_modulation(modulated(90, 18, 40, 0.075, 5), per_min(6), per_min(40), 12));
  EXPECT_FALSE(find_pulse_modulation(modulated(90, 18, 40, 0, 30), per_min(6), per_min(40), 12));
}

TEST(CyclePpv, WholeCyclesOfThePeriodGiveMichardsPpv) {
  // depth 0.075: PPmax = 43, PPmin = 37 mmHg, PPV = 6/40 = 15 % (Michard 2000), sampled
  // by the beats of each cycle (at 90/min, 5 beats per 3.33 s cycle: within 1 point).
  const std::vector<Beat> beats = modulated(90, 18, 40, 0.075, 30);
  std::vector<BreathPpv> out;
  cycle_ppv(beats, seconds(0), seconds(30), seconds(60.0 / 18), 3, out);
  ASSERT_EQ(out.size(), 9u);  // 30 s / 3.33 s: 9 whole cycles, none partial
  for (const BreathPpv& p : out) {
    ASSERT_TRUE(p.ppv);
    EXPECT_NEAR(in_percent(*p.ppv), 15.0, 1.0);
    EXPECT_NEAR(p.beats, 5, 1);  // a beat on a cycle boundary falls on either side
  }
  // A rejected beat voids its cycle, as for a breath.
  std::vector<Beat> one_bad = beats;
  one_bad[2].verdict = BeatVerdict::ectopic;
  out.clear();
  cycle_ppv(one_bad, seconds(0), seconds(30), seconds(60.0 / 18), 3, out);
  EXPECT_FALSE(out[0].ppv);
  EXPECT_TRUE(out[1].ppv);
}

}  // namespace
}  // namespace bb::wave
