// Respiratory mechanics formulas against published values and worked arithmetic.
#include <gtest/gtest.h>

#include <algorithm>

#include "breathbeat/mechanics.hpp"

#include "breathbeat/present/mechanics.hpp"

namespace bb {
namespace {

// ARDS Network, N Engl J Med 2000;342:1301: PBW male 50 + 0.91 (cm - 152.4),
// female 45.5 + 0.91 (cm - 152.4).
TEST(PredictedBodyWeight, ArdsNetworkAt152cm) {
  EXPECT_NEAR(in_kg(predicted_body_weight(Sex::male, cm(152.4))), 50.0, 1e-9);
  EXPECT_NEAR(in_kg(predicted_body_weight(Sex::female, cm(152.4))), 45.5, 1e-9);
}

TEST(PredictedBodyWeight, OtherHeights) {
  // ARDS Network 2000 formula, hand-worked: male 180 cm -> 50 + 0.91 x 27.6 = 75.1 kg.
  EXPECT_NEAR(in_kg(predicted_body_weight(Sex::male, cm(180))), 75.1, 0.05);
  // ARDS Network 2000 formula: female 165 cm -> 45.5 + 0.91 x 12.6 = 56.966 kg.
  EXPECT_NEAR(in_kg(predicted_body_weight(Sex::female, cm(165))), 56.966, 1e-6);
  // ARDS Network 2000 formula, 6 ft (182.88 cm) male -> 50 + 0.91 x 30.48 = 77.74 kg.
  EXPECT_NEAR(in_kg(predicted_body_weight(Sex::male, cm(182.88))), 77.74, 0.01);
}

TEST(Mechanics, HandWorkedDrivingPressureComplianceAndPower) {
  // Hand-worked on Amato et al., N Engl J Med 2015;372:747 (dP) and the textbook compliance
  // (common practice, no source):
  // VT 500 mL, Pplat 25, PEEP 10 -> dP 15 cmH2O, Crs 33.3 mL/cmH2O.
  EXPECT_NEAR(in_cmH2O(driving_pressure(cmH2O(25), cmH2O(10))), 15.0, 1e-9);
  EXPECT_NEAR(in_mL_per_cmH2O(static_compliance(mL(500), cmH2O(25), cmH2O(10))), 33.333, 1e-3);
  // Gattinoni et al., Intensive Care Med 2016;42:1567, simplified VC power:
  // 0.098 x 20 x 0.5 x (30 - 15/2) = 22.05 J/min.
  EXPECT_NEAR(
      in_J_per_min(mechanical_power_volume_control(per_min(20), mL(500), cmH2O(30), cmH2O(15))),
      22.05, 1e-9);
}

TEST(Mechanics, DynamicComplianceResistanceTimeConstant) {
  // Textbook definitions (common practice, no source): VT 500 / (Ppeak 30 - PEEP 10) = 25 mL/cmH2O.
  EXPECT_NEAR(in_mL_per_cmH2O(dynamic_compliance(mL(500), cmH2O(30), cmH2O(10))), 25.0, 1e-9);
  // (Ppeak - Pplat) / flow: (30 - 25) / 1 L/s = 5 cmH2O/L/s (common practice, no source).
  const Resistance r = airway_resistance(cmH2O(30), cmH2O(25), L_per_min(60));
  EXPECT_NEAR(in_cmH2O_per_L_per_s(r), 5.0, 1e-9);
  // tau = R x C = 5 cmH2O/L/s x 0.0333 L/cmH2O = 0.1667 s (common practice, no source).
  EXPECT_NEAR(in_seconds(time_constant(r, mL_per_cmH2O(100.0 / 3.0))), 1.0 / 6.0, 1e-9);
}

TEST(Mechanics, IntrinsicPeep) {
  // PEEPi = total PEEP - set PEEP (common practice, no source): 12 - 8 = 4 cmH2O.
  EXPECT_NEAR(in_cmH2O(intrinsic_peep(cmH2O(12), cmH2O(8))), 4.0, 1e-9);
}

TEST(Mechanics, MeanAirwayPressureEstimates) {
  // Marini & Ravenscraft, Crit Care Med 1992;20:1461, VC square flow:
  // 5 + 0.5 x (30 - 5) x (1 / 3) = 9.1667 cmH2O (RR 20 -> Ttot 3 s, Ti 1 s).
  EXPECT_NEAR(in_cmH2O(mean_airway_pressure_volume_control(cmH2O(5), cmH2O(30), seconds(1),
                                                           breath_period(per_min(20)))),
              9.1667, 1e-4);
  // Marini & Ravenscraft 1992, PC: 5 + (25 - 5) x (1 / 3) = 11.667 cmH2O.
  EXPECT_NEAR(
      in_cmH2O(mean_airway_pressure_pressure_control(cmH2O(5), cmH2O(25), seconds(1), seconds(3))),
      11.667, 1e-3);
}

TEST(Mechanics, PressureControlPower) {
  // Becher et al., Intensive Care Med 2019 (from memory): 0.098 x RR x VT x (PEEP + dPinsp)
  // = 0.098 x 20 x 0.5 x (10 + 15) = 24.5 J/min.
  EXPECT_NEAR(
      in_J_per_min(mechanical_power_pressure_control(per_min(20), mL(500), cmH2O(10), cmH2O(15))),
      24.5, 1e-9);
}

TEST(Mechanics, VentilatoryRatio) {
  // Sinha et al., Br J Anaesth 2009;102:692 (from memory): VR = (VE x PaCO2) /
  // (PBW x 100 x 37.5). PBW 75 kg, VE 7.5 L/min, PaCO2 37.5 mmHg -> 1.0 exactly.
  EXPECT_NEAR(in_fraction(ventilatory_ratio(L_per_min(7.5), mmHg(37.5), kg(75))), 1.0, 1e-9);
  // Same formula: VE 10 L/min, PaCO2 50 mmHg, PBW 70 kg -> 500000 / 262500 = 1.905.
  EXPECT_NEAR(in_fraction(ventilatory_ratio(L_per_min(10), mmHg(50), kg(70))), 1.905, 1e-3);
}

TEST(Mechanics, OesophagealPartition) {
  // Gattinoni/Chiumello, AJRCCM 2008;178:346 (from memory) and Talmor et al., NEJM
  // 2008;359:2095. VT 500 mL, Pplat 25, PEEP 10 (dP 15), Pes 8 -> 12 (dPes 4):
  // Ecw = 4/0.5 = 8, EL = 11/0.5 = 22, Ers = 30 cmH2O/L, Ecw/Ers = 0.2667,
  // PL,ee = 10 - 8 = 2, PL,ei = 25 x 22/30 = 18.33 cmH2O.
  const Pressure dp = driving_pressure(cmH2O(25), cmH2O(10));
  const Elastance ecw = chest_wall_elastance(cmH2O(4), mL(500));
  const Elastance el = lung_elastance(dp, cmH2O(4), mL(500));
  const Elastance ers = respiratory_system_elastance(dp, mL(500));
  EXPECT_NEAR(in_cmH2O_per_L(ecw), 8.0, 1e-9);
  EXPECT_NEAR(in_cmH2O_per_L(el), 22.0, 1e-9);
  EXPECT_NEAR(in_cmH2O_per_L(ers), 30.0, 1e-9);
  EXPECT_NEAR(in_cmH2O_per_L(ecw + el), in_cmH2O_per_L(ers), 1e-9);  // identity Ers = EL + Ecw
  EXPECT_NEAR(in_fraction(chest_wall_elastance_ratio(ecw, ers)), 0.26667, 1e-5);
  EXPECT_NEAR(in_cmH2O(transpulmonary_pressure_end_expiratory(cmH2O(10), cmH2O(8))), 2.0, 1e-9);
  EXPECT_NEAR(in_cmH2O(transpulmonary_pressure_end_inspiratory(cmH2O(25), el, ers)), 18.333, 1e-3);
}

TEST(Analysis, OnlyWhatInputsAllow) {
  MechanicsInputs in;
  in.vt = mL(500);
  in.pplat = cmH2O(25);
  in.peep_total = cmH2O(10);
  const MechanicsResults r = analyse_mechanics(in);
  ASSERT_TRUE(r.driving_pressure);
  ASSERT_TRUE(r.compliance_static);
  EXPECT_FALSE(r.pbw);
  EXPECT_FALSE(r.mechanical_power);
  bool pbw_skipped = false;
  for (const auto& s : r.skipped) pbw_skipped |= s.key == "pbw";
  EXPECT_TRUE(pbw_skipped);
}

const Skipped* skipped(const MechanicsResults& r, const std::string& key) {
  for (const auto& s : r.skipped) {
    if (s.key == key) return &s;
  }
  return nullptr;
}
std::vector<std::string> need_ids(const Skipped& s) {
  std::vector<std::string> out;
  for (const Need& n : s.needs) out.push_back(n.field + (n.value.empty() ? "" : "=" + n.value));
  return out;
}
bool has_note(const MechanicsResults& r, MechanicsNote n) {
  return std::find(r.notes.begin(), r.notes.end(), n) != r.notes.end();
}

TEST(Analysis, SkippedResultsNameRegistryFields) {
  // Which inputs each formula needs (the formulas above; common practice, no source).
  const MechanicsResults r = analyse_mechanics(MechanicsInputs{});
  ASSERT_TRUE(skipped(r, "pbw"));
  EXPECT_EQ(need_ids(*skipped(r, "pbw")), (std::vector<std::string>{"sex", "height"}));
  ASSERT_TRUE(skipped(r, "intrinsic_peep"));
  EXPECT_EQ(need_ids(*skipped(r, "intrinsic_peep")),
            (std::vector<std::string>{"peep_total", "set_peep"}));
  ASSERT_TRUE(skipped(r, "resistance_airway"));
  EXPECT_EQ(need_ids(*skipped(r, "resistance_airway")),
            (std::vector<std::string>{"ppeak", "pplat", "flow", "mode=vc"}));
  ASSERT_TRUE(skipped(r, "ventilatory_ratio"));
  const Need& ve = skipped(r, "ventilatory_ratio")->needs.front();
  EXPECT_EQ(ve.field, "ve");
  EXPECT_EQ(ve.or_fields, (std::vector<std::string>{"vt", "rr"}));
  // On the command line a need reads as options, in a trial report as file keys.
  EXPECT_EQ(need_text(ve, FieldContext::command_line), "--ve (or --vt and --rr)");
  EXPECT_EQ(need_text(Need{"peep_total"}, FieldContext::trial_file), "hold.peep_total");
}

TEST(Analysis, NotesAreTypedAndWordedByThePresenter) {
  // Set PEEP standing in for total PEEP, VC assumed without a mode, VE = VT x RR
  // (common practice, no source).
  MechanicsInputs in;
  in.vt = mL(500);
  in.rr = per_min(20);
  in.set_peep = cmH2O(5);
  in.pplat = cmH2O(20);
  const MechanicsResults r = analyse_mechanics(in);
  EXPECT_EQ(r.notes, (std::vector<MechanicsNote>{MechanicsNote::set_peep_stands_in,
                                                 MechanicsNote::volume_control_assumed,
                                                 MechanicsNote::minute_ventilation_from_vt_rr}));
  const Answer cli = describe_mechanics(in, r, Thresholds::built_in());
  ASSERT_EQ(cli.notes.size(), 3u);
  EXPECT_NE(cli.notes[0].find("(--peep-total)"), std::string::npos) << cli.notes[0];
  EXPECT_EQ(cli.notes[1], "No --mode given: volume control with constant flow is assumed.");
  EXPECT_EQ(cli.notes[2], "Minute ventilation taken as VT x RR (no --ve given).");
  const Answer file = describe_mechanics(in, r, Thresholds::built_in(), FieldContext::trial_file);
  EXPECT_EQ(file.context, FieldContext::trial_file);
  EXPECT_NE(file.notes[0].find("(hold.peep_total)"), std::string::npos) << file.notes[0];
  EXPECT_EQ(file.notes[1],
            "No ventilator.mode given: volume control with constant flow is assumed.");
  // A trial file has no minute-ventilation field: the note names none.
  EXPECT_EQ(file.notes[2], "Minute ventilation taken as VT x RR.");
  for (const auto& n : file.notes) EXPECT_EQ(n.find("--"), std::string::npos) << n;
}

TEST(Analysis, OesophagealSwingOutsideZeroToDrivingPressureIsRefused) {
  // Ers = EL + Ecw with both positive (Gattinoni/Chiumello, AJRCCM 2008;178:346, from memory;
  // Akoumianaki et al., AJRCCM 2014;189:520): dPes 16 cmH2O above dP 15 would give EL < 0 and
  // Ecw/Ers > 1, so the partition is refused as a result and only a note remains.
  MechanicsInputs in;
  in.vt = mL(500);
  in.pplat = cmH2O(25);
  in.peep_total = cmH2O(10);
  in.pes_ee = cmH2O(4);
  in.pes_ei = cmH2O(20);
  MechanicsResults r = analyse_mechanics(in);
  ASSERT_TRUE(r.oesophageal_swing);
  EXPECT_NEAR(in_cmH2O(*r.oesophageal_swing), 16.0, 1e-9);
  EXPECT_TRUE(has_note(r, MechanicsNote::oesophageal_swing_unreliable));
  EXPECT_FALSE(r.elastance_lung);
  EXPECT_FALSE(r.elastance_chest_wall);
  EXPECT_FALSE(r.elastance_ratio_cw_rs);
  EXPECT_FALSE(r.transpulmonary_pressure_ei);
  EXPECT_NE(mechanics_note_text(MechanicsNote::oesophageal_swing_unreliable, r).find("16.0 cmH2O"),
            std::string::npos);
  // A negative swing (Pes falling on inspiration) would give Ecw < 0: refused the same way.
  in.pes_ei = cmH2O(2);
  r = analyse_mechanics(in);
  EXPECT_TRUE(has_note(r, MechanicsNote::oesophageal_swing_unreliable));
  EXPECT_FALSE(r.elastance_chest_wall);
  EXPECT_FALSE(r.elastance_ratio_cw_rs);
  in.pes_ei = cmH2O(8);  // dPes 4 inside 0 to 15
  r = analyse_mechanics(in);
  EXPECT_FALSE(has_note(r, MechanicsNote::oesophageal_swing_unreliable));
  ASSERT_TRUE(r.elastance_ratio_cw_rs);
  EXPECT_NEAR(in_fraction(*r.elastance_ratio_cw_rs), 4.0 / 15.0, 1e-9);
}

TEST(Mechanics, DirectEndInspiratoryTranspulmonaryPressure) {
  // Talmor et al., N Engl J Med 2008;359:2095: PL,ei = Pplat - Pes,ei = 25 - 12 = 13 cmH2O.
  EXPECT_NEAR(in_cmH2O(transpulmonary_pressure_end_inspiratory_direct(cmH2O(25), cmH2O(12))), 13.0,
              1e-9);
}

TEST(Analysis, DirectAndElastanceDerivedTranspulmonaryPressureSideBySide) {
  // VT 500, Pplat 25, PEEP 10, Pes 8 -> 12: direct PL,ei = 25 - 12 = 13 cmH2O (Talmor et al.,
  // NEJM 2008;359:2095); elastance-derived 25 x 11/15 = 18.33 cmH2O (Chiumello et al., AJRCCM
  // 2008;178:346, from memory). Both are given; the presenter labels them apart.
  MechanicsInputs in;
  in.vt = mL(500);
  in.pplat = cmH2O(25);
  in.peep_total = cmH2O(10);
  in.pes_ee = cmH2O(8);
  in.pes_ei = cmH2O(12);
  const MechanicsResults r = analyse_mechanics(in);
  ASSERT_TRUE(r.transpulmonary_pressure_ei_direct && r.transpulmonary_pressure_ei);
  EXPECT_NEAR(in_cmH2O(*r.transpulmonary_pressure_ei_direct), 13.0, 1e-9);
  EXPECT_NEAR(in_cmH2O(*r.transpulmonary_pressure_ei), 25.0 * 11.0 / 15.0, 1e-9);
  const Answer a = describe_mechanics(in, r, Thresholds::built_in());
  std::vector<std::string> keys;
  for (const Item& i : a.results) keys.push_back(i.key);
  const auto direct = std::find(keys.begin(), keys.end(), "transpulmonary_pressure_ei_direct");
  const auto derived = std::find(keys.begin(), keys.end(), "transpulmonary_pressure_ei");
  ASSERT_NE(direct, keys.end());
  ASSERT_NE(derived, keys.end());
  EXPECT_EQ(derived - direct, 1);  // beside each other
}

TEST(Analysis, NegativeIntrinsicPeepIsANoteNeverAValue) {
  // PEEPi = total PEEP - set PEEP cannot be below zero (Akoumianaki et al., AJRCCM
  // 2014;189:520, from memory): total 8 with set 10 reads as a leak or a short hold.
  MechanicsInputs in;
  in.peep_total = cmH2O(8);
  in.set_peep = cmH2O(10);
  const MechanicsResults r = analyse_mechanics(in);
  EXPECT_FALSE(r.intrinsic_peep);
  ASSERT_TRUE(r.intrinsic_peep_below_zero);
  EXPECT_NEAR(in_cmH2O(*r.intrinsic_peep_below_zero), -2.0, 1e-9);
  EXPECT_TRUE(has_note(r, MechanicsNote::intrinsic_peep_negative));
  const std::string text = mechanics_note_text(MechanicsNote::intrinsic_peep_negative, r);
  EXPECT_NE(text.find("2.0 cmH2O"), std::string::npos) << text;
  EXPECT_NE(text.find("leak"), std::string::npos) << text;
  const Answer a = describe_mechanics(in, r, Thresholds::built_in());
  for (const Item& i : a.results) EXPECT_NE(i.key, "intrinsic_peep");
}

TEST(Analysis, IntrinsicPeepFromTwoCmH2OAndNegativeEndExpiratoryPlAreFlagged) {
  // Intrinsic PEEP >= 2 cmH2O (mechanics.intrinsic_peep_flag; common practice, no source) and
  // PL,ee below 0 cmH2O (Talmor et al., NEJM 2008;359:2095: PEEP kept PL,ee between 0 and 10).
  const Thresholds limits = Thresholds::built_in();
  MechanicsInputs in;
  in.peep_total = cmH2O(12);
  in.set_peep = cmH2O(10);  // PEEPi 2: flagged from the limit on
  in.pes_ee = cmH2O(14);    // PL,ee = 12 - 14 = -2 cmH2O
  MechanicsResults r = analyse_mechanics(in);
  EXPECT_EQ(mechanics_breaches(in, r, limits),
            (std::vector<MechanicsLimit>{MechanicsLimit::intrinsic_peep,
                                         MechanicsLimit::transpulmonary_pressure_ee}));
  const auto flags = mechanics_flags(in, r, limits);
  ASSERT_EQ(flags.size(), 2u);
  EXPECT_NE(flags[0].message.find("Intrinsic PEEP 2.0 cmH2O"), std::string::npos);
  EXPECT_NE(flags[1].message.find("-2.0 cmH2O is below 0.0 cmH2O"), std::string::npos)
      << flags[1].message;
  EXPECT_NE(flags[1].source.find("Talmor"), std::string::npos);
  in.peep_total = cmH2O(11.5);  // PEEPi 1.5, PL,ee -2.5: only the PL,ee flag
  in.pes_ee = cmH2O(14);
  r = analyse_mechanics(in);
  EXPECT_EQ(mechanics_breaches(in, r, limits),
            (std::vector<MechanicsLimit>{MechanicsLimit::transpulmonary_pressure_ee}));
  in.pes_ee = cmH2O(11.5);  // PL,ee exactly 0: not below the limit
  r = analyse_mechanics(in);
  EXPECT_TRUE(mechanics_breaches(in, r, limits).empty());
}

TEST(Validation, FlowTimeLongerThanTiIsAContradiction) {
  // Constant-flow VC: VT / flow is the time the flow takes (common practice, no source):
  // 500 mL at 20 L/min takes 1.5 s, longer than Ti 1.0 s.
  const Thresholds limits = Thresholds::built_in();
  EXPECT_NEAR(in_seconds(inspiratory_flow_time(mL(500), L_per_min(20))), 1.5, 1e-9);
  MechanicsInputs in;
  in.vt = mL(500);
  in.flow = L_per_min(20);
  in.ti = seconds(1.0);
  in.rr = per_min(20);
  try {
    validate_mechanics(in, limits);
    FAIL() << "VT/flow 1.5 s > Ti 1.0 s accepted";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "flow");
    EXPECT_NE(std::string(e.what()).find("1.50 s"), std::string::npos) << e.what();
  }
  in.flow = L_per_min(30);  // 500 mL in exactly 1.0 s: fits
  EXPECT_NO_THROW(validate_mechanics(in, limits));
  in.flow = L_per_min(20);
  in.mode = VentMode::pressure_control;  // PC flow is not constant: no such check
  EXPECT_NO_THROW(validate_mechanics(in, limits));
}

TEST(Analysis, PressureControlTotalOrAbovePeepGiveTheSameResults) {
  // PC set 15 above set PEEP 10 is 25 total (common practice, no source). Without a plateau
  // hold, dP = 25 - 10 = 15 cmH2O assuming zero end-inspiratory flow, and the PC power is
  // 0.098 x 20 x 0.5 x (10 + 15) = 24.5 J/min (Becher et al., ICM 2019, from memory).
  MechanicsInputs total;
  total.mode = VentMode::pressure_control;
  total.set_peep = cmH2O(10);
  total.peep_total = cmH2O(10);
  total.vt = mL(500);
  total.rr = per_min(20);
  total.ti = seconds(1.0);
  total.pc_pressure_total = cmH2O(25);
  MechanicsInputs above = total;
  above.pc_pressure_total.reset();
  above.pc_pressure_above_peep = cmH2O(15);
  for (const MechanicsInputs& in : {total, above}) {
    const MechanicsResults r = analyse_mechanics(in);
    ASSERT_TRUE(r.driving_pressure && r.mechanical_power && r.pc_pressure_total);
    EXPECT_NEAR(in_cmH2O(*r.pc_pressure_total), 25.0, 1e-9);
    EXPECT_NEAR(in_cmH2O(*r.driving_pressure), 15.0, 1e-9);
    EXPECT_NEAR(in_J_per_min(*r.mechanical_power), 24.5, 1e-9);
    EXPECT_TRUE(has_note(r, MechanicsNote::driving_pressure_from_set_pressure));
    const std::string text =
        mechanics_note_text(MechanicsNote::driving_pressure_from_set_pressure, r);
    EXPECT_NE(text.find("zero flow at end-inspiration"), std::string::npos) << text;
  }
  // With a plateau hold the hold is used and there is no such note (Amato et al. 2015).
  MechanicsInputs held = total;
  held.pplat = cmH2O(23);
  const MechanicsResults r = analyse_mechanics(held);
  EXPECT_NEAR(in_cmH2O(*r.driving_pressure), 13.0, 1e-9);
  EXPECT_FALSE(has_note(r, MechanicsNote::driving_pressure_from_set_pressure));
  // The two ways of stating it together are refused.
  MechanicsInputs both = total;
  both.pc_pressure_above_peep = cmH2O(15);
  try {
    validate_mechanics(both, Thresholds::built_in());
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "pc_pressure_above_peep");
  }
}

