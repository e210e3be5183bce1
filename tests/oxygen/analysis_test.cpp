// analyse_oxygen, validate_oxygen, oxygen_flags and describe_oxygen: what is
// computed from which inputs, what is refused, and what the answer says.
#include <gtest/gtest.h>

#include <algorithm>

#include "breathbeat/oxygen.hpp"
#include "breathbeat/present/oxygen.hpp"

namespace bb {
namespace {

bool has_skipped(const OxygenResults& r, const std::string& key) {
  return std::any_of(r.skipped.begin(), r.skipped.end(),
                     [&](const Skipped& s) { return s.key == key; });
}
bool has_flag(const std::vector<Flag>& flags, const std::string& key) {
  return std::any_of(flags.begin(), flags.end(), [&](const Flag& f) { return f.key == key; });
}
bool has_note(const OxygenResults& r, OxygenNote n) {
  return std::find(r.notes.begin(), r.notes.end(), n) != r.notes.end();
}
bool any_note_contains(const std::vector<std::string>& notes, const std::string& text) {
  return std::any_of(notes.begin(), notes.end(),
                     [&](const std::string& n) { return n.find(text) != std::string::npos; });
}
// The notes as the command line words them.
std::vector<std::string> note_texts(const OxygenInputs& in, const OxygenResults& r,
                                    const Thresholds& limits,
                                    FieldContext context = FieldContext::command_line) {
  return describe_oxygen(in, r, limits, context).notes;
}

// A hand-worked arterial check case (Marino, The ICU Book, from memory): Hb 15 g/dL, SaO2 0.98,
// PaO2 100 mmHg, CO 5 L/min; room air at sea level with PaCO2 40 mmHg.
OxygenInputs arterial_check_case() {
  OxygenInputs in;
  in.hb = g_per_dL(15);
  in.sao2 = fraction(0.98);
  in.pao2 = mmHg(100);
  in.co = L_per_min(5);
  in.fio2 = fraction(0.21);
  in.paco2 = mmHg(40);
  return in;
}

std::string validation_error(const OxygenInputs& in, const Thresholds& limits) {
  try {
    validate_oxygen(in, limits);
  } catch (const InputError& e) {
    return e.field() + ": " + e.what();
  }
  return "";
}

class OxygenAnalysis : public ::testing::Test {
 protected:
  Thresholds limits = Thresholds::built_in();
};

TEST_F(OxygenAnalysis, HandWorkedArterialCaseGivesTheCheckValues) {
  const OxygenInputs in = arterial_check_case();
  validate_oxygen(in, limits);
  const OxygenResults r = analyse_oxygen(in, limits);
  // CaO2 20.0 mL/dL and DO2 1000 mL/min (hand-worked on Marino, The ICU Book, from memory).
  ASSERT_TRUE(r.cao2 && r.do2);
  EXPECT_NEAR(in_mL_per_dL(*r.cao2), 20.0, 0.05);
  EXPECT_NEAR(in_mL_per_min(*r.do2), 1000.0, 0.5);
  // PAO2 99.7 mmHg at FiO2 0.21, Pb 760, PaCO2 40, R 0.8 (hand-worked; West, Respiratory
  // Physiology, from memory).
  ASSERT_TRUE(r.pao2_alveolar && r.aa_gradient);
  EXPECT_NEAR(in_mmHg(*r.pao2_alveolar), 99.7, 0.05);
  EXPECT_NEAR(in_mmHg(*r.aa_gradient), -0.27, 1e-9);  // PaO2 100 is above PAO2 99.73
  EXPECT_TRUE(has_note(r, OxygenNote::pao2_above_alveolar));
  const auto notes = note_texts(in, r, limits);
  EXPECT_TRUE(any_note_contains(notes, "PaO2 is above the computed alveolar PO2"));
  // The presets were used for Pb, PH2O and R, and the answer says so and names the options.
  EXPECT_TRUE(has_note(r, OxygenNote::alveolar_gas_presets));
  EXPECT_TRUE(any_note_contains(notes, "presets where not given; set with --pb, --ph2o, --rq"));
  // A trial file has no such fields: the note names none (and no option).
  const auto in_file = note_texts(in, r, limits, FieldContext::trial_file);
  EXPECT_TRUE(any_note_contains(in_file, "R 0.80 (presets where not given)."));
  for (const auto& n : in_file) EXPECT_EQ(n.find("--"), std::string::npos) << n;
  // Nothing venous was given: those results are skipped with what they need.
  EXPECT_TRUE(has_skipped(r, "vo2"));
  EXPECT_TRUE(has_skipped(r, "cvo2"));
  EXPECT_TRUE(has_skipped(r, "shunt_fraction"));
  EXPECT_TRUE(has_skipped(r, "do2i"));
}

TEST_F(OxygenAnalysis, VenousSideGivesConsumptionExtractionAndShunt) {
  OxygenInputs in = arterial_check_case();
  in.fio2 = fraction(1.0);
  in.pao2 = mmHg(400);
  in.sao2 = fraction(1.0);
  in.svo2 = fraction(0.75);
  in.pvo2 = mmHg(40);
  validate_oxygen(in, limits);
  const OxygenResults r = analyse_oxygen(in, limits);
  // Hand arithmetic (West; Marino): CaO2 21.3, CvO2 15.195 mL/dL; VO2 = 5 * 6.105 * 10 = 305.25
  // mL/min; O2ER = 6.105 / 21.3 = 0.2866; Qs/Qt = 0.789 / 6.894 = 0.11445.
  ASSERT_TRUE(r.cvo2 && r.vo2 && r.o2_extraction && r.shunt_fraction);
  EXPECT_NEAR(in_mL_per_dL(*r.cvo2), 15.195, 1e-9);
  EXPECT_NEAR(in_mL_per_min(*r.vo2), 305.25, 1e-6);
  EXPECT_NEAR(in_fraction(*r.o2_extraction), 6.105 / 21.3, 1e-9);
  EXPECT_NEAR(in_fraction(*r.shunt_fraction), 0.789 / 6.894, 1e-9);
  EXPECT_TRUE(has_note(r, OxygenNote::shunt_is_venous_admixture));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits), "venous admixture"));
}

