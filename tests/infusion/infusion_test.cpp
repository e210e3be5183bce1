// Vasoactive dose conversions, unit parsing and the norepinephrine equivalent.
#include <gtest/gtest.h>

#include <algorithm>
#include <type_traits>

#include "breathbeat/infusion.hpp"
#include "breathbeat/present/infusion.hpp"

namespace bb {
namespace {

const Thresholds& limits() {
  static const Thresholds t = Thresholds::built_in();
  return t;
}

// A dose per kg cannot be passed where a heart rate is expected, nor the other way.
static_assert(!std::is_convertible_v<DosePerKg, Frequency>);
static_assert(!std::is_convertible_v<Frequency, DosePerKg>);
static_assert(!std::is_convertible_v<DosePerKg, MassDose>);
static_assert(!std::is_convertible_v<UnitDose, DosePerKg>);

// ---- conversions -------------------------------------------------------------------

TEST(InfusionFormulas, RateToDosePerKgHandWorked) {
  // 12 mL/h x 64 ug/mL / (60 x 80 kg) = 0.16 ug/kg/min; hand-worked on the dose-conversion
  // formula (common practice, no source).
  const DosePerKg d = dose_per_kg_from_rate(mL_per_h(12), ug_per_mL(64), kg(80));
  EXPECT_NEAR(in_ug_per_kg_per_min(d), 0.16, 1e-12);
  // 12 x 64 / 60 = 12.8 ug/min (same formula without weight, common practice, no source).
  EXPECT_NEAR(in_ug_per_min(mass_dose_from_rate(mL_per_h(12), ug_per_mL(64))), 12.8, 1e-12);
}

TEST(InfusionFormulas, RoundTrips) {
  // Rate -> dose -> rate returns the rate (inverse formulas, common practice, no source).
  const Flow rate = mL_per_h(7.5);
  const MassConcentration conc = ug_per_mL(32);
  const DosePerKg d = dose_per_kg_from_rate(rate, conc, kg(72));
  EXPECT_NEAR(in_mL_per_h(rate_from_dose_per_kg(d, conc, kg(72))), 7.5, 1e-12);
  const MassDose m = mass_dose_from_rate(rate, conc);
  EXPECT_NEAR(in_mL_per_h(rate_from_mass_dose(m, conc)), 7.5, 1e-12);
  EXPECT_NEAR(in_ug_per_kg_per_min(dose_per_kg_from_mass_dose(m, kg(72))), in_ug_per_kg_per_min(d),
              1e-12);
  EXPECT_NEAR(in_ug_per_min(mass_dose_from_dose_per_kg(d, kg(72))), in_ug_per_min(m), 1e-12);
}

TEST(InfusionFormulas, DoseToRateHandWorked) {
  // 0.1 ug/kg/min x 60 x 70 kg / 16 ug/mL = 26.25 mL/h (dose-conversion formula, hand-worked;
  // common practice, no source).
  EXPECT_NEAR(in_mL_per_h(rate_from_dose_per_kg(ug_per_kg_per_min(0.1), ug_per_mL(16), kg(70))),
              26.25, 1e-12);
}

TEST(InfusionFormulas, VasopressinInUnits) {
  // 20 U in 100 mL = 0.2 U/mL at 9 mL/h -> 1.8 U/h = 0.03 U/min (common practice, no source).
  EXPECT_NEAR(in_units_per_min(unit_dose_from_rate(mL_per_h(9), units_per_mL(0.2))), 0.03, 1e-12);
  EXPECT_NEAR(in_mL_per_h(rate_from_unit_dose(units_per_min(0.04), units_per_mL(0.2))), 12.0,
              1e-12);
}

// ---- parsing -------------------------------------------------------------------------

TEST(InfusionParse, ConcentrationSpellingsAgree) {
  // 1 mg/mL = 1000 ug/mL; mcg and the micro sign mean ug (common practice, no source).
  const Field f{"conc", ""};
  auto ug = [&](const char* text) {
    return in_ug_per_mL(
        std::get<MassConcentration>(parse_drug_concentration(text, DoseBasis::mass, f)));
  };
  EXPECT_NEAR(ug("64"), 64.0, 1e-12);
  EXPECT_NEAR(ug("64 ug/mL"), 64.0, 1e-12);
  EXPECT_NEAR(ug("64mcg/mL"), 64.0, 1e-12);
  EXPECT_NEAR(ug("64 \xC2\xB5g/mL"), 64.0, 1e-12);
  EXPECT_NEAR(ug("0.064 mg/mL"), 64.0, 1e-12);
  EXPECT_NEAR(in_units_per_mL(std::get<UnitConcentration>(
                  parse_drug_concentration("0.2 U/mL", DoseBasis::units, f))),
              0.2, 1e-12);
}

TEST(InfusionParse, DoseSpellings) {
  const Field f{"dose", ""};
  // 20 ng/kg/min = 0.02 ug/kg/min (SI prefixes, common practice, no source).
  EXPECT_NEAR(in_ug_per_kg_per_min(
                  std::get<DosePerKg>(parse_drug_dose("20 ng/kg/min", DoseBasis::mass, f))),
              0.02, 1e-12);
  // 6 mg/h = 100 ug/min (common practice, no source).
  EXPECT_NEAR(in_ug_per_min(std::get<MassDose>(parse_drug_dose("6mg/h", DoseBasis::mass, f))),
              100.0, 1e-9);
  // 2.4 U/h = 0.04 U/min (common practice, no source).
  EXPECT_NEAR(in_units_per_min(std::get<UnitDose>(parse_drug_dose("2.4 U/h", DoseBasis::units, f))),
              0.04, 1e-12);
  // A bare number is ug/kg/min for mass-dosed drugs (documented default).
  EXPECT_TRUE(std::holds_alternative<DosePerKg>(parse_drug_dose("0.1", DoseBasis::mass, f)));
}

TEST(InfusionParse, WrongKindOfUnitIsRefused) {
  const Field f{"conc", ""};
  EXPECT_THROW(parse_drug_concentration("0.2 U/mL", DoseBasis::mass, f), InputError);
  EXPECT_THROW(parse_drug_concentration("64 ug/mL", DoseBasis::units, f), InputError);
  EXPECT_THROW(parse_drug_dose("0.1 ug/kg/min", DoseBasis::units, f), InputError);
  EXPECT_THROW(parse_drug_dose("5 /min", DoseBasis::mass, f), InputError);
  EXPECT_THROW(parse_infusion_rate("-3", Field{"rate", "mL/h"}), InputError);
  EXPECT_THROW(parse_drug_concentration("0", DoseBasis::mass, f), InputError);
}

TEST(InfusionParse, UnknownDrugSuggestsTheClosest) {
  try {
    parse_drug("norepinephrin", Field{"drug", ""});
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "drug");
    EXPECT_NE(e.expected().find("norepinephrine"), std::string::npos);
  }
  EXPECT_EQ(parse_drug("Noradrenaline", Field{"drug", ""}), Drug::norepinephrine);
  EXPECT_EQ(parse_drug("angiotensin-ii", Field{"drug", ""}), Drug::angiotensin_ii);
}

TEST(InfusionParse, Spec) {
  const InfusionInput in =
      parse_infusion_spec("norepinephrine:rate=12mL/h,conc=64ug/mL", Field{"infusion", ""});
  EXPECT_EQ(in.drug, Drug::norepinephrine);
  ASSERT_TRUE(in.rate && in.conc);
  EXPECT_NEAR(in_mL_per_h(*in.rate), 12.0, 1e-12);
  EXPECT_THROW(parse_infusion_spec("norepinephrine", Field{"infusion", ""}), InputError);
  EXPECT_THROW(parse_infusion_spec("norepinephrine:speed=3", Field{"infusion", ""}), InputError);
  EXPECT_THROW(parse_infusion_spec("norepinephrine:rate=3,rate=4", Field{"infusion", ""}),
               InputError);
}

// ---- norepinephrine equivalent (Goradia et al., J Crit Care 2021;61:233, from memory) -----

TEST(NorepinephrineEquivalent, EachFactor) {
  auto one = [](Drug d, std::variant<DosePerKg, UnitDose> dose) {
    return in_ug_per_kg_per_min(norepinephrine_equivalent({{d, dose}}, limits()));
  };
  // Goradia et al., J Crit Care 2021;61:233 (from memory): NE 1:1, epinephrine 1:1,
  // phenylephrine /10, dopamine /100, metaraminol /8, vasopressin U/min x 2.5,
  // angiotensin II x 10.
  EXPECT_NEAR(one(Drug::norepinephrine, ug_per_kg_per_min(0.2)), 0.2, 1e-12);
  EXPECT_NEAR(one(Drug::epinephrine, ug_per_kg_per_min(0.05)), 0.05, 1e-12);
  EXPECT_NEAR(one(Drug::phenylephrine, ug_per_kg_per_min(1.0)), 0.1, 1e-12);
  EXPECT_NEAR(one(Drug::dopamine, ug_per_kg_per_min(10.0)), 0.1, 1e-12);
  EXPECT_NEAR(one(Drug::metaraminol, ug_per_kg_per_min(0.8)), 0.1, 1e-12);
  EXPECT_NEAR(one(Drug::vasopressin, units_per_min(0.04)), 0.1, 1e-12);
  EXPECT_NEAR(one(Drug::angiotensin_ii, ng_per_kg_per_min(20)), 0.2, 1e-12);
  // Inotropes do not count (Goradia et al., J Crit Care 2021;61:233, from memory).
  EXPECT_EQ(one(Drug::dobutamine, ug_per_kg_per_min(5.0)), 0.0);
  EXPECT_EQ(one(Drug::milrinone, ug_per_kg_per_min(0.5)), 0.0);
}

TEST(NorepinephrineEquivalent, HandWorkedCombination) {
  // NE 0.16 (12 mL/h of 64 ug/mL at 80 kg) + vasopressin 0.03 U/min x 2.5 = 0.075
  // + dobutamine 5 (not counted) = 0.235 ug/kg/min (Goradia 2021, from memory; hand-worked).
  InfusionSet set;
  set.weight = kg(80);
  set.infusions.push_back(
      parse_infusion_spec("norepinephrine:rate=12mL/h,conc=64ug/mL", Field{"infusion", ""}));
  set.infusions.push_back(
      parse_infusion_spec("vasopressin:rate=9,conc=0.2U/mL", Field{"infusion", ""}));
  set.infusions.push_back(parse_infusion_spec("dobutamine:dose=5", Field{"infusion", ""}));
  validate_infusions(set, limits());
  const InfusionResults r = analyse_infusions(set, limits());
  ASSERT_TRUE(r.ne_equivalent.has_value());
  EXPECT_NEAR(in_ug_per_kg_per_min(*r.ne_equivalent), 0.235, 1e-12);
  EXPECT_FALSE(r.infusions[2].ne_equivalent.has_value());
}

TEST(NorepinephrineEquivalent, FactorsAreData) {
  // A site file halving the vasopressin factor (value invented for the test).
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text("[infusion.ne_factor_vasopressin]\nvalue = 1.25\nunit = \"\"\n",
                           "site.toml");
  EXPECT_NEAR(in_ug_per_kg_per_min(
                  norepinephrine_equivalent({{Drug::vasopressin, units_per_min(0.04)}}, site)),
              0.05, 1e-12);
}

TEST(NorepinephrineEquivalent, UnknownWithoutWeightForAMicrogramPerMinuteDose) {
  InfusionSet set;
  set.infusions.push_back(
      parse_infusion_spec("phenylephrine:dose=100ug/min", Field{"infusion", ""}));
  const InfusionResults r = analyse_infusions(set, limits());
  EXPECT_FALSE(r.ne_equivalent.has_value());
}

// ---- validation ---------------------------------------------------------------------------

TEST(InfusionValidation, ZeroWeightIsRefusedEvenWhenImplausibleValuesAreAllowed) {
  Thresholds lax = Thresholds::built_in();
  lax.allow_implausible(true);
  InfusionSet set;
  set.weight = kg(0);
  set.infusions.push_back(parse_infusion_spec("norepinephrine:dose=0.1", Field{"infusion", ""}));
  try {
    validate_infusions(set, lax);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "weight");
  }
}