TEST(Analysis, FlagsPublishedLimits) {
  const Thresholds limits = Thresholds::built_in();
  MechanicsInputs in;
  in.sex = Sex::male;
  in.height = cm(170);
  in.vt = mL(700);            // 700 / 66.0 kg PBW = 10.6 mL/kg > 8 (ARDS Network 2000)
  in.pplat = cmH2O(32);       // > 30 (ARDS Network 2000)
  in.peep_total = cmH2O(14);  // dP 18 > 15 (Amato 2015)
  in.ppeak = cmH2O(38);
  in.rr =
      per_min(20);  // power 0.098 x 20 x 0.7 x 29 = 39.8 > 17 J/min (Serpa Neto 2018, from memory)
  const MechanicsResults r = analyse_mechanics(in);
  EXPECT_EQ(mechanics_breaches(in, r, limits),
            (std::vector<MechanicsLimit>{MechanicsLimit::vt_per_kg_pbw, MechanicsLimit::pplat,
                                         MechanicsLimit::driving_pressure,
                                         MechanicsLimit::mechanical_power}));
  const auto flags = mechanics_flags(in, r, limits);
  std::vector<std::string> keys;
  for (const auto& f : flags) keys.push_back(f.key);
  EXPECT_EQ(keys, (std::vector<std::string>{"vt_per_kg_pbw", "pplat", "driving_pressure",
                                            "mechanical_power"}));
}

