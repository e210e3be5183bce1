// The words of gates and readings (src/present/gate_words.cpp), made from the typed facts
// the physiology returns. These checks were on the physiology structs before the words moved
// to the presenter; the cut-offs and directions they rest on are sourced beside each case.
#include <gtest/gtest.h>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/ppv_waveform.hpp"

namespace bb {
namespace {

const Thresholds& limits() {
  static const Thresholds t = Thresholds::built_in();
  return t;
}

// Every PPV condition met: passive, regular, VT 8 mL/kg (De Backer et al., ICM 2005;31:517),
// HR 90 / RR 20 = 4.5 > 3.6 (De Backer et al., Anesthesiology 2009;110:1092), Crs 40 > 30
// (Monnet et al., Crit Care Med 2012;40:152), closed chest, no IAH, no RV failure.
PpvConditions all_met() {
  PpvConditions c;
  c.passive = true;
  c.regular_rhythm = true;
  c.vt_per_kg = mL_per_kg(8);
  c.hr = per_min(90);
  c.rr = per_min(20);
  c.crs = mL_per_cmH2O(40);
  c.closed_chest = true;
  c.intra_abdominal_hypertension = false;
  c.rv_failure = false;
  return c;
}

const Gate& gate(const std::vector<Gate>& gates, const std::string& key) {
  for (const Gate& g : gates) {
    if (g.key == key) return g;
  }
  throw std::runtime_error("no gate " + key);
}

bool has(const std::string& text, const std::string& part) {
  return text.find(part) != std::string::npos;
}

// ---- PPV and SVV ---------------------------------------------------------------

TEST(GateWords, PpvGatesAreWordedFromTheirValuesAndCutOffs) {
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(5);  // below 8 mL/kg PBW (De Backer et al., ICM 2005;31:517)
  c.hr = per_min(60);
  c.rr = per_min(30);  // HR/RR 2.0, not above 3.6 (De Backer et al., Anesthesiology 2009)
  const auto gates = ppv_gates(c, limits());
  const Gate& vt = gate(gates, "vt_per_kg_pbw");
  EXPECT_EQ(gate_label(vt), "Tidal volume at least 8.0 mL/kg PBW");
  EXPECT_EQ(gate_detail(vt),
            "VT 5.0 mL/kg PBW is below 8.0 mL/kg PBW: the tidal swing may be too small to "
            "reveal preload responsiveness");
  EXPECT_EQ(gate_failed_as(vt), "a low tidal volume");
  const Gate& ratio = gate(gates, "hr_rr_ratio");
  EXPECT_EQ(gate_label(ratio), "HR/RR above 3.6");
  EXPECT_EQ(gate_detail(ratio),
            "HR/RR 2.00 is not above 3.6: too few beats per breath to sample the swing");
  EXPECT_EQ(gate_detail(gate(gates, "compliance")), "Crs 40.0 mL/cmH2O");
  EXPECT_EQ(gate_detail(gate(ppv_gates(PpvConditions{}, limits()), "regular_rhythm")),
            "rhythm not stated");
}

TEST(GateWords, EveryPpvGateHasItsOwnFailureWords) {
  for (const Gate& g : ppv_gates(all_met(), limits())) {
    EXPECT_FALSE(gate_failed_as(g).empty()) << g.key;
    EXPECT_FALSE(has(gate_failed_as(g), " not met")) << g.key;  // not the fallback
  }
}

TEST(GateWords, AllMetReadingIsUnconditional) {
  // PPV 16 % > 13 %: responsive (Michard et al., AJRCCM 2000;162:134).
  const Reading r = read_ppv(percent(16), ppv_gates(all_met(), limits()), limits());
  EXPECT_EQ(reading_text(r), "PPV 16.0 % is above 13 %: suggests preload responsiveness.");
}

// Each failed condition, by its direction (docs/methods.md, "Directional validity
// conditions"; sources in tests/haemodynamics/gates_test.cpp): the reading that stands says what
// the other could not have shown, the one refused says it cannot be read.
TEST(GateWords, EachFailedConditionIsNamedInTheReading) {
  void (*fails[])(PpvConditions&) = {
      [](PpvConditions& c) { c.passive = false; },
      [](PpvConditions& c) { c.regular_rhythm = false; },
      [](PpvConditions& c) { c.vt_per_kg = mL_per_kg(6); },
      [](PpvConditions& c) {
        c.hr = per_min(60);
        c.rr = per_min(30);
      },
      [](PpvConditions& c) { c.crs = mL_per_cmH2O(25); },
      [](PpvConditions& c) { c.closed_chest = false; },
      [](PpvConditions& c) { c.intra_abdominal_hypertension = true; },
      [](PpvConditions& c) { c.rv_failure = true; },
  };
  for (auto fail : fails) {
    PpvConditions c = all_met();
    fail(c);
    const auto gates = ppv_gates(c, limits());
    const Reading high = read_ppv(percent(16), gates, limits());
    const Reading low = read_ppv(percent(5), gates, limits());
    const Reading& kept = high.category == "not_interpretable" ? low : high;
    const Reading& refused = high.category == "not_interpretable" ? high : low;
    if (kept.category != "not_interpretable") {
      const char* other = &kept == &high ? "a low value could not have excluded it"
                                         : "a high value could not have shown it";
      EXPECT_TRUE(has(reading_text(kept), other)) << reading_text(kept);
    }
    EXPECT_TRUE(has(reading_text(refused), "cannot be read")) << reading_text(refused);
  }
}

TEST(GateWords, LowTidalVolumeKeepsAHighValueAndRefusesALowOne) {
  // PPV 17 % and 5 % at 6 mL/kg PBW (De Backer et al., ICM 2005;31:517: falsely low).
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(6);
  const auto gates = ppv_gates(c, limits());
  EXPECT_TRUE(has(reading_text(read_ppv(percent(17), gates, limits())),
                  "suggests preload responsiveness; with a low tidal volume a low value "
                  "could not have excluded it"));
  EXPECT_EQ(reading_text(read_ppv(percent(5), gates, limits())),
            "PPV 5.0 % cannot be read: a low tidal volume can make it falsely low.");
}

TEST(GateWords, AFailedRhythmSpoilsEitherWay) {
  // An irregular rhythm: either way (Michard et al., AJRCCM 2000;162:134).
  PpvConditions c = all_met();
  c.regular_rhythm = false;
  const Reading r = read_ppv(percent(16), ppv_gates(c, limits()), limits());
  EXPECT_TRUE(has(reading_text(r), "an irregular rhythm makes it unreadable either way"))
      << reading_text(r);
}

TEST(GateWords, UnknownConditionsLeadTheReading) {
  const Reading high = read_ppv(percent(16), ppv_gates(PpvConditions{}, limits()), limits());
  EXPECT_EQ(reading_text(high).rfind("Conditional on ", 0), 0u) << reading_text(high);
  PpvConditions c = all_met();
  c.regular_rhythm.reset();
  const Reading r = read_ppv(percent(16), ppv_gates(c, limits()), limits());
  EXPECT_EQ(reading_text(r).rfind(
                "Conditional on regular cardiac rhythm, which was not recorded: PPV 16.0 %", 0),
            0u)
      << reading_text(r);
}

TEST(GateWords, ConditionsOnlyNotContradictedBySignalsAreSaidSo) {
  PpvConditions c = all_met();
  c.passive_from_signals = true;
  c.rhythm_from_signals = true;
  const Reading r = read_ppv(percent(16), ppv_gates(c, limits()), limits());
  EXPECT_TRUE(has(reading_text(r), "which the signals do not contradict but cannot prove"))
      << reading_text(r);
}

TEST(GateWords, SvvReadingNamesItsDeviceDependentZone) {
  // SVV 10-12 %, device-dependent (from memory).
  const Reading r = read_svv(percent(11), ppv_gates(all_met(), limits()), limits());
  EXPECT_EQ(reading_text(r),
            "SVV 11.0 % is within 10-12 %, where the cut-off depends on the device: "
            "inconclusive.");
}

// ---- preload tests ---------------------------------------------------------------

PreloadTestInputs vt_challenge(double before, double after) {
  PreloadTestInputs in;
  in.kind = PreloadTestKind::vt_challenge;
  in.measure = PreloadMeasure::ppv;
  in.before = percent(before);
  in.after = percent(after);
  in.vt_before_per_kg = mL_per_kg(6);
  in.vt_after_per_kg = mL_per_kg(8);
  in.passive = true;
  in.challenge_conditions = all_met();
  return in;
}

PreloadTestInputs plr(double before, double after) {
  PreloadTestInputs in;
  in.kind = PreloadTestKind::passive_leg_raising;
  in.measure = PreloadMeasure::cardiac_output;
  in.before = L_per_min(before);
  in.after = L_per_min(after);
  return in;
}

TEST(GateWords, TidalVolumeChallengeStepAndRhythm) {
  // 6 -> 8 mL/kg PBW and a rise of 3.5 points (Myatra et al., Crit Care Med 2017;45:415).
  PreloadTestInputs in = vt_challenge(6.0, 11.0);
  in.vt_after_per_kg = mL_per_kg(10);
  const PreloadTestResult bad = analyse_preload_test(in, limits());
  const Gate& step = gate(bad.conditions, "vt_step");
  EXPECT_EQ(gate_label(step), "Tidal volume raised from 6 to 8 mL/kg PBW for about one minute");
  EXPECT_EQ(gate_detail(step),
            "VT 6.0 to 10.0 mL/kg PBW is not the 6 to 8 mL/kg PBW step the cut-off was found "
            "with");
  in = vt_challenge(6.0, 11.0);
  in.vt_after_per_kg.reset();
  EXPECT_TRUE(has(reading_text(analyse_preload_test(in, limits()).reading), "Conditional"));
  in = vt_challenge(6.0, 11.0);
  in.challenge_conditions.regular_rhythm.reset();
  const std::string text = reading_text(analyse_preload_test(in, limits()).reading);
  EXPECT_EQ(text.rfind("Conditional on regular cardiac rhythm", 0), 0u) << text;
  EXPECT_TRUE(has(text,
                  "The tidal-volume challenge (PPV change 5.0 points) is at or above the "
                  "3.5 points cut-off: preload responsive."))
      << text;
}

TEST(GateWords, LegRaisingWithIntraAbdominalHypertension) {
  // IAH blunts leg raising: false negatives (Mahjoub et al., Crit Care Med 2010, from memory);
  // a rise >= 10 % reads (Monnet et al., Crit Care Med 2006;34:1402).
  PreloadTestInputs rise = plr(5.0, 6.0);
  rise.intra_abdominal_hypertension = true;
  const std::string kept = reading_text(analyse_preload_test(rise, limits()).reading);
  EXPECT_TRUE(has(kept, "a low value could not have excluded it")) << kept;
  PreloadTestInputs flat = plr(5.0, 5.1);
  flat.intra_abdominal_hypertension = true;
  const PreloadTestResult r = analyse_preload_test(flat, limits());
  EXPECT_EQ(reading_text(r.reading),
            "The passive leg raising (change 2.0 %) cannot be read: intra-abdominal hypertension "
            "can make it falsely low.");
  EXPECT_EQ(gate_detail(gate(r.conditions, "no_intra_abdominal_hypertension")),
            "intra-abdominal hypertension can blunt the venous return shifted by leg raising "
            "(false negative)");
}

TEST(GateWords, EndExpiratoryOcclusionWithEffortAndAShortHold) {
  // 15 s hold, no triggering (Monnet et al., Crit Care Med 2009;37:951).
  PreloadTestInputs in;
  in.kind = PreloadTestKind::end_expiratory_occlusion;
  in.measure = PreloadMeasure::cardiac_output;
  in.before = L_per_min(4.0);
  in.after = L_per_min(4.4);
  in.hold = seconds(10);
  in.passive = false;
  const PreloadTestResult r = analyse_preload_test(in, limits());
  EXPECT_EQ(gate_label(gate(r.conditions, "hold_duration")),
            "End-expiratory hold of at least 15 s");
  EXPECT_EQ(gate_detail(gate(r.conditions, "hold_duration")),
            "hold 10 s is shorter than the hold the cut-off was found with");
  EXPECT_TRUE(has(reading_text(r.reading), "breathing effort makes it unreadable"))
      << reading_text(r.reading);
}

// ---- IVC -------------------------------------------------------------------------

IvcInputs ivc_passive(Length dmax, Length dmin) {
  IvcInputs in;
  in.dmax = dmax;
  in.dmin = dmin;
  in.breathing = Breathing::passive;
  return in;
}

TEST(GateWords, IvcReadingAndGates) {
  // 2.0/1.6 cm: distensibility 25 % > 18 % (Barbier et al., ICM 2004;30:1740), variation
  // 22.2 % > 12 % (Feissel et al., ICM 2004;30:1834), hand-worked.
  const IvcResults r = analyse_ivc(ivc_passive(cm(2.0), cm(1.6)), limits());
  const std::string text = reading_text(r.reading);
  EXPECT_EQ(text.rfind("Conditional on ", 0), 0u) << text;
  EXPECT_TRUE(has(text,
                  "IVC distensibility 25.0 % > 18.0 %, variation 22.2 % > 12.0 %: suggests "
                  "preload responsiveness."))
      << text;
  EXPECT_EQ(gate_detail(gate(r.gates, kIvcGatePassive)),
            "stated: passive breathing state (controlled ventilation, no breathing effort)");
  EXPECT_EQ(gate_detail(gate(r.gates, kIvcGateVtPerKg)), "not given");
  // Below 8 mL/kg: falsely low (Barbier 2004, from memory); 2.0/1.9 cm cannot be read.
  IvcInputs low = ivc_passive(cm(2.0), cm(1.9));
  low.vt_per_kg = mL_per_kg(6.0);
  const IvcResults rl = analyse_ivc(low, limits());
  EXPECT_TRUE(has(reading_text(rl.reading), "a low tidal volume can make it falsely low"))
      << reading_text(rl.reading);
  EXPECT_EQ(gate_detail(gate(rl.gates, kIvcGateVtPerKg)), "6.0 mL/kg (below 8.0 mL/kg)");
}

TEST(GateWords, IvcWordsNameNoOption) {
  const IvcResults r = analyse_ivc(IvcInputs{}, limits());
  for (const Gate& g : r.gates) EXPECT_FALSE(has(gate_detail(g), "--")) << gate_detail(g);
  EXPECT_FALSE(has(reading_text(r.reading), "--")) << reading_text(r.reading);
  EXPECT_EQ(reading_text(r.reading), "No IVC diameters were given.");
}

// ---- gates from recorded signals -------------------------------------------------

TEST(GateWords, SignalGatesSayWhatTheSignalsShowed) {
  // 15 of 100 beats ectopic is above the share the thresholds allow (waveform.ectopic_share_max;
  // common practice, no source): the stated regular rhythm is contradicted.
  wave::SignalConditions c;
  c.beats = 100;
  c.beats_ectopic = 15;
  wave::StatedConditions stated;
  stated.regular_rhythm = true;
  const auto gates = wave::signal_ppv_gates(c, stated, limits());
  const Gate& rhythm = gate(gates, "regular_rhythm");
  EXPECT_EQ(rhythm.state, GateState::failed);
  EXPECT_EQ(rhythm.basis, GateBasis::stated_contradicted);
  EXPECT_EQ(gate_detail(rhythm),
            "an irregular rhythm varies pulse pressure beat to beat regardless of breathing; "
            "stated, but contradicted: from the signals: 15 of 100 beats ectopic or irregular");
  c.beats_ectopic = 0;
  const auto agreeing = wave::signal_ppv_gates(c, stated, limits());  // kept: gate() refers into it
  const Gate& agreed = gate(agreeing, "regular_rhythm");
  EXPECT_EQ(gate_detail(agreed),
            "regular rhythm; stated; from the signals: 0 of 100 beats ectopic or irregular");
}

TEST(GateWords, SignalGatesSayWhereTheirValuesCameFrom) {
  // A rate found in the pulse-pressure modulation is an estimate: it can fail HR/RR > 3.6
  // (De Backer et al., Anesthesiology 2009;110:1092), never prove it (not_contradicted).
  wave::SignalConditions c;
  c.hr = per_min(110);
  c.rr = per_min(15);  // 110 / 15 = 7.3 > 3.6
  c.cycles = wave::CycleSource::pulse_modulation;
  const Gate found = gate(wave::signal_ppv_gates(c, {}, limits()), "hr_rr_ratio");
  EXPECT_EQ(found.state, GateState::not_contradicted);
  EXPECT_EQ(gate_detail(found),
            "HR/RR 7.33; RR found in the pulse-pressure modulation, not measured");
  c.cycles = wave::CycleSource::set_rate;
  EXPECT_EQ(gate_detail(gate(wave::signal_ppv_gates(c, {}, limits()), "hr_rr_ratio")),
            "HR/RR 7.33; RR as set (stated)");
  // PBW stated but no flow channel: no tidal volume.
  wave::StatedConditions stated;
  stated.pbw = kg(70);
  EXPECT_EQ(gate_detail(gate(wave::signal_ppv_gates(c, stated, limits()), "vt_per_kg_pbw")),
            "tidal volume per kg PBW not given; no tidal volume in the record (needs a flow "
            "channel)");
  // Breath timing regular and no negative swings: effort not contradicted, not proven.
  wave::SignalConditions quiet;
  quiet.breaths = 40;
  quiet.breath_timing_cv = 0.04;
  quiet.pressure_known = true;
  const Gate passive = gate(wave::signal_ppv_gates(quiet, {}, limits()), "passive_ventilation");
  EXPECT_EQ(passive.state, GateState::not_contradicted);
  EXPECT_EQ(gate_detail(passive),
            "no spontaneous breathing effort; from the signals: breath timing CV 4 %, 0 of 40 "
            "breaths with a negative pressure swing");
}

TEST(GateWords, IvcPassiveGateSaysWhatItRestsOn) {
  IvcInputs in = ivc_passive(cm(2.0), cm(1.6));
  in.effort_seen = false;
  in.passive_from_signals = true;
  EXPECT_EQ(gate_detail(gate(analyse_ivc(in, limits()).gates, kIvcGatePassive)),
            "the recorded signals show no breathing effort, which does not prove it");
  in.passive_from_signals = false;
  EXPECT_EQ(gate_detail(gate(analyse_ivc(in, limits()).gates, kIvcGatePassive)),
            "stated: no breathing effort");
  in.effort_seen = true;
  EXPECT_EQ(gate_detail(gate(analyse_ivc(in, limits()).gates, kIvcGatePassive)),
            "breathing effort was seen");
  in = ivc_passive(cm(2.0), cm(1.6));
  in.breathing = Breathing::unassisted;
  EXPECT_EQ(reading_text(analyse_ivc(in, limits()).reading).rfind("Unassisted breathing: ", 0), 0u);
}

}  // namespace
}  // namespace bb