TEST(InfusionValidation, RateAndDoseTogetherAreRefused) {
  InfusionSet set;
  set.infusions.push_back(
      parse_infusion_spec("norepinephrine:dose=0.1,rate=5,conc=64", Field{"infusion", ""}));
  EXPECT_THROW(validate_infusions(set, limits()), InputError);
}

TEST(InfusionValidation, ImplausibleRateNamesTheRateField) {
  // Pump rate 0-500 mL/h (presets/plausibility.toml, common practice, no source).
  InfusionSet set;
  set.infusions.push_back(
      parse_infusion_spec("norepinephrine:rate=900,conc=64", Field{"infusion", ""}));
  try {
    validate_infusions(set, limits());
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "rate");
    EXPECT_NE(std::string(e.what()).find("infusion 1 (norepinephrine)"), std::string::npos);
  }
  Thresholds lax = Thresholds::built_in();
  lax.allow_implausible(true);
  EXPECT_NO_THROW(validate_infusions(set, lax));
}

// ---- units from the one unit table -------------------------------------------------------

TEST(InfusionParse, EverySpellingOfTheOldParserStillReads) {
  // SI prefixes and h = 60 min (NIST SP 811, 2008); mcg, ug and the micro sign are the same.
  const Field f{"x", ""};
  auto rate = [&](const char* t) { return in_mL_per_h(parse_infusion_rate(t, f)); };
  EXPECT_EQ(rate("12"), 12.0);  // the stored unit reads exactly
  EXPECT_EQ(rate("12 mL/h"), 12.0);
  EXPECT_NEAR(rate("12 ml/hr"), 12.0, 1e-12);
  EXPECT_NEAR(rate("0.2 mL/min"), 12.0, 1e-12);
  EXPECT_NEAR(rate("0.012 L/h"), 12.0, 1e-12);
  auto ug = [&](const char* t) {
    return in_ug_per_mL(
        std::get<MassConcentration>(parse_drug_concentration(t, DoseBasis::mass, f)));
  };
  EXPECT_NEAR(ug("64000 ng/mL"), 64.0, 1e-9);
  EXPECT_NEAR(ug("64 mg/L"), 64.0, 1e-12);
  EXPECT_NEAR(ug("64000 ug/L"), 64.0, 1e-9);
  EXPECT_NEAR(ug("64 \xCE\xBCg/mL"), 64.0, 1e-12);  // Greek small mu
  auto units = [&](const char* t) {
    return in_units_per_mL(
        std::get<UnitConcentration>(parse_drug_concentration(t, DoseBasis::units, f)));
  };
  EXPECT_EQ(units("0.4"), 0.4);
  EXPECT_NEAR(units("0.4 units/mL"), 0.4, 1e-12);
  EXPECT_NEAR(units("0.4 IU/mL"), 0.4, 1e-12);
  EXPECT_NEAR(units("400 U/L"), 0.4, 1e-12);
  auto per_kg = [&](const char* t) {
    return in_ug_per_kg_per_min(std::get<DosePerKg>(parse_drug_dose(t, DoseBasis::mass, f)));
  };
  EXPECT_EQ(per_kg("0.1"), 0.1);
  EXPECT_NEAR(per_kg("6 mcg/kg/h"), 0.1, 1e-12);
  EXPECT_NEAR(per_kg("6 ug/kg/hr"), 0.1, 1e-12);
  EXPECT_NEAR(per_kg("0.006 mg/kg/h"), 0.1, 1e-12);
  auto mass = [&](const char* t) {
    return in_ug_per_min(std::get<MassDose>(parse_drug_dose(t, DoseBasis::mass, f)));
  };
  EXPECT_NEAR(mass("0.1 mg/min"), 100.0, 1e-9);
  EXPECT_NEAR(mass("100000 ng/min"), 100.0, 1e-9);
  EXPECT_NEAR(mass("6000 ug/h"), 100.0, 1e-9);
  EXPECT_NEAR(mass("6 mg/hr"), 100.0, 1e-9);
  auto unit_dose = [&](const char* t) {
    return in_units_per_min(std::get<UnitDose>(parse_drug_dose(t, DoseBasis::units, f)));
  };
  EXPECT_EQ(unit_dose("0.03"), 0.03);
  EXPECT_NEAR(unit_dose("0.03 units/min"), 0.03, 1e-12);
  EXPECT_NEAR(unit_dose("1.8 units/h"), 0.03, 1e-12);
  EXPECT_NEAR(unit_dose("1.8 U/hr"), 0.03, 1e-12);
}

