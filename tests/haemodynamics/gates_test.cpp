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
  ASSERT_EQ(gates.size(), 8u);  // brief §5 lists eight conditions
  for (const Gate& g : gates) EXPECT_EQ(g.state, GateState::met) << g.key;
  const Reading r = read_ppv(percent(16), gates, t);
  EXPECT_EQ(r.category, "above_grey_zone");  // 16 > 13 %, Michard et al., AJRCCM 2000;162:134
  EXPECT_EQ(r.text.find("Conditional"), std::string::npos);
}

TEST_F(PpvGates, SpontaneousEffortMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.passive = false;  // Michard et al., AJRCCM 2000;162:134 (passive patients only)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "passive_ventilation").state, GateState::failed);
}

TEST_F(PpvGates, IrregularRhythmMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.regular_rhythm = false;  // Michard et al., AJRCCM 2000;162:134 (regular rhythm)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "regular_rhythm").state, GateState::failed);
}

TEST_F(PpvGates, LowTidalVolumeMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.vt_per_kg = mL_per_kg(6);  // below 8 mL/kg PBW, De Backer et al., ICM 2005;31:517
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::failed);
  c.vt_per_kg = mL_per_kg(7.9);  // just below 8 (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::failed);
  c.vt_per_kg = mL_per_kg(8.0);  // at the cut-off: met, >= 8 (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(gate(ppv_gates(c, t), "vt_per_kg_pbw").state, GateState::met);
}

TEST_F(PpvGates, LowHeartRateToRespiratoryRateRatioMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.hr = per_min(60);
  c.rr = per_min(30);  // 2.0, not above 3.6 (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "hr_rr_ratio").state, GateState::failed);
  c.hr = per_min(72);
  c.rr = per_min(
      20);  // exactly 3.6: not above 3.6, failed (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_EQ(gate(ppv_gates(c, t), "hr_rr_ratio").state, GateState::failed);
  c.hr = per_min(73);  // 3.65 > 3.6: met (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_EQ(gate(ppv_gates(c, t), "hr_rr_ratio").state, GateState::met);
}

TEST_F(PpvGates, LowComplianceMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.crs = mL_per_cmH2O(25);  // not above 30 mL/cmH2O (Monnet et al., Crit Care Med 2012;40:152)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "compliance").state, GateState::failed);
  c.crs =
      mL_per_cmH2O(30);  // exactly 30: not above, failed (Monnet et al., Crit Care Med 2012;40:152)
  EXPECT_EQ(gate(ppv_gates(c, t), "compliance").state, GateState::failed);
  c.crs = mL_per_cmH2O(30.5);  // above 30: met (Monnet et al., Crit Care Med 2012;40:152)
  EXPECT_EQ(gate(ppv_gates(c, t), "compliance").state, GateState::met);
}

TEST_F(PpvGates, OpenChestMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.closed_chest = false;  // de Waal et al., Crit Care Med 2009;37:510 (from memory)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "closed_chest").state, GateState::failed);
}

TEST_F(PpvGates, IntraAbdominalHypertensionMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.intra_abdominal_hypertension = true;  // brief §5 condition (common practice, no source)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "no_intra_abdominal_hypertension").state, GateState::failed);
}

TEST_F(PpvGates, RightVentricularFailureMakesItNotInterpretable) {
  PpvConditions c = all_met();
  c.rv_failure = true;  // false positives, Mahjoub et al., Crit Care Med 2009 (from memory)
  EXPECT_EQ(category(c), "not_interpretable");
  EXPECT_EQ(gate(ppv_gates(c, t), "no_rv_failure").state, GateState::failed);
}

TEST_F(PpvGates, FailedGateIsNamedInTheReading) {
  PpvConditions c = all_met();
  c.regular_rhythm = false;
  const Reading r = read_ppv(percent(16), ppv_gates(c, t), t);
  EXPECT_NE(r.text.find("Regular cardiac rhythm"), std::string::npos);
}

TEST_F(PpvGates, UnknownGatesKeepTheReadingButMakeItConditional) {
  const PpvConditions nothing_known;
  const auto gates = ppv_gates(nothing_known, t);
  for (const Gate& g : gates) EXPECT_EQ(g.state, GateState::unknown) << g.key;
  const Reading r = read_ppv(percent(16), gates, t);
  EXPECT_EQ(r.category, "above_grey_zone");  // > 13 %, Michard et al., AJRCCM 2000;162:134
  EXPECT_NE(r.text.find("Conditional"), std::string::npos);
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
  // At VT < 8 mL/kg PBW PPV fails its gate (De Backer et al., ICM 2005;31:517); the tidal-volume
  // challenge was designed for that case (Myatra et al., Crit Care Med 2017;45:415)
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
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
  c.passive = false;  // the same gates hold for SVV (brief §5; Michard et al., AJRCCM 2000;162:134)
  EXPECT_EQ(read_svv(percent(15), ppv_gates(c, t), t).category, "not_interpretable");
}

}  // namespace
}  // namespace bb