TEST_F(OxygenAnalysis, ContentWithoutPartialPressureLeavesOutDissolvedO2AndSaysSo) {
  OxygenInputs in;
  in.hb = g_per_dL(15);
  in.sao2 = fraction(0.98);
  const OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.cao2);
  EXPECT_NEAR(in_mL_per_dL(*r.cao2), 19.698, 1e-9);  // 1.34 * 15 * 0.98 (Marino)
  EXPECT_TRUE(has_note(r, OxygenNote::cao2_without_dissolved));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits),
                                "CaO2 leaves out dissolved O2 because no --pao2 was given"));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits, FieldContext::trial_file),
                                "CaO2 leaves out dissolved O2 because no gases.pao2 was given"));
}

TEST_F(OxygenAnalysis, IndexedDeliveryFromCardiacIndexOrFromCoAndBsa) {
  OxygenInputs in = arterial_check_case();
  in.height = cm(180);
  in.weight = kg(80);
  in.bsa_formula = BsaFormula::mosteller;  // 2.00 m2 (Mosteller, NEJM 1987;317:1098, by hand)
  OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.bsa && r.do2i && r.ci_used);
  EXPECT_NEAR(in_square_metre(*r.bsa), 2.0, 1e-12);
  EXPECT_NEAR(in_mL_per_min_per_m2(*r.do2i), 999.9 / 2.0, 1e-6);  // DO2 / BSA
  EXPECT_NEAR(in_L_per_min_per_m2(*r.ci_used), 2.5, 1e-12);

  // A given CI is used for DO2I as it is: 3 L/min/m2 * 19.998 mL/dL * 10 = 599.94 mL/min/m2.
  in.ci = L_per_min_per_m2(3.0);
  r = analyse_oxygen(in, limits);
  EXPECT_NEAR(in_mL_per_min_per_m2(*r.do2i), 599.94, 1e-6);
  EXPECT_TRUE(has_note(r, OxygenNote::ci_differs_from_co_over_bsa));
  ASSERT_TRUE(r.ci_from_co);
  EXPECT_NEAR(in_L_per_min_per_m2(*r.ci_from_co), 2.5, 1e-12);  // 5 L/min / 2 m2
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits),
                                "CO / BSA (2.50 L/min/m2) differs from the given CI (3.00"));

  // Only CI and BSA: CO is taken as CI x BSA = 6 L/min, DO2 = 1199.88 mL/min.
  in.co.reset();
  r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.do2);
  EXPECT_NEAR(in_mL_per_min(*r.do2), 1199.88, 1e-6);
  EXPECT_TRUE(has_note(r, OxygenNote::co_from_ci_and_bsa));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits),
                                "Cardiac output taken as CI x BSA (6.00 L/min; no --co given)."));
}