TEST(InfusionParse, SpecAcceptsTheFieldIdAsPartName) {
  // "concentration=" is the registry id of conc= (src/fields/registry.cpp).
  const InfusionInput in =
      parse_infusion_spec("vasopressin:dose=0.03,concentration=0.4", Field{"infusion", ""});
  ASSERT_TRUE(in.conc.has_value());
  EXPECT_EQ(in_units_per_mL(std::get<UnitConcentration>(*in.conc)), 0.4);
}

TEST(InfusionAnswer, ShownUnitsComeFromTheUnitTable) {
  // UCUM codes (Schadow & McDonald, UCUM, Regenstrief Institute) for JSON; "mcg" and
  // "units" in text (common practice, no source).
  const Shown d = as_ug_per_kg_per_min(ug_per_kg_per_min(0.1));
  EXPECT_EQ(d.ucum, "ug/kg/min");
  EXPECT_EQ(d.unit, "mcg/kg/min");
  EXPECT_EQ(as_mL_per_h(mL_per_h(5)).ucum, "mL/h");
  EXPECT_EQ(as_ug_per_mL(ug_per_mL(80)).unit, "mcg/mL");
  EXPECT_EQ(as_units_per_min(units_per_min(0.03)).unit, "units/min");
  EXPECT_EQ(as_units_per_mL(units_per_mL(0.4)).ucum, "[iU]/mL");
}

