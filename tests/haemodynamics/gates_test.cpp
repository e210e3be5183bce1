// PPV/SVV validity gates and readings: grey-zone boundaries, one test per gate
// that makes the reading not interpretable, unknown gates, threshold overrides.
#include <gtest/gtest.h>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {
namespace {

// Every gate met: passive, regular, VT 8 mL/kg, HR 90 / RR 20 = 4.5, Crs 40, closed
// chest, no IAH, no RV failure (values chosen to clear the published cut-offs below).
PpvConditions all_met() {
  PpvConditions c;
  c.passive = true;
  c.regular_rhythm = true;
  c.vt_per_kg = mL_per_kg(8);  // De Backer et al., ICM 2005;31:517: >= 8 mL/kg PBW
  c.hr = per_min(90);
  c.rr = per_min(20);        // 4.5 > 3.6, De Backer et al., Anesthesiology 2009;110:1092
  c.crs = mL_per_cmH2O(40);  // > 30, Monnet et al., Crit Care Med 2012;40:152
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

class PpvGates : public ::testing::Test {
 protected:
  Thresholds t = Thresholds::built_in();
  // PPV 16 %, above the grey zone (Michard et al., AJRCCM 2000;162:134: > 13 % responsive)
  std::string category(const PpvConditions& c) {
    return read_ppv(percent(16), ppv_gates(c, t), t).category;
  }
};

TEST_F(PpvGates, AllMetGivesTheValueReading) {
  const auto gates = ppv_gates(all_met(), t);
  ASSERT_EQ(gates.size(), 8u);  // eight conditions, each sourced in docs/methods.md
  for (const Gate& g : gates) EXPECT_EQ(g.state, GateState::met) << g.key;
  const Reading r = read_ppv(percent(16), gates, t);
  EXPECT_EQ(r.category, "above_grey_zone");  // 16 > 13 %, Michard et al., AJRCCM 2000;162:134
  EXPECT_FALSE(r.conditional);               // words: tests/present/gate_words_test.cpp
}

// Each condition flips a high and a low PPV by its published direction
// (docs/methods.md, "Directional validity conditions"): PPV 16 % is above the
// grey zone, 5 % below it (Cannesson et al., Anesthesiology 2011;115:231).
struct Flip {
  const char* gate;
  void (*fail)(PpvConditions&);
  const char* high_category;  // PPV 16 %
  const char* low_category;   // PPV 5 %
  const char* source;
};

const Flip kFlips[] = {
    {"passive_ventilation", [](PpvConditions& c) { c.passive = false; }, "not_interpretable",
     "not_interpretable", "Heenen et al., Crit Care 2006;10:R102 (from memory): either way"},
    {"regular_rhythm", [](PpvConditions& c) { c.regular_rhythm = false; }, "not_interpretable",
     "not_interpretable", "Michard et al., AJRCCM 2000;162:134: either way"},
    {"vt_per_kg_pbw", [](PpvConditions& c) { c.vt_per_kg = mL_per_kg(6); }, "above_grey_zone",
     "not_interpretable", "De Backer et al., ICM 2005;31:517: falsely low"},
    {"hr_rr_ratio",
     [](PpvConditions& c) {
       c.hr = per_min(60);
       c.rr = per_min(30);
     },
     "above_grey_zone", "not_interpretable",
     "De Backer et al., Anesthesiology 2009;110:1092: falsely low"},
    {"compliance", [](PpvConditions& c) { c.crs = mL_per_cmH2O(25); }, "above_grey_zone",
     "not_interpretable", "Monnet et al., Crit Care Med 2012;40:152: falsely low"},
    {"closed_chest", [](PpvConditions& c) { c.closed_chest = false; }, "above_grey_zone",
     "not_interpretable", "de Waal et al., Crit Care Med 2009;37:510 (from memory): falsely low"},
    {"no_intra_abdominal_hypertension",
     [](PpvConditions& c) { c.intra_abdominal_hypertension = true; }, "not_interpretable",
     "below_grey_zone", "Jacques et al., Crit Care 2011;15:R33 (from memory): falsely high"},
    {"no_rv_failure", [](PpvConditions& c) { c.rv_failure = true; }, "not_interpretable",
     "below_grey_zone", "Mahjoub et al., Crit Care Med 2009;37:2570 (from memory): falsely high"},
};

TEST_F(PpvGates, EachFailedConditionFlipsTheReadingsItsDirectionForbids) {
  for (const Flip& f : kFlips) {
    PpvConditions c = all_met();
    f.fail(c);
    const auto gates = ppv_gates(c, t);
    EXPECT_EQ(gate(gates, f.gate).state, GateState::failed) << f.gate;
    const Reading high = read_ppv(percent(16), gates, t);
    const Reading low = read_ppv(percent(5), gates, t);
    EXPECT_EQ(high.category, f.high_category) << f.gate << ": " << f.source;
    EXPECT_EQ(low.category, f.low_category) << f.gate << ": " << f.source;
    // The reading that stands says what the other could not have shown.
    const Reading& kept = high.category == "not_interpretable" ? low : high;
    if (kept.category != "not_interpretable") {
      EXPECT_EQ(kept.one_sided, std::vector<std::string>{f.gate}) << f.gate;
      EXPECT_EQ(kept.pointing, &kept == &high ? Pointing::responsive : Pointing::unresponsive);
    }
    // The refused reading keeps the gates it was weighed with, for its words
    // (tests/present/gate_words_test.cpp).
    const Reading& refused = high.category == "not_interpretable" ? high : low;
    EXPECT_EQ(refused.conditions.size(), gates.size()) << f.gate;
    // A grey-zone value cannot be read with any condition failed.
    EXPECT_EQ(read_ppv(percent(11), gates, t).category, "not_interpretable") << f.gate;
  }
}

TEST_F(PpvGates, LowTidalVolumeKeepsAHighValueAndRefusesALowOne) {
  // The worked case: PPV 17 % and 5 % at 6 mL/kg PBW, passive, regular
  // (De Backer et al., ICM 2005;31:517: below 8 mL/kg PPV misses responders).
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(6);
  const auto gates = ppv_gates(c, t);
  const Reading high = read_ppv(percent(17), gates, t);
  EXPECT_EQ(high.category, "above_grey_zone");
  EXPECT_EQ(high.one_sided, std::vector<std::string>{"vt_per_kg_pbw"});
  const Reading low = read_ppv(percent(5), gates, t);
  EXPECT_EQ(low.category, "not_interpretable");
  // The values and cut-offs the words are made from (grey zone 9-13 %, Cannesson et al.,
  // Anesthesiology 2011;115:231); the sentences: tests/present/gate_words_test.cpp.
  ASSERT_EQ(low.values.size(), 1u);
  EXPECT_NEAR(low.values[0].value, 5.0, 1e-9);
  EXPECT_EQ(low.values[0].cut_offs, (std::vector<double>{9.0, 13.0}));
  const Gate& vt = gate(gates, "vt_per_kg_pbw");
  EXPECT_EQ(vt.basis, GateBasis::measured);
  EXPECT_NEAR(*vt.value, 6.0, 1e-9);
  EXPECT_NEAR(vt.cut_off, 8.0, 1e-9);  // De Backer et al., ICM 2005;31:517
}

TEST_F(PpvGates, GateCutOffsAtTheirBoundaries) {
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(7.9);  // just below 8 (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::failed);
  c.vt_per_kg = mL_per_kg(8.0);  // at the cut-off: met, >= 8 (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::met);
  c = all_met();
  c.hr = per_min(72);
  c.rr = per_min(20);  // exactly 3.6: not above, failed (De Backer et al., Anesthesiology 2009)
  EXPECT_EQ(gate(ppv_gates(c, t), "hr_rr_ratio").state, GateState::failed);
  c.hr = per_min(73);  // 3.65 > 3.6: met (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_EQ(gate(ppv_gates(c, t), "hr_rr_ratio").state, GateState::met);
  c = all_met();
  c.crs = mL_per_cmH2O(30);  // exactly 30: not above, failed (Monnet et al., CCM 2012;40:152)
  EXPECT_EQ(gate(ppv_gates(c, t), "compliance").state, GateState::failed);
  c.crs = mL_per_cmH2O(30.5);  // above 30: met (Monnet et al., Crit Care Med 2012;40:152)
  EXPECT_EQ(gate(ppv_gates(c, t), "compliance").state, GateState::met);
}

TEST_F(PpvGates, EveryGateCarriesItsDirectionFromThePresets) {
  for (const Gate& g : ppv_gates(all_met(), t)) {
    EXPECT_FALSE(g.bias_source.empty()) << g.key;
    EXPECT_EQ(g.of, GateOf::ppv) << g.key;
    EXPECT_EQ(g.condition, g.key);
  }
  EXPECT_EQ(gate(ppv_gates(all_met(), t), "vt_per_kg_pbw").bias, Bias::falsely_low);
  EXPECT_EQ(gate(ppv_gates(all_met(), t), "no_rv_failure").bias, Bias::falsely_high);
  EXPECT_EQ(gate(ppv_gates(all_met(), t), "regular_rhythm").bias, Bias::either);
}

TEST_F(PpvGates, ASiteMayOverrideADirection) {
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(6);
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text(
      "[bias.ppv.vt_per_kg_pbw]\nbias = \"either\"\nsource = \"site protocol\"\n", "site.toml");
  // Read either way, a high PPV at low VT is refused too (hand-worked from the rule).
  EXPECT_EQ(read_ppv(percent(16), ppv_gates(c, site), site).category, "not_interpretable");
  EXPECT_THROW(site.load_overrides_text("[bias.ppv.vt_per_kg_pbw]\nbias = \"low\"\n", "x.toml"),
               InputError);
  EXPECT_THROW(site.load_overrides_text("[bias.ppv.vt_per_kgpbw]\nbias = \"either\"\n", "x.toml"),
               InputError);
}

TEST_F(PpvGates, UnknownConditionsThatCouldMisleadThisWayLeadTheReading) {
  const PpvConditions nothing_known;
  const auto gates = ppv_gates(nothing_known, t);
  for (const Gate& g : gates) EXPECT_EQ(g.state, GateState::unknown) << g.key;
  // A high value could be falsely high only through effort, rhythm, IAH or RV failure.
  const Reading high = read_ppv(percent(16), gates, t);
  EXPECT_EQ(high.category, "above_grey_zone");  // > 13 %, Michard et al., AJRCCM 2000;162:134
  EXPECT_TRUE(high.conditional);
  EXPECT_EQ(high.open_conditions,
            (std::vector<std::string>{"passive_ventilation", "regular_rhythm",
                                      "no_intra_abdominal_hypertension", "no_rv_failure"}));
  // A low value could be falsely low through effort, rhythm, VT, HR/RR, Crs or an open chest.
  const Reading low = read_ppv(percent(5), gates, t);
  EXPECT_EQ(low.open_conditions,
            (std::vector<std::string>{"passive_ventilation", "regular_rhythm", "vt_per_kg_pbw",
                                      "hr_rr_ratio", "compliance", "closed_chest"}));
  // Only the rhythm unknown: the reading leads with it, singular.
  PpvConditions c = all_met();
  c.regular_rhythm.reset();
  const Reading r = read_ppv(percent(16), ppv_gates(c, t), t);
  EXPECT_EQ(r.open_conditions, std::vector<std::string>{"regular_rhythm"});
  // A condition that could only have pushed it the other way leaves it unconditional.
  c = all_met();
  c.vt_per_kg.reset();
  EXPECT_FALSE(read_ppv(percent(16), ppv_gates(c, t), t).conditional);
  EXPECT_TRUE(read_ppv(percent(5), ppv_gates(c, t), t).conditional);
}

TEST_F(PpvGates, SignalsCanOnlyLeaveAConditionNotContradicted) {
  PpvConditions c = all_met();
  c.passive_from_signals = true;  // signals show no effort: that does not prove it
  c.rhythm_from_signals = true;
  const auto gates = ppv_gates(c, t);
  EXPECT_EQ(gate(gates, "passive_ventilation").state, GateState::not_contradicted);
  EXPECT_EQ(gate(gates, "regular_rhythm").state, GateState::not_contradicted);
  const Reading r = read_ppv(percent(16), gates, t);
  EXPECT_TRUE(r.conditional);
  EXPECT_EQ(gate(gates, "regular_rhythm").basis, GateBasis::seen_in_signals);
  c.passive = false;  // effort seen in the signals does fail the condition
  EXPECT_EQ(gate(ppv_gates(c, t), "passive_ventilation").state, GateState::failed);
}

TEST_F(PpvGates, GreyZoneBoundaries) {
  const auto gates = ppv_gates(all_met(), t);
  // Grey zone 9-13 % inclusive (Cannesson et al., Anesthesiology 2011;115:231)
  EXPECT_EQ(read_ppv(percent(8.9), gates, t).category, "below_grey_zone");
  EXPECT_EQ(read_ppv(percent(9.0), gates, t).category, "grey_zone");
  EXPECT_EQ(read_ppv(percent(11.0), gates, t).category, "grey_zone");
  EXPECT_EQ(read_ppv(percent(13.0), gates, t).category, "grey_zone");
  EXPECT_EQ(read_ppv(percent(13.1), gates, t).category, "above_grey_zone");
}

TEST_F(PpvGates, GreyZoneBoundariesFromPulsePressures) {
  const auto gates = ppv_gates(all_met(), t);
  // Mean pulse pressure 50 mmHg: a difference of 4.5 mmHg is 9 %, 6.5 mmHg is 13 %
  // (Michard et al., AJRCCM 2000;162:134 definition; grey zone Cannesson et al., Anesthesiology
  // 2011;115:231)
  EXPECT_EQ(read_ppv(pulse_pressure_variation(mmHg(52.25), mmHg(47.75)), gates, t).category,
            "grey_zone");
  EXPECT_EQ(read_ppv(pulse_pressure_variation(mmHg(53.25), mmHg(46.75)), gates, t).category,
            "grey_zone");
  EXPECT_EQ(read_ppv(pulse_pressure_variation(mmHg(52.2), mmHg(47.8)), gates, t).category,
            "below_grey_zone");
  EXPECT_EQ(read_ppv(pulse_pressure_variation(mmHg(53.3), mmHg(46.7)), gates, t).category,
            "above_grey_zone");
}

TEST_F(PpvGates, OverrideFileChangesTheReading) {
  const auto gates = ppv_gates(all_met(), t);
  // 12 % is in the grey zone with the built-in 9-13 % (Cannesson et al., Anesthesiology
  // 2011;115:231)
  EXPECT_EQ(read_ppv(percent(12), gates, t).category, "grey_zone");
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text(
      "[ppv.grey_zone_high]\nvalue = 11\nunit = \"%\"\nsource = \"site protocol\"\n", "site.toml");
  EXPECT_EQ(read_ppv(percent(12), gates, site).category, "above_grey_zone");
}

TEST_F(PpvGates, OverrideOfAGateCutOffChangesTheGate) {
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(7);  // below 8 (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::failed);
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text("[gates.vt_per_kg_min]\nvalue = 7\nunit = \"mL/kg\"\n", "site.toml");
  EXPECT_EQ(gate(ppv_gates(c, site), "vt_per_kg_pbw").state, GateState::met);
}

TEST_F(PpvGates, LowTidalVolumePointsToTheTidalVolumeChallenge) {
  // At VT < 8 mL/kg PBW a low PPV cannot be read (De Backer et al., ICM 2005;31:517); the
  // tidal-volume challenge was designed for that case (Myatra et al., Crit Care Med 2017;45:415).
  // 52/49, 51/48, 53/50: PPV about 6 %, below the grey zone (hand-worked, Michard 2000 formula).
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("52/49,51/48,53/50");
  in.conditions = all_met();
  in.conditions.vt_per_kg = mL_per_kg(6);
  const PpvResults r = analyse_ppv(in, t);
  EXPECT_EQ(r.reading->category, "not_interpretable");
  const auto has = [](const PpvResults& res, PpvNoteKind kind) {
    for (const PpvNote& n : res.notes) {
      if (n.kind == kind) return true;
    }
    return false;
  };
  EXPECT_TRUE(has(r, PpvNoteKind::vt_challenge_instead));
  // PLR by cardiac output does not need the ventilation gates (Monnet et al., Crit Care Med
  // 2006;34:1402), so it is offered too.
  EXPECT_TRUE(has(r, PpvNoteKind::plr_instead));
  // The presenter names the test in the reader's terms: the option on the command line, the
  // trial-file table in a report; the VT step is the preset's 6 to 8 mL/kg PBW (Myatra 2017).
  const PpvNote note{PpvNoteKind::vt_challenge_instead};
  const std::string cli = ppv_note_text(note, r, t, FieldContext::command_line);
  EXPECT_NE(cli.find("calc preload-test --kind vt_challenge"), std::string::npos) << cli;
  EXPECT_NE(cli.find("6 to 8 mL/kg PBW"), std::string::npos) << cli;
  const std::string file = ppv_note_text(note, r, t, FieldContext::trial_file);
  EXPECT_NE(file.find("preload.vt_challenge"), std::string::npos) << file;
  EXPECT_EQ(file.find("--"), std::string::npos) << file;
  in.conditions = all_met();
  const PpvResults met = analyse_ppv(in, t);
  EXPECT_FALSE(has(met, PpvNoteKind::vt_challenge_instead));
  EXPECT_FALSE(has(met, PpvNoteKind::plr_instead));
}

TEST_F(PpvGates, IntraAbdominalHypertensionWithholdsThePassiveLegRaisingAlternative) {
  // IAH blunts PLR as well (Mahjoub et al., Crit Care Med 2010, from memory): not offered.
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
  in.conditions = all_met();
  in.conditions.intra_abdominal_hypertension = true;
  for (const PpvNote& n : analyse_ppv(in, t).notes) EXPECT_NE(n.kind, PpvNoteKind::plr_instead);
}

TEST_F(PpvGates, SkippedResultsNameTheirFieldsById) {
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
  const PpvResults r = analyse_ppv(in, t);
  ASSERT_EQ(r.skipped.size(), 3u);  // SPV needs beats; MAP beats or SBP/DBP; HR/RR both rates
  EXPECT_EQ(r.skipped[0].key, "spv");
  EXPECT_EQ(r.skipped[0].needs[0].field, "beats");
  EXPECT_EQ(r.skipped[1].key, "map");
  EXPECT_EQ(r.skipped[1].needs[0].or_fields, (std::vector<std::string>{"sbp", "dbp"}));
  EXPECT_EQ(r.skipped[2].needs[1].field, "rr");
  const Answer a = describe_ppv(in, r, t);
  EXPECT_EQ(need_text(a.skipped[1].needs[0], a.context), "--beats (or --sbp and --dbp)");
}

TEST_F(PpvGates, SvvReadingWithDeviceDependentZone) {
  const auto gates = ppv_gates(all_met(), t);
  // Device-dependent cut-off about 10-12 % (from memory)
  EXPECT_EQ(read_svv(percent(8), gates, t).category, "below_threshold");
  EXPECT_EQ(read_svv(percent(11), gates, t).category, "device_dependent_zone");
  EXPECT_EQ(read_svv(percent(15), gates, t).category, "above_threshold");
  PpvConditions c = all_met();
  c.passive = false;  // the same gates hold for SVV (Michard et al., AJRCCM 2000;162:134)
  EXPECT_EQ(read_svv(percent(15), ppv_gates(c, t), t).category, "not_interpretable");
}

}  // namespace
}  // namespace bb