TEST_F(OxygenAnalysis, DuBoisIsTheDefaultBsaFormula) {
  OxygenInputs in;
  in.height = cm(175);
  in.weight = kg(70);
  const OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.bsa);
  // 1.8481 m2 by hand (Du Bois & Du Bois, Arch Intern Med 1916;17:863; see formulas_test).
  EXPECT_NEAR(in_square_metre(*r.bsa), 1.8481, 5e-4);
}

TEST_F(OxygenAnalysis, BerlinCategoryIsConditionalWithoutPeep) {
  OxygenInputs in;
  in.pao2 = mmHg(75);
  in.fio2 = fraction(0.5);  // P/F 150: moderate (ARDS Definition Task Force, JAMA 2012;307:2526)
  OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.berlin);
  EXPECT_EQ(r.berlin->category, BerlinCategory::moderate);
  EXPECT_EQ(r.berlin->peep_condition, GateState::unknown);
  Answer a = describe_oxygen(in, r, limits);
  ASSERT_TRUE(a.reading);
  EXPECT_EQ(a.reading->category, "moderate");
  EXPECT_NE(a.reading->text.find("Conditional"), std::string::npos);
  EXPECT_NE(a.reading->text.find("no PEEP was given (--peep-total)"), std::string::npos);
  ASSERT_EQ(a.gates.size(), 1u);
  EXPECT_EQ(a.gates[0].state, GateState::unknown);
  EXPECT_EQ(a.gates[0].detail, "no --peep-total given");
  const Answer in_file = describe_oxygen(in, r, limits, FieldContext::trial_file);
  EXPECT_NE(in_file.reading->text.find("no PEEP was given (hold.peep_total)"), std::string::npos);

  // PEEP 5 cmH2O meets the condition (PEEP >= 5, JAMA 2012;307:2526).
  in.peep = cmH2O(5);
  r = analyse_oxygen(in, limits);
  EXPECT_EQ(r.berlin->peep_condition, GateState::met);
  a = describe_oxygen(in, r, limits);
  EXPECT_EQ(a.reading->category, "moderate");
  EXPECT_EQ(a.reading->text.find("Conditional"), std::string::npos);
  EXPECT_TRUE(has_flag(a.flags, "pf_ratio"));

  // PEEP 4 cmH2O: the Berlin categories do not apply.
  in.peep = cmH2O(4);
  r = analyse_oxygen(in, limits);
  EXPECT_EQ(r.berlin->peep_condition, GateState::failed);
  a = describe_oxygen(in, r, limits);
  EXPECT_EQ(a.reading->category, "not_applicable");
  EXPECT_EQ(a.gates[0].state, GateState::failed);
  EXPECT_FALSE(has_flag(a.flags, "pf_ratio"));
}

TEST_F(OxygenAnalysis, SpO2FiO2CriterionNeedsSpO2AtOrBelow97) {
  // Matthay et al., AJRCCM 2024: S/F <= 315 with SpO2 <= 97 % meets the oxygenation criterion.
  OxygenInputs in;
  in.spo2 = percent(94);
  in.fio2 = fraction(0.3);  // S/F 313.3
  OxygenResults r = analyse_oxygen(in, limits);
  EXPECT_NEAR(*r.sf_ratio, 94.0 / 0.3, 1e-9);
  EXPECT_TRUE(has_flag(oxygen_flags(in, r, limits), "sf_ratio"));
  EXPECT_EQ(oxygen_breaches(in, r, limits), std::vector<OxygenLimit>{OxygenLimit::sf_ratio_ards});

  in.fio2 = fraction(0.29);  // S/F 324.1: above 315
  r = analyse_oxygen(in, limits);
  EXPECT_FALSE(has_flag(oxygen_flags(in, r, limits), "sf_ratio"));

  in.spo2 = percent(98);
  in.fio2 = fraction(0.4);  // S/F 245 but SpO2 98 %: not a criterion
  r = analyse_oxygen(in, limits);
  EXPECT_FALSE(*r.sf_interpretable);
  EXPECT_FALSE(has_flag(oxygen_flags(in, r, limits), "sf_ratio"));
  EXPECT_TRUE(has_note(r, OxygenNote::sf_spo2_above_limit));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits), "SpO2 is above 97 %: on the flat part"));

  in.spo2 = percent(97);  // exactly on the limit: still a criterion
  r = analyse_oxygen(in, limits);
  EXPECT_TRUE(*r.sf_interpretable);
  EXPECT_TRUE(has_flag(oxygen_flags(in, r, limits), "sf_ratio"));
}