TEST(InfusionAnalysis, MissingConcentrationAndWeightAreNeedsByFieldId) {
  InfusionSet set;
  set.infusions.push_back(parse_infusion_spec("norepinephrine:rate=10", Field{"infusion", ""}));
  const InfusionResults r = analyse_infusions(set, limits());
  ASSERT_FALSE(r.skipped.empty());
  EXPECT_EQ(r.skipped[0].key, "norepinephrine_dose");
  ASSERT_EQ(r.skipped[0].needs.size(), 1u);
  EXPECT_EQ(r.skipped[0].needs[0].field, "concentration");
  EXPECT_EQ(r.skipped.back().key, "ne_equivalent");
  EXPECT_EQ(r.skipped.back().needs.size(), 2u);  // no weight, no concentration
  set.weight = kg(70);
  const InfusionResults with_weight = analyse_infusions(set, limits());
  ASSERT_EQ(with_weight.skipped.back().needs.size(), 1u);  // only what is still missing
  EXPECT_EQ(with_weight.skipped.back().needs[0].field, "concentration");
  for (const auto& s : r.skipped) {
    for (const auto& n : s.needs) EXPECT_NE(find_field(n.field), nullptr) << n.field;
  }
}

TEST(InfusionAnswer, WeightNoteNamesTheFieldPerContext) {
  // Registry: weight is --weight on the command line and patient.weight in a trial file.
  const std::string cli = infusion_note_text(InfusionNote::weight_and_labelling);
  EXPECT_NE(cli.find("(--weight)"), std::string::npos) << cli;
  const std::string file =
      infusion_note_text(InfusionNote::weight_and_labelling, FieldContext::trial_file);
  EXPECT_NE(file.find("(patient.weight)"), std::string::npos) << file;
}

