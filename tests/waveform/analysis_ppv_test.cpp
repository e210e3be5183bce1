// PPV from the signals, end to end through the streaming pipeline, on
// synthetic records with known truth; gates from the signals (De Backer et
// al., Anesthesiology 2009;110:1092 for HR/RR).
#include <gtest/gtest.h>

#include "breathbeat/errors.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/pipeline.hpp"
#include "synthetic_signals.hpp"

namespace bb::wave {
namespace {

using test::make_synth;
using test::SynthSpec;

const Gate& gate(const std::vector<Gate>& gates, const std::string& key) {
  for (const Gate& g : gates) {
    if (g.key == key) return g;
  }
  throw std::runtime_error("no gate " + key);
}

struct PipelineRun {
  RecordSummary summary;
  std::vector<WindowResult> windows;
  std::vector<BreathPpv> per_breath;
};

PipelineRun analyse(const test::Synth& s, double fs, PipelineOptions o = {},
                    bool one_thread = false) {
  test::VectorSource source = test::source_of(s, fs);
  source.one_thread = one_thread;
  PipelineRun r;
  o.on_window = [&](const WindowResult& w) { r.windows.push_back(w); };
  o.on_breath = [&](const Breath&, const BreathPpv& p) { r.per_breath.push_back(p); };
  const Thresholds t = Thresholds::built_in();
  r.summary = analyse_record(source, o, t);
  return r;
}

struct Case {
  double fs, hr, rr, ppv;
};

class PpvRates : public ::testing::TestWithParam<Case> {};

TEST_P(PpvRates, MedianPpvWithinOnePointOfTheTruthUnderNoiseAndDrift) {
  const Case c = GetParam();
  SynthSpec spec;
  spec.fs = c.fs;
  spec.hr = c.hr;
  spec.rr = c.rr;
  spec.ppv = c.ppv;
  spec.duration_s = 180;
  spec.noise_abp_mmHg = 0.5;
  spec.drift_abp_mmHg = 4;
  spec.noise_paw_cmH2O = 0.2;
  spec.flow_offset_L_s = 0.01;
  const test::Synth s = make_synth(spec);
  const PipelineRun r = analyse(s, c.fs);
  const double truth =
      test::median(test::true_breath_ppv(s));  // synthetic truth (Michard 2000 formula)
  ASSERT_TRUE(r.summary.ppv);
  EXPECT_NEAR(in_percent(r.summary.ppv->median), 100 * truth, 1.0);
  EXPECT_EQ(r.summary.beats.total(),
            static_cast<std::int64_t>(s.beats.size()) - 1);  // synthetic truth
  EXPECT_EQ(r.summary.breaths, static_cast<std::int64_t>(s.breath_starts.size()) - 1);
  EXPECT_NEAR(in_per_min(*r.summary.heart_rate), c.hr, 0.5);        // synthetic truth
  EXPECT_NEAR(in_per_min(*r.summary.respiratory_rate), c.rr, 0.2);  // synthetic truth
  // Windows of 30 s: 180 s -> 6, each with its own PPV near the truth.
  ASSERT_EQ(r.windows.size(), 6u);
  for (const WindowResult& w : r.windows) {
    ASSERT_TRUE(w.ppv);
    EXPECT_NEAR(in_percent(w.ppv->median), 100 * truth, 1.5);
    EXPECT_LE(in_percent(w.ppv->p10), in_percent(w.ppv->median));
    EXPECT_GE(in_percent(w.ppv->p90), in_percent(w.ppv->median));
  }
  // Regular beats and passive breaths (synthetic truth): the signals do not contradict these
  // conditions but cannot prove them (common practice, no source).
  EXPECT_EQ(gate(r.summary.gates, "regular_rhythm").state, GateState::not_contradicted);
  EXPECT_EQ(gate(r.summary.gates, "passive_ventilation").state, GateState::not_contradicted);
  EXPECT_EQ(gate(r.summary.gates, "hr_rr_ratio").state,
            GateState::met);  // 5 > 3.6 (De Backer 2009)
  ASSERT_TRUE(r.summary.mean_airway_pressure);
  ASSERT_TRUE(r.summary.elastance);
  EXPECT_NEAR(in_cmH2O_per_L(*r.summary.elastance), spec.elastance,
              0.05 * spec.elastance);  // synthetic truth
}

INSTANTIATE_TEST_SUITE_P(Rates, PpvRates,
                         ::testing::Values(Case{100, 90, 18, 0.15}, Case{125, 120, 20, 0.10},
                                           Case{250, 75, 15, 0.20}, Case{500, 90, 18, 0.05}));

TEST(PpvPipeline, EctopicBeatsAreLeftOutAndTheRhythmGateCounts) {
  SynthSpec spec;
  spec.fs = 125;
  spec.duration_s = 120;
  for (int k = 10; k < 170; k += 12)
    spec.ectopic_beats.push_back(k);  // 14 events, 28 of ~180 beats
  const test::Synth s = make_synth(spec);
  const PipelineRun r = analyse(s, spec.fs);
  EXPECT_EQ(r.summary.beats.by_verdict[static_cast<int>(BeatVerdict::ectopic)],
            2 * 14);  // synthetic truth
  // 28 / 180 ectopic is above waveform.ectopic_share_max (10 %): rhythm not regular.
  EXPECT_EQ(gate(r.summary.gates, "regular_rhythm").state, GateState::failed);
  ASSERT_TRUE(r.summary.reading);
  EXPECT_EQ(r.summary.reading->category, "not_interpretable");
  // Breaths holding an ectopic beat have no PPV; the others still match the truth.
  ASSERT_TRUE(r.summary.ppv);
  EXPECT_LT(r.summary.breaths_with_ppv, r.summary.breaths);
  EXPECT_NEAR(in_percent(r.summary.ppv->median), 100 * test::median(test::true_breath_ppv(s)), 1.0);
}

TEST(PpvPipeline, LowHeartRateToRespiratoryRateRatioFailsItsGate) {
  SynthSpec spec;
  spec.hr = 60;
  spec.rr = 20;  // HR/RR 3.0 < 3.6 (De Backer et al., Anesthesiology 2009;110:1092)
  const test::Synth s = make_synth(spec);
  const PipelineRun r = analyse(s, spec.fs);
  ASSERT_TRUE(r.summary.hr_rr_ratio);
  EXPECT_NEAR(in_fraction(*r.summary.hr_rr_ratio), 3.0, 0.05);  // synthetic truth
  EXPECT_EQ(gate(r.summary.gates, "hr_rr_ratio").state, GateState::failed);
}

TEST(PpvPipeline, NegativeSwingsMarkTheBreathsAsNotPassive) {
  SynthSpec spec;
  spec.effort_cmH2O = 4;
  const test::Synth s = make_synth(spec);
  const PipelineRun r = analyse(s, spec.fs);
  EXPECT_EQ(gate(r.summary.gates, "passive_ventilation").state, GateState::failed);
}

TEST(PpvPipeline, FromAndToLimitTheStretch) {
  SynthSpec spec;
  spec.duration_s = 150;
  const test::Synth s = make_synth(spec);
  PipelineOptions o;
  o.from = seconds(30);
  o.to = seconds(90);
  const PipelineRun r = analyse(s, spec.fs, o);
  EXPECT_NEAR(in_seconds(r.summary.duration), 60, 1e-6);  // synthetic truth
  EXPECT_EQ(r.windows.size(), 2u);
  EXPECT_NEAR(in_seconds(r.windows.front().start), 30, 1e-9);
  // 60 s at 90/min: 90 onsets, minus the last, within one of the truth (edges).
  EXPECT_NEAR(static_cast<double>(r.summary.beats.total()), 89, 1);
}

TEST(PpvPipeline, OneThreadAndTwoThreadsGiveTheSameResults) {
  // The breaths of one chunk are found in a background thread while the next is read; the
  // engine takes them in the same order, so every number must be the same bit for bit.
  SynthSpec spec;
  spec.duration_s = 300;
  spec.noise_abp_mmHg = 0.5;
  spec.noise_paw_cmH2O = 0.2;
  spec.ectopic_beats = {40, 41, 200};
  const test::Synth s = make_synth(spec);
  const PipelineRun two = analyse(s, spec.fs, {}, false);
  const PipelineRun one = analyse(s, spec.fs, {}, true);
  ASSERT_EQ(two.per_breath.size(), one.per_breath.size());
  for (std::size_t i = 0; i < one.per_breath.size(); ++i) {
    ASSERT_EQ(two.per_breath[i].ppv.has_value(), one.per_breath[i].ppv.has_value());
    if (one.per_breath[i].ppv)
      EXPECT_EQ(in_fraction(*two.per_breath[i].ppv), in_fraction(*one.per_breath[i].ppv));
  }
  ASSERT_EQ(two.windows.size(), one.windows.size());
  for (std::size_t i = 0; i < one.windows.size(); ++i) {
    EXPECT_EQ(two.windows[i].beats, one.windows[i].beats);
    EXPECT_EQ(two.windows[i].breaths, one.windows[i].breaths);
  }
  EXPECT_EQ(two.summary.beats.total(), one.summary.beats.total());
  EXPECT_EQ(two.summary.breaths, one.summary.breaths);
  ASSERT_TRUE(one.summary.ppv && two.summary.ppv && one.summary.elastance);
  EXPECT_EQ(in_fraction(two.summary.ppv->median), in_fraction(one.summary.ppv->median));
  EXPECT_EQ(in_cmH2O_per_L(*two.summary.elastance), in_cmH2O_per_L(*one.summary.elastance));
  EXPECT_EQ(two.summary.stress_index, one.summary.stress_index);
}

TEST(PpvPipeline, AReadErrorMidwayStopsBothThreadsCleanly) {
  SynthSpec spec;
  spec.duration_s = 120;
  const test::Synth s = make_synth(spec);
  for (bool one_thread : {false, true}) {
    test::VectorSource source = test::source_of(s, spec.fs);
    source.one_thread = one_thread;
    source.fail_at_chunk = 4;  // chunks are 10 s: fails 40 s in, while breaths are in flight
    const Thresholds t = Thresholds::built_in();
    EXPECT_THROW(analyse_record(source, {}, t), InputError) << "one thread: " << one_thread;
  }
}

TEST(PpvPipeline, MissingChannelsAreClearErrors) {
  std::vector<ChannelInfo> only_paw{{"Paw", "cmH2O", 125, Role::airway_pressure}};
  EXPECT_THROW(choose_channels(only_paw, {}), InputError);
  // Arterial pressure alone is analysed (issue 13 item 6): no breath channel chosen.
  std::vector<ChannelInfo> only_abp{{"ABP", "mmHg", 125, Role::arterial_pressure}};
  const ChannelChoice alone = choose_channels(only_abp, {});
  EXPECT_EQ(alone.abp, 0);
  EXPECT_EQ(alone.paw, -1);
  EXPECT_EQ(alone.flow, -1);
  EXPECT_EQ(alone.resp, -1);
  PipelineOptions named;
  named.abp = "ART2";
  std::vector<ChannelInfo> both{{"ABP", "mmHg", 125, Role::arterial_pressure},
                                {"Paw", "cmH2O", 125, Role::airway_pressure}};
  EXPECT_THROW(choose_channels(both, named), InputError);
  named.abp = "abp";  // names match without case
  EXPECT_EQ(choose_channels(both, named).abp, 0);
  try {
    choose_channels(only_paw, {});
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("Paw"),
              std::string::npos);  // names the channels there are
  }
}

TEST(PpvPipeline, StreamQuantilesMatchSortedValues) {
  StreamQuantiles q(0.0, 1.0, 10000);
  std::vector<double> values;
  for (int i = 0; i < 1001; ++i) {
    const double v = 0.05 + 0.2 * ((i * 37) % 1001) / 1000.0;
    values.push_back(v);
    q.add(v);
  }
  std::sort(values.begin(), values.end());
  EXPECT_NEAR(*q.quantile(0.5), values[500], 1e-4);  // bin width 1e-4 (common practice, no source)
  EXPECT_NEAR(*q.quantile(0.1), values[100], 1e-4);
  EXPECT_NEAR(*q.quantile(0.9), values[900], 1e-4);
}

}  // namespace
}  // namespace bb::wave