TEST_F(OxygenAnalysis, ExpectedAaGradientIsANote) {
  OxygenInputs in = arterial_check_case();
  in.pao2 = mmHg(70);
  in.age_years = 60;  // 60/4 + 4 = 19 mmHg (textbook rule, from memory)
  const OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.aa_gradient_expected);
  EXPECT_NEAR(in_mmHg(*r.aa_gradient_expected), 19.0, 1e-12);
  // FiO2 0.21 is room air: the note has no caveat about a higher FiO2.
  EXPECT_TRUE(has_note(r, OxygenNote::aa_gradient_expected));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits),
                                "Expected A-a gradient for age 60 on room air is about 19.0 mmHg "
                                "(age/4 + 4; textbook rule, from memory)."));
  in.fio2 = fraction(0.4);
  const OxygenResults on_o2 = analyse_oxygen(in, limits);
  EXPECT_TRUE(has_note(on_o2, OxygenNote::aa_gradient_expected_on_oxygen));
  EXPECT_TRUE(
      any_note_contains(note_texts(in, on_o2, limits), "the gradient widens as FiO2 rises"));
}

TEST_F(OxygenAnalysis, OxygenationIndicesNeedMeanAirwayPressure) {
  OxygenInputs in;
  in.fio2 = fraction(0.6);
  in.pao2 = mmHg(80);
  in.spo2 = percent(92);
  OxygenResults r = analyse_oxygen(in, limits);
  EXPECT_FALSE(r.oxygenation_index);
  EXPECT_TRUE(has_skipped(r, "oxygenation_index"));
  in.pmean = cmH2O(20);
  r = analyse_oxygen(in, limits);
  EXPECT_NEAR(*r.oxygenation_index, 15.0, 1e-9);  // PALICC 2015 formula, by hand
  EXPECT_NEAR(*r.oxygen_saturation_index, 1200.0 / 92.0, 1e-9);
}

TEST_F(OxygenAnalysis, OxygenationIndexNotesAnEstimatedMeanAirwayPressure) {
  // OI = FiO2 x Pmean x 100 / PaO2 (PALICC, Pediatr Crit Care Med 2015): 0.6 x 20 x 100 / 80
  // = 15.0 either way; only an estimated Pmean carries a note (and an item note).
  OxygenInputs in;
  in.fio2 = fraction(0.6);
  in.pao2 = mmHg(80);
  in.pmean = cmH2O(20);
  OxygenResults r = analyse_oxygen(in, limits);
  EXPECT_NEAR(*r.oxygenation_index, 15.0, 1e-9);
  EXPECT_FALSE(has_note(r, OxygenNote::pmean_estimated));
  in.pmean_estimated = true;
  r = analyse_oxygen(in, limits);
  EXPECT_NEAR(*r.oxygenation_index, 15.0, 1e-9);
  EXPECT_TRUE(has_note(r, OxygenNote::pmean_estimated));
  const Answer file = describe_oxygen(in, r, limits, FieldContext::trial_file);
  EXPECT_TRUE(any_note_contains(file.notes, "estimated mean airway pressure (20.0 cmH2O"));
  EXPECT_TRUE(any_note_contains(file.notes, "give ventilator.pmean"));
  for (const Item& i : file.results) {
    if (i.key == "oxygenation_index") EXPECT_EQ(i.note, "estimated Pmean");
  }
}