// ---- item 16: each drug's display unit is data; angiotensin II in ng/kg/min -------------

TEST(InfusionDisplayUnit, AngiotensinIiIsShownInNanogramsPerKgPerMinute) {
  // Angiotensin II is dosed and labelled in ng/kg/min, started at 20 ng/kg/min (Khanna et al.,
  // N Engl J Med 2017;377:419): never "0.020 mcg/kg/min".
  EXPECT_EQ(drug_info(Drug::angiotensin_ii).dose_unit, "ng/kg/min");
  const Shown d = as_dose_per_kg(ng_per_kg_per_min(20), Drug::angiotensin_ii);
  EXPECT_EQ(d.ucum, "ng/kg/min");
  EXPECT_EQ(d.unit, "ng/kg/min");
  EXPECT_NEAR(d.value, 20.0, 1e-9);
  EXPECT_EQ(format_shown(d), "20.0 ng/kg/min");
  // Norepinephrine stays in mcg/kg/min (common practice, no source).
  EXPECT_EQ(format_shown(as_dose_per_kg(ug_per_kg_per_min(0.1), Drug::norepinephrine)),
            "0.100 mcg/kg/min");
  // Every drug's display units are in the one unit table (a drug without one cannot be shown).
  for (const DrugInfo& info : known_drugs()) {
    EXPECT_NO_THROW(unit_of(Dimension::dose_per_kg, info.dose_unit)) << info.name;
    EXPECT_NO_THROW(unit_of(Dimension::mass_dose, info.mass_dose_unit)) << info.name;
  }
}