TEST(Analysis, NoFlagAtTheLimitItself) {
  // Limits are "above" limits: dP exactly 15 cmH2O is not flagged (Amato 2015 alarm is > 15).
  const Thresholds limits = Thresholds::built_in();
  MechanicsInputs in;
  in.vt = mL(450);
  in.pplat = cmH2O(25);
  in.peep_total = cmH2O(10);
  const auto flags = mechanics_flags(in, analyse_mechanics(in), limits);
  EXPECT_TRUE(flags.empty());
  // Pplat exactly 30 cmH2O written in kPa (2.941995 kPa, NIST SP 811) is on the ARDS Network
  // limit, not above it, whatever the rounding of the conversion.
  in.pplat = kPa(2.941995);
  in.peep_total = cmH2O(20);
  EXPECT_TRUE(mechanics_breaches(in, analyse_mechanics(in), limits).empty());
}

TEST(Validation, ContradictionsAreErrors) {
  const Thresholds limits = Thresholds::built_in();
  MechanicsInputs in;
  in.pplat = cmH2O(8);
  in.peep_total = cmH2O(10);
  EXPECT_THROW(validate_mechanics(in, limits), InputError);  // Pplat < PEEP
  in.pplat = cmH2O(25);
  in.ppeak = cmH2O(20);
  EXPECT_THROW(validate_mechanics(in, limits), InputError);  // Ppeak < Pplat
  in.ppeak = cmH2O(30);
  EXPECT_NO_THROW(validate_mechanics(in, limits));
}

TEST(Validation, PlausibilityRangesFromPresets) {
  // presets/plausibility.toml (common practice, no source): PEEP 0-30 cmH2O.
  Thresholds limits = Thresholds::built_in();
  MechanicsInputs in;
  in.peep_total = cmH2O(35);
  try {
    validate_mechanics(in, limits);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "peep_total");  // the registry id, not the range's name
    EXPECT_NE(std::string(e.what()).find("0 to 30 cmH2O"), std::string::npos) << e.what();
  }
  limits.allow_implausible(true);
  EXPECT_NO_THROW(validate_mechanics(in, limits));
}

}  // namespace
}  // namespace bb