TEST_F(OxygenAnalysis, ArteriovenousContentsTreatDissolvedO2AlikeOnBothSides) {
  // CxO2 = 1.34 Hb SxO2 + 0.003 PxO2 (Marino, The ICU Book; Nunn's Applied Respiratory
  // Physiology; textbook values, from memory). Without PvO2 both sides are Hb-bound only:
  // O2ER = (SaO2 - SvO2) / SaO2 = (0.91 - 0.64) / 0.91 = 0.297 (hand-worked), not
  // (11.950 + 0.204 - 8.404) / 12.154 = 0.309 with dissolved O2 on the arterial side only
  // (Hb 9.8 g/dL, PaO2 68 mmHg: the demo's first step).
  OxygenInputs in;
  in.hb = g_per_dL(9.8);
  in.sao2 = fraction(0.91);
  in.pao2 = mmHg(68);
  in.svo2 = fraction(0.64);
  in.co = L_per_min(5.6);
  OxygenResults r = analyse_oxygen(in, limits);
  ASSERT_TRUE(r.o2_extraction && r.vo2 && r.cao2 && r.av_content_basis);
  EXPECT_EQ(*r.av_content_basis, O2ContentBasis::haemoglobin_bound);
  EXPECT_NEAR(in_fraction(*r.o2_extraction), 0.27 / 0.91, 1e-9);
  // VO2 = CO x 1.34 x Hb x (SaO2 - SvO2) = 5.6 x 1.34 x 9.8 x 0.27 x 10 = 198.55 mL/min.
  EXPECT_NEAR(in_mL_per_min(*r.vo2), 5.6 * 1.34 * 9.8 * 0.27 * 10.0, 1e-6);
  // CaO2 as shown (and DO2) keeps its dissolved O2: 1.34 x 9.8 x 0.91 + 0.003 x 68 = 12.154.
  EXPECT_NEAR(in_mL_per_dL(*r.cao2), 1.34 * 9.8 * 0.91 + 0.003 * 68, 1e-9);
  EXPECT_TRUE(has_note(r, OxygenNote::av_difference_haemoglobin_bound));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits), "Hb-bound O2 on both sides"));
  EXPECT_TRUE(any_note_contains(note_texts(in, r, limits), "give --pvo2 to include it"));
  // The demo's first step read 0.309 (above 0.30) with dissolved O2 on the arterial side only:
  // the usual-range flag (Marino, The ICU Book: 0.20-0.30) no longer trips at 0.297.
  EXPECT_FALSE(has_flag(oxygen_flags(in, r, limits), "o2_extraction"));
  // With PvO2 too, dissolved O2 is included on both sides: (12.154 - (8.405 + 0.12)) / 12.154.
  in.pvo2 = mmHg(40);
  r = analyse_oxygen(in, limits);
  EXPECT_EQ(*r.av_content_basis, O2ContentBasis::with_dissolved);
  const double ca = 1.34 * 9.8 * 0.91 + 0.003 * 68, cv = 1.34 * 9.8 * 0.64 + 0.003 * 40;
  EXPECT_NEAR(in_fraction(*r.o2_extraction), (ca - cv) / ca, 1e-9);
  EXPECT_FALSE(has_note(r, OxygenNote::av_difference_haemoglobin_bound));
}

TEST_F(OxygenAnalysis, ExtractionAndDeliveryFlags) {
  OxygenInputs in;
  in.hb = g_per_dL(10);
  in.sao2 = fraction(0.95);
  in.svo2 = fraction(0.55);  // O2ER = 0.40/0.95 = 0.42 (bound part only), above 0.30 (textbook)
  in.ci = L_per_min_per_m2(2.0);  // DO2I = 2 * 12.73 * 10 = 254.6, below 500 (from memory)
  const OxygenResults r = analyse_oxygen(in, limits);
  const auto flags = oxygen_flags(in, r, limits);
  EXPECT_TRUE(has_flag(flags, "o2_extraction"));
  EXPECT_TRUE(has_flag(flags, "do2i"));
  EXPECT_EQ(oxygen_breaches(in, r, limits),
            (std::vector<OxygenLimit>{OxygenLimit::o2_extraction_high, OxygenLimit::do2i_low}));
}

TEST_F(OxygenAnalysis, ThresholdFileChangesTheBindingConstant) {
  // k = 1.39 mL/g is one of the values in use (1.31-1.39; Marino, The ICU Book, from memory):
  // 1.39 * 15 * 0.98 + 0.3 = 20.733 mL/dL.
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text("[oxygen.hb_binding_ml_per_g]\nvalue = 1.39\n", "site.toml");
  const OxygenResults r = analyse_oxygen(arterial_check_case(), site);
  EXPECT_NEAR(in_mL_per_dL(*r.cao2), 20.733, 1e-9);
}