TEST(InfusionDisplayUnit, BareAngiotensinIiDoseIsInItsOwnUnit) {
  // A bare number is in the drug's unit: 20 -> 20 ng/kg/min = 0.02 ug/kg/min (SI prefixes;
  // Khanna et al., N Engl J Med 2017;377:419 for the unit).
  const Field f{"dose", ""};
  EXPECT_NEAR(
      in_ug_per_kg_per_min(std::get<DosePerKg>(parse_drug_dose("20", Drug::angiotensin_ii, f))),
      0.02, 1e-12);
  EXPECT_NEAR(in_ug_per_kg_per_min(
                  std::get<DosePerKg>(parse_drug_dose("0.02 mcg/kg/min", Drug::angiotensin_ii, f))),
              0.02, 1e-12);
  EXPECT_NEAR(
      in_ug_per_kg_per_min(std::get<DosePerKg>(parse_drug_dose("0.1", Drug::norepinephrine, f))),
      0.1, 1e-12);
  EXPECT_NEAR(in_units_per_min(std::get<UnitDose>(parse_drug_dose("0.03", Drug::vasopressin, f))),
              0.03, 1e-12);
  const InfusionInput in = parse_infusion_spec("angiotensin-ii:dose=20", Field{"infusion", ""});
  EXPECT_NEAR(in_ug_per_kg_per_min(std::get<DosePerKg>(*in.dose)), 0.02, 1e-12);
  try {
    parse_drug_dose("x", Drug::angiotensin_ii, f);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.expected().find("taken as ng/kg/min"), std::string::npos) << e.expected();
  }
}

TEST(InfusionDisplayUnit, AngiotensinIiAnswerFromRate) {
  // 5000 ng/mL (2.5 mg in 500 mL, as the label prepares it) at 19.2 mL/h in 80 kg:
  // 19.2 x 5 ug/mL / (60 x 80) = 0.02 ug/kg/min = 20 ng/kg/min; 1.6 ug/min = 1600 ng/min
  // (dose-conversion formula, hand-worked; common practice, no source).
  InfusionSet set;
  set.weight = kg(80);
  set.infusions.push_back(
      parse_infusion_spec("angiotensin-ii:rate=19.2mL/h,conc=5000ng/mL", Field{"infusion", ""}));
  const InfusionResults r = analyse_infusions(set, limits());
  const Answer a = describe_infusions(set, r);
  bool per_kg = false;
  bool per_min = false;
  for (const Item& i : a.results) {
    if (i.key == "angiotensin_ii_dose_per_kg") {
      per_kg = true;
      EXPECT_EQ(i.shown.ucum, "ng/kg/min");
      EXPECT_NEAR(i.shown.value, 20.0, 1e-9);
    }
    if (i.key == "angiotensin_ii_dose") {
      per_min = true;
      EXPECT_EQ(i.shown.ucum, "ng/min");
      EXPECT_NEAR(i.shown.value, 1600.0, 1e-6);
    }
  }
  EXPECT_TRUE(per_kg && per_min);
  // 20 ng/kg/min is within the usual range (Khanna et al. 2017): no flag.
  EXPECT_TRUE(a.flags.empty());
}

// ---- item 21: doses against their usual ranges ------------------------------------------

InfusionResults one(const std::string& spec, const Thresholds& t = limits()) {
  InfusionSet set;
  set.weight = kg(80);
  set.infusions.push_back(parse_infusion_spec(spec, Field{"infusion", ""}));
  return analyse_infusions(set, t);
}
DosePosition position_of(const std::string& spec) {
  const InfusionResults r = one(spec);
  if (!r.infusions[0].range) ADD_FAILURE() << spec << ": no range check";
  return r.infusions[0].range ? r.infusions[0].range->position : DosePosition::within;
}

TEST(UsualDoseRange, DobutamineUpTo20) {
  // Dobutamine 2.5-20 ug/kg/min (common practice, no source).
  EXPECT_EQ(position_of("dobutamine:dose=20"), DosePosition::within);  // a limit is within
  EXPECT_EQ(position_of("dobutamine:dose=25"), DosePosition::above);
  EXPECT_EQ(position_of("dobutamine:dose=1"), DosePosition::below);
  const InfusionSet set{{parse_infusion_spec("dobutamine:dose=25", Field{"infusion", ""})}, kg(80)};
  const Answer a = describe_infusions(set, analyse_infusions(set, limits()));
  ASSERT_EQ(a.flags.size(), 1u);
  EXPECT_EQ(a.flags[0].key, "dobutamine_usual_range");
  EXPECT_NE(a.flags[0].message.find("25.0 mcg/kg/min is above the usual range 2.5-20 mcg/kg/min"),
            std::string::npos)
      << a.flags[0].message;
  EXPECT_NE(a.flags[0].message.find("not an order"), std::string::npos);
  EXPECT_EQ(a.flags[0].source, "common practice, no source");
}

