// Vasoactive dose conversions, unit parsing and the norepinephrine equivalent.
#include <gtest/gtest.h>

#include <type_traits>

#include "breathbeat/infusion.hpp"

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
  // 12 mL/h x 64 ug/mL / (60 x 80 kg) = 0.16 ug/kg/min; hand-worked on the formula of the
  // domain brief section 9 (common practice, no source).
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
  // 0.1 ug/kg/min x 60 x 70 kg / 16 ug/mL = 26.25 mL/h (brief section 9 formula, hand-worked).
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
  // Inotropes do not count (domain brief section 9).
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

}  // namespace
}  // namespace bb