TEST_F(OxygenAnalysis, ImpossibleValuesAreRefusedEvenWhenImplausibleIsAllowed) {
  Thresholds lenient = Thresholds::built_in();
  lenient.allow_implausible(true);
  OxygenInputs in = arterial_check_case();
  in.sao2 = percent(101);
  EXPECT_NE(validation_error(in, lenient).find("sao2: field 'sao2': is above 100 %"),
            std::string::npos);
  in = arterial_check_case();
  in.fio2 = fraction(1.05);
  EXPECT_NE(validation_error(in, lenient).find("fio2: field 'fio2': is above 1.0"),
            std::string::npos);
  in = arterial_check_case();
  in.co = L_per_min(-5);
  EXPECT_NE(validation_error(in, lenient).find("co: field 'co': is negative"), std::string::npos);
  in = arterial_check_case();
  in.co = L_per_min(0);
  EXPECT_NE(validation_error(in, lenient).find("is zero"), std::string::npos);
}

TEST_F(OxygenAnalysis, ContradictionsNameTheField) {
  OxygenInputs in = arterial_check_case();
  in.svo2 = fraction(0.98);  // equal to SaO2
  EXPECT_EQ(validation_error(in, limits).rfind("svo2:", 0), 0u);
  in = arterial_check_case();
  in.pvo2 = mmHg(120);  // above PaO2 100
  EXPECT_EQ(validation_error(in, limits).rfind("pvo2:", 0), 0u);
  in = arterial_check_case();
  in.peco2 = mmHg(40);  // equal to PaCO2
  EXPECT_EQ(validation_error(in, limits).rfind("peco2:", 0), 0u);
}

TEST_F(OxygenAnalysis, FieldsAreNamedByRegistryId) {
  // Total PEEP 0-30 cmH2O (common practice, no source): the error names the field
  // peep_total, whose range is the PEEP range.
  OxygenInputs in = arterial_check_case();
  in.peep = cmH2O(35);
  EXPECT_EQ(validation_error(in, limits).rfind("peep_total:", 0), 0u);
  // DO2 needs CO, or CI with height and weight for BSA (textbook, common practice, no source).
  const OxygenResults r = analyse_oxygen(OxygenInputs{}, limits);
  const auto it = std::find_if(r.skipped.begin(), r.skipped.end(),
                               [](const Skipped& s) { return s.key == "do2"; });
  ASSERT_NE(it, r.skipped.end());
  ASSERT_FALSE(it->needs.empty());
  EXPECT_EQ(it->needs[0].field, "co");
  EXPECT_EQ(it->needs[0].or_fields, (std::vector<std::string>{"ci", "height", "weight"}));
  EXPECT_EQ(need_text(it->needs[0], FieldContext::command_line),
            "--co (or --ci, --height and --weight)");
}

TEST_F(OxygenAnalysis, PlausibilityRangesApplyUnlessOverridden) {
  // FiO2 0.21-1.0, Hb 3-25 g/dL, PaO2 20-700 mmHg (common practice, no source).
  OxygenInputs in = arterial_check_case();
  in.fio2 = fraction(0.15);
  EXPECT_EQ(validation_error(in, limits).rfind("fio2:", 0), 0u);
  Thresholds lenient = Thresholds::built_in();
  lenient.allow_implausible(true);
  EXPECT_EQ(validation_error(in, lenient), "");
  in = arterial_check_case();
  in.hb = g_per_dL(30);
  EXPECT_EQ(validation_error(in, limits).rfind("hb:", 0), 0u);
  in = arterial_check_case();
  in.pao2 = mmHg(750);
  EXPECT_EQ(validation_error(in, limits).rfind("pao2:", 0), 0u);
}

TEST_F(OxygenAnalysis, AnswerCarriesKeysCautionsAndNoReadingWithoutPf) {
  OxygenInputs in = arterial_check_case();
  const Answer a = describe_oxygen(in, analyse_oxygen(in, limits), limits);
  EXPECT_EQ(a.command, "calc oxygen");
  EXPECT_FALSE(a.cautions.empty());
  std::vector<std::string> keys;
  for (const auto& item : a.results) keys.push_back(item.key);
  for (const char* k : {"cao2", "do2", "pao2_alveolar", "aa_gradient", "pf_ratio"}) {
    EXPECT_NE(std::find(keys.begin(), keys.end(), k), keys.end()) << k;
  }
  OxygenInputs no_pf;
  no_pf.hb = g_per_dL(12);
  no_pf.sao2 = fraction(0.9);
  const Answer b = describe_oxygen(no_pf, analyse_oxygen(no_pf, limits), limits);
  EXPECT_FALSE(b.reading);
  EXPECT_TRUE(b.gates.empty());
}

}  // namespace
}  // namespace bb