TEST(UsualDoseRange, VasopressinInUnitsPerMinute) {
  // VASST 0.01-0.03 U/min (Russell et al., N Engl J Med 2008;358:877); doses above
  // 0.03-0.04 U/min for salvage only (Dellinger et al., Crit Care Med 2013;41:580).
  EXPECT_EQ(position_of("vasopressin:dose=0.03"), DosePosition::within);
  EXPECT_EQ(position_of("vasopressin:dose=0.04"), DosePosition::within);
  EXPECT_EQ(position_of("vasopressin:dose=0.06U/min"), DosePosition::above);
  EXPECT_EQ(position_of("vasopressin:dose=0.005"), DosePosition::below);
  // 0.2 U/mL at 18 mL/h = 0.06 U/min (common practice, no source): from the rate as well.
  EXPECT_EQ(position_of("vasopressin:rate=18,conc=0.2U/mL"), DosePosition::above);
}

TEST(UsualDoseRange, AngiotensinIiFirstThreeHours) {
  // Start 20 ng/kg/min, at most 80 in the first 3 h, then at most 40; as low as 1.25
  // (Khanna et al., N Engl J Med 2017;377:419; angiotensin II FDA label, 2017).
  EXPECT_EQ(position_of("angiotensin-ii:dose=20ng/kg/min"), DosePosition::within);
  EXPECT_EQ(position_of("angiotensin-ii:dose=40"), DosePosition::within);
  EXPECT_EQ(position_of("angiotensin-ii:dose=60"), DosePosition::above_after_early);
  EXPECT_EQ(position_of("angiotensin-ii:dose=90"), DosePosition::above);
  EXPECT_EQ(position_of("angiotensin-ii:dose=1"), DosePosition::below);
  const InfusionSet set{{parse_infusion_spec("angiotensin-ii:dose=60", Field{"infusion", ""})},
                        kg(80)};
  const Answer a = describe_infusions(set, analyse_infusions(set, limits()));
  ASSERT_EQ(a.flags.size(), 1u);
  const std::string& m = a.flags[0].message;
  EXPECT_NE(m.find("60.0 ng/kg/min is above the usual range 1.25-40 ng/kg/min; up to 80 ng/kg/min "
                   "is usual only in the first 3 h"),
            std::string::npos)
      << m;
  EXPECT_EQ(m.find("mcg"), std::string::npos) << m;
}

TEST(UsualDoseRange, PerKgRangeNeedsTheWeight) {
  // Without the weight a ug/min dose has no dose per kg: the range is not checked.
  InfusionSet set;
  set.infusions.push_back(parse_infusion_spec("dobutamine:dose=2000ug/min", Field{"infusion", ""}));
  EXPECT_FALSE(analyse_infusions(set, limits()).infusions[0].range.has_value());
  // With 80 kg: 2000 / 80 = 25 ug/kg/min, above 20 (common practice, no source).
  set.weight = kg(80);
  const auto r = analyse_infusions(set, limits()).infusions[0].range;
  ASSERT_TRUE(r.has_value());
  EXPECT_EQ(r->position, DosePosition::above);
}

TEST(UsualDoseRange, RangesAreData) {
  // A site range (value invented for the test) replaces the built-in one.
  Thresholds site = Thresholds::built_in();
  site.load_overrides_text("[infusion.usual_dobutamine_high]\nvalue = 15\nunit = \"ug/kg/min\"\n",
                           "site.toml");
  const InfusionResults r = one("dobutamine:dose=18", site);
  ASSERT_TRUE(r.infusions[0].range.has_value());
  EXPECT_EQ(r.infusions[0].range->position, DosePosition::above);
  // A range must keep its kind of unit: a dose per minute for a per-kg range is refused.
  EXPECT_THROW(site.load_overrides_text(
                   "[infusion.usual_dobutamine_high]\nvalue = 1500\nunit = \"ug/min\"\n", "s.toml"),
               InputError);
  // ... but another unit of the same kind is read: 15000 ng/kg/min = 15 ug/kg/min.
  Thresholds ng = Thresholds::built_in();
  ng.load_overrides_text("[infusion.usual_dobutamine_high]\nvalue = 15000\nunit = \"ng/kg/min\"\n",
                         "site.toml");
  EXPECT_EQ(one("dobutamine:dose=18", ng).infusions[0].range->position, DosePosition::above);
}

TEST(UsualDoseRange, ConsiderAddingVasopressin) {
  // Norepinephrine 0.25-0.5 ug/kg/min: the guideline suggests considering adding vasopressin
  // (Evans et al., Intensive Care Med 2021;47:1181).
  const auto at = [](const char* ne) { return one(ne).consider_vasopressin; };
  EXPECT_FALSE(at("norepinephrine:dose=0.2").has_value());
  ASSERT_TRUE(at("norepinephrine:dose=0.25").has_value());  // the limit counts
  const auto s = at("norepinephrine:dose=0.3");
  ASSERT_TRUE(s.has_value());
  EXPECT_FALSE(s->above);
  EXPECT_NEAR(in_ug_per_kg_per_min(s->from), 0.25, 1e-12);
  EXPECT_NEAR(in_ug_per_kg_per_min(s->to), 0.5, 1e-12);
  EXPECT_TRUE(at("norepinephrine:dose=0.6")->above);
  const std::string text = vasopressin_suggestion_text(*s);
  EXPECT_NE(text.find("Norepinephrine 0.300 mcg/kg/min is within 0.25-0.5 mcg/kg/min"),
            std::string::npos)
      << text;
  EXPECT_NE(text.find("Evans et al., Intensive Care Med 2021;47:1181"), std::string::npos);
  EXPECT_NE(text.find("not an order"), std::string::npos);
  // Two norepinephrine lines add up: 0.15 + 0.15 = 0.3 (hand-worked).
  InfusionSet two;
  two.weight = kg(80);
  two.infusions.push_back(parse_infusion_spec("norepinephrine:dose=0.15", Field{"infusion", ""}));
  two.infusions.push_back(parse_infusion_spec("norepinephrine:dose=0.15", Field{"infusion", ""}));
  EXPECT_TRUE(analyse_infusions(two, limits()).consider_vasopressin.has_value());
  // Vasopressin already running: no suggestion.
  two.infusions.push_back(parse_infusion_spec("vasopressin:dose=0.03", Field{"infusion", ""}));
  EXPECT_FALSE(analyse_infusions(two, limits()).consider_vasopressin.has_value());
}

TEST(UsualDoseRange, DopamineCarriesItsArrhythmiaNote) {
  // More arrhythmias with dopamine than norepinephrine in shock (De Backer et al., N Engl J Med
  // 2010;362:779).
  const InfusionResults r = one("dopamine:dose=10");
  EXPECT_NE(std::find(r.notes.begin(), r.notes.end(), InfusionNote::dopamine_arrhythmias),
            r.notes.end());
  EXPECT_NE(infusion_note_text(InfusionNote::dopamine_arrhythmias).find("De Backer"),
            std::string::npos);
  const InfusionResults ne = one("norepinephrine:dose=0.1");
  EXPECT_EQ(std::find(ne.notes.begin(), ne.notes.end(), InfusionNote::dopamine_arrhythmias),
            ne.notes.end());
  // Dopamine above 20 ug/kg/min is outside SOAP II's range (De Backer et al. 2010).
  EXPECT_EQ(position_of("dopamine:dose=25"), DosePosition::above);
}

TEST(UsualDoseRange, EveryRangeLoadsWithItsSource) {
  for (const DrugInfo& info : known_drugs()) {
    const auto range = usual_dose_range(info.drug, limits());
    if (info.drug == Drug::metaraminol) {
      EXPECT_FALSE(range.has_value());  // no published range at hand (infusion.toml)
      continue;
    }
    ASSERT_TRUE(range.has_value()) << info.name;
    EXPECT_FALSE(range->source_low.empty()) << info.name;
    EXPECT_FALSE(range->source_high.empty()) << info.name;
    EXPECT_LT(std::visit([](auto x) { return x.value(); }, range->low),
              std::visit([](auto x) { return x.value(); }, range->high))
        << info.name;
    // The range is written in the kind of dose the drug is dosed in.
    EXPECT_EQ(std::holds_alternative<UnitDose>(range->low), info.basis == DoseBasis::units)
        << info.name;
  }
}

}  // namespace
}  // namespace bb
