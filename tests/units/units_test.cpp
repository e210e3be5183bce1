// Conversion factors and the unit parser.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <vector>

#include "breathbeat/units.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {
namespace {

// NIST Special Publication 811 (Thompson & Taylor, 2008), Appendix B.8:
// centimeter of water, conventional = 9.806 65 E+01 Pa.
TEST(Units, CmH2OIsNistConventional) {
  EXPECT_NEAR(cmH2O(1.0).value(), 98.0665, 1e-9);
}

// NIST SP 811 (2008), Appendix B.8: millimeter of mercury, conventional = 1.333 224 E+02 Pa.
TEST(Units, MmHgIsNistConventional) {
  EXPECT_NEAR(mmHg(1.0).value(), 133.3224, 1e-4);
}

// NIST SP 811 (2008), Appendix B: 1 cmH2O = 0.735559 mmHg; 1 kPa = 7.50062 mmHg = 10.1972 cmH2O.
TEST(Units, DerivedPressureFactors) {
  EXPECT_NEAR(in_mmHg(cmH2O(1.0)), 0.735559, 1e-6);
  EXPECT_NEAR(in_mmHg(kPa(1.0)), 7.50062, 1e-5);
  EXPECT_NEAR(in_cmH2O(kPa(1.0)), 10.1972, 1e-4);
}

// NIST SP 811 (2008), Appendix B.8: liter = 1.0 E-03 m3; minute = 60 s.
TEST(Units, VolumeFlowTime) {
  EXPECT_NEAR(litre(1.0).value(), 1e-3, 1e-15);
  EXPECT_NEAR(in_mL(litre(0.5)), 500.0, 1e-9);
  EXPECT_NEAR(L_per_min(60.0).value(), 1e-3, 1e-15);  // 60 L/min = 1 L/s
  EXPECT_NEAR(in_L_per_s(L_per_min(60.0)), 1.0, 1e-12);
  EXPECT_NEAR(per_min(60.0).value(), 1.0, 1e-12);
}

// Haemoglobin: 1 g/dL = 10 g/L (exact, SI prefixes); 1 mmol/L (monomer) = 1.611 g/dL
// (common practice in Dutch/Nordic laboratories; monomer mass 16.11 kDa from memory).
TEST(Units, Haemoglobin) {
  EXPECT_NEAR(in_g_per_L(g_per_dL(15.0)), 150.0, 1e-9);
  EXPECT_NEAR(in_g_per_dL(hb_mmol_per_L(9.3)), 14.98, 0.01);
}

struct Accepted {
  const char* text;
  Dimension dimension;
  const char* default_unit;
  double expected_si;  // identity of the conversion factors above (NIST SP 811, 2008)
};

class ParserAccepts : public ::testing::TestWithParam<Accepted> {};

TEST_P(ParserAccepts, Spelling) {
  const Accepted& a = GetParam();
  EXPECT_NEAR(parse_in_si(a.text, a.dimension, Field{"f", a.default_unit}), a.expected_si,
              std::abs(a.expected_si) * 1e-9 + 1e-15)
      << a.text;
}

// Expected SI values follow from NIST SP 811 (2008) factors: cmH2O 98.0665 Pa,
// mmHg 133.322387 Pa, L 1e-3 m3, min 60 s.
INSTANTIATE_TEST_SUITE_P(
    AllSpellings, ParserAccepts,
    ::testing::Values(
        Accepted{"25", Dimension::pressure, "cmH2O", 25 * 98.0665},
        Accepted{"25cmH2O", Dimension::pressure, "cmH2O", 25 * 98.0665},
        Accepted{"25 cmH2O", Dimension::pressure, "cmH2O", 25 * 98.0665},
        Accepted{"25 cm H2O", Dimension::pressure, "cmH2O", 25 * 98.0665},
        Accepted{"25 cm[H2O]", Dimension::pressure, "cmH2O", 25 * 98.0665},
        Accepted{"2.45 kPa", Dimension::pressure, "cmH2O", 2450.0},
        Accepted{"2.45kPa", Dimension::pressure, "cmH2O", 2450.0},
        Accepted{"18mmHg", Dimension::pressure, "cmH2O", 18 * 133.322387415},
        Accepted{"18 mm[Hg]", Dimension::pressure, "cmH2O", 18 * 133.322387415},
        Accepted{"18 torr", Dimension::pressure, "cmH2O", 18 * 133.322387415},
        Accepted{"20 mbar", Dimension::pressure, "cmH2O", 2000.0},
        Accepted{"+5", Dimension::pressure, "cmH2O", 5 * 98.0665},
        Accepted{"-3", Dimension::pressure, "cmH2O", -3 * 98.0665},
        Accepted{"500", Dimension::volume, "mL", 500e-6},
        Accepted{"500mL", Dimension::volume, "mL", 500e-6},
        Accepted{"0.5 L", Dimension::volume, "mL", 500e-6},
        Accepted{"21mm", Dimension::length, "cm", 0.021},
        Accepted{"2.1cm", Dimension::length, "cm", 0.021},
        Accepted{"180", Dimension::length, "cm", 1.80},
        Accepted{"60L/min", Dimension::flow, "L/min", 1e-3},
        Accepted{"1 L/s", Dimension::flow, "L/min", 1e-3},
        Accepted{"0.9", Dimension::time, "s", 0.9}, Accepted{"900 ms", Dimension::time, "s", 0.9},
        Accepted{"10min", Dimension::time, "s", 600.0},
        Accepted{"24h", Dimension::time, "s", 86400.0},  // hour = 3600 s (NIST SP 811, 2008)
        Accepted{"7d", Dimension::time, "s", 604800.0},  // day = 86 400 s (NIST SP 811, 2008)
        Accepted{"3.1", Dimension::flow_per_area, "L/min/m2",
                 3.1e-3 / 60.0},  // L = 1e-3 m3, min = 60 s (NIST SP 811, 2008)
        Accepted{"3.1 L/min/m2", Dimension::flow_per_area, "L/min/m2", 3.1e-3 / 60.0},
        Accepted{"3100 mL/min/m²", Dimension::flow_per_area, "L/min/m2", 3.1e-3 / 60.0},
        Accepted{"20", Dimension::frequency, "/min", 20.0 / 60.0},
        Accepted{"20/min", Dimension::frequency, "/min", 20.0 / 60.0},
        Accepted{"90 bpm", Dimension::frequency, "/min", 1.5},
        Accepted{"95%", Dimension::fraction, "", 0.95},
        Accepted{"95", Dimension::fraction, "", 0.95},
        Accepted{"0.95", Dimension::fraction, "", 0.95},
        Accepted{"1", Dimension::fraction, "", 1.0},
        Accepted{"15 g/dL", Dimension::haemoglobin, "g/dL", 150.0},
        Accepted{"150 g/L", Dimension::haemoglobin, "g/dL", 150.0},
        Accepted{"80 kg", Dimension::mass, "kg", 80.0},
        Accepted{"17 J/min", Dimension::power, "J/min", 17.0 / 60.0},
        Accepted{"2 mmol/L", Dimension::lactate, "mmol/L", 2.0},
        // Infusions: L = 1e-3 m3, h = 3600 s, min = 60 s, ug = 1e-9 kg (NIST SP 811, 2008,
        // Appendix B.8, and the SI prefixes); U counts units of a drug, per s in SI.
        Accepted{"12", Dimension::infusion_rate, "mL/h", 12e-6 / 3600.0},
        Accepted{"12 mL/hr", Dimension::infusion_rate, "mL/h", 12e-6 / 3600.0},
        Accepted{"0.2 mL/min", Dimension::infusion_rate, "mL/h", 12e-6 / 3600.0},
        Accepted{"0.012 L/h", Dimension::infusion_rate, "mL/h", 12e-6 / 3600.0},
        Accepted{"64 mcg/mL", Dimension::drug_mass_concentration, "ug/mL", 64e-3},
        Accepted{"64 \xC2\xB5g/mL", Dimension::drug_mass_concentration, "ug/mL", 64e-3},
        Accepted{"0.064 mg/mL", Dimension::drug_mass_concentration, "ug/mL", 64e-3},
        Accepted{"64 mg/L", Dimension::drug_mass_concentration, "ug/mL", 64e-3},
        Accepted{"0.4 units/mL", Dimension::drug_unit_concentration, "[iU]/mL", 0.4e6},
        Accepted{"400 U/L", Dimension::drug_unit_concentration, "[iU]/mL", 0.4e6},
        Accepted{"0.1", Dimension::dose_per_kg, "ug/kg/min", 0.1e-9 / 60.0},
        Accepted{"100 ng/kg/min", Dimension::dose_per_kg, "ug/kg/min", 0.1e-9 / 60.0},
        Accepted{"6 mcg/kg/h", Dimension::dose_per_kg, "ug/kg/min", 0.1e-9 / 60.0},
        Accepted{"0.006 mg/kg/h", Dimension::dose_per_kg, "ug/kg/min", 0.1e-9 / 60.0},
        Accepted{"100 ug/min", Dimension::mass_dose, "ug/min", 100e-9 / 60.0},
        Accepted{"6 mg/h", Dimension::mass_dose, "ug/min", 100e-9 / 60.0},
        Accepted{"0.1 mg/min", Dimension::mass_dose, "ug/min", 100e-9 / 60.0},
        Accepted{"0.03 U/min", Dimension::unit_dose, "[iU]/min", 0.03 / 60.0},
        Accepted{"1.8 units/h", Dimension::unit_dose, "[iU]/min", 0.03 / 60.0}));

struct Rejected {
  const char* text;
  Dimension dimension;
};

class ParserRejects : public ::testing::TestWithParam<Rejected> {};

TEST_P(ParserRejects, WithFieldAndAcceptedUnits) {
  const Rejected& r = GetParam();
  try {
    parse_in_si(r.text, r.dimension, Field{"peep", "cmH2O"});
    FAIL() << "accepted '" << r.text << "'";
  } catch (const InputError& e) {
    EXPECT_EQ(e.field(), "peep");
    const std::string msg = e.what();
    EXPECT_NE(msg.find("peep"), std::string::npos) << msg;
    EXPECT_NE(msg.find("expected"), std::string::npos) << msg;
  }
}

INSTANTIATE_TEST_SUITE_P(
    BadText, ParserRejects,
    ::testing::Values(
        Rejected{"", Dimension::pressure}, Rejected{"   ", Dimension::pressure},
        Rejected{"nan", Dimension::pressure}, Rejected{"inf", Dimension::pressure},
        Rejected{"-inf cmH2O", Dimension::pressure}, Rejected{"25 mL", Dimension::pressure},
        Rejected{"25cmH2Ox", Dimension::pressure}, Rejected{"25 25", Dimension::pressure},
        Rejected{"cmH2O", Dimension::pressure}, Rejected{"1e999", Dimension::pressure},
        Rejected{"12 cm", Dimension::volume}, Rejected{"95 percent", Dimension::fraction},
        Rejected{"2 mmHg", Dimension::length}));

TEST(Parser, ErrorListsAcceptedUnits) {
  try {
    parse_in_si("25 mL", Dimension::pressure, Field{"pplat", "cmH2O"});
    FAIL();
  } catch (const InputError& e) {
    const std::string msg = e.what();
    EXPECT_NE(msg.find("cmH2O"), std::string::npos) << msg;
    EXPECT_NE(msg.find("mmHg"), std::string::npos) << msg;
    EXPECT_NE(msg.find("kPa"), std::string::npos) << msg;
    EXPECT_NE(msg.find("25 mL"), std::string::npos) << msg;
  }
}

// A weight-based dose and a heart rate share the SI dimension 1/s, but not a unit table:
// one is never read as the other.
INSTANTIATE_TEST_SUITE_P(InfusionUnitsStayApart, ParserRejects,
                         ::testing::Values(Rejected{"0.1 ug/kg/min", Dimension::frequency},
                                           Rejected{"80 /min", Dimension::dose_per_kg},
                                           Rejected{"0.03 U/min", Dimension::mass_dose},
                                           Rejected{"64 ug/mL", Dimension::drug_unit_concentration},
                                           Rejected{"12 L/min", Dimension::infusion_rate},
                                           Rejected{"15 g/dL",
                                                    Dimension::drug_mass_concentration}));

struct Coded {
  Dimension dimension;
  const char* typed;
  const char* ucum;   // code written to JSON
  const char* shown;  // spelling in text
};

class UnitCodes : public ::testing::TestWithParam<Coded> {};

TEST_P(UnitCodes, SpellingFindsItsUcumCodeAndDisplay) {
  const Coded& c = GetParam();
  const UnitSpelling* u = find_unit(c.typed, c.dimension);
  ASSERT_NE(u, nullptr) << c.typed;
  EXPECT_EQ(u->ucum, c.ucum) << c.typed;
  EXPECT_EQ(u->shown, c.shown) << c.typed;
  EXPECT_EQ(&unit_of(c.dimension, c.ucum), u);
}

// UCUM codes: The Unified Code for Units of Measure (Schadow & McDonald, Regenstrief
// Institute): "u" micro, "m" milli, "n" nano, "L" litre, "h" hour, "min" minute, "/" per.
// Text spellings "mcg" and "units": common practice, no source (clearer at the bedside).
// "U" for a drug's units is breathbeat's code as before; UCUM itself reserves "U" for the
// enzyme unit and writes the international unit "[iU]" (see the note in units_parse.cpp).
INSTANTIATE_TEST_SUITE_P(
    Infusions, UnitCodes,
    ::testing::Values(Coded{Dimension::infusion_rate, "ml/hr", "mL/h", "mL/h"},
                      Coded{Dimension::infusion_rate, "mL/min", "mL/min", "mL/min"},
                      Coded{Dimension::infusion_rate, "L/h", "L/h", "L/h"},
                      Coded{Dimension::drug_mass_concentration, "mcg/mL", "ug/mL", "mcg/mL"},
                      Coded{Dimension::drug_mass_concentration, "MG/ML", "mg/mL", "mg/mL"},
                      Coded{Dimension::drug_mass_concentration, "ng/mL", "ng/mL", "ng/mL"},
                      Coded{Dimension::drug_mass_concentration, "mg/L", "mg/L", "mg/L"},
                      Coded{Dimension::drug_unit_concentration, "units/mL", "[iU]/mL", "units/mL"},
                      Coded{Dimension::drug_unit_concentration, "IU/L", "[iU]/L", "units/L"},
                      Coded{Dimension::dose_per_kg, "mcg/kg/min", "ug/kg/min", "mcg/kg/min"},
                      Coded{Dimension::dose_per_kg, "ng/kg/min", "ng/kg/min", "ng/kg/min"},
                      Coded{Dimension::dose_per_kg, "ug/kg/hr", "ug/kg/h", "mcg/kg/h"},
                      Coded{Dimension::dose_per_kg, "mg/kg/h", "mg/kg/h", "mg/kg/h"},
                      Coded{Dimension::mass_dose, "\xC2\xB5g/min", "ug/min", "mcg/min"},
                      Coded{Dimension::mass_dose, "mg/h", "mg/h", "mg/h"},
                      Coded{Dimension::mass_dose, "ug/h", "ug/h", "mcg/h"},
                      Coded{Dimension::unit_dose, "units/min", "[iU]/min", "units/min"},
                      Coded{Dimension::unit_dose, "U/hr", "[iU]/h", "units/h"},
                      Coded{Dimension::flow_per_area, "l/min/m2", "L/min/m2", "L/min/m2"}));

// Every unit of the table, each of its spellings, against a reference factor to SI
// written out here, independently of the table: NIST SP 811 (Thompson & Taylor, 2008),
// Appendix B.8 (cmH2O conventional 98.0665 Pa, mmHg conventional 133.322387 Pa, torr =
// 101325/760 Pa, L 1e-3 m3, min 60 s, h 3600 s, d 86400 s, ug 1e-9 kg) and the SI prefixes.
// Haemoglobin in mmol/L (monomer, 16.114 g/mol): 1 mmol/L = 1.6114 g/dL (from memory);
// lactate 90.08 g/mol, 1 mmol/L = 9.008 mg/dL (common practice, no source). A unit added to
// the table without a reference here, or a reference without its unit, fails.
TEST(UnitTable, EveryUnitAndSpellingMatchesItsReferenceFactor) {
  const double cmH2O = 98.0665, mmHg = 133.322387415, L = 1e-3, min = 60.0, h = 3600.0;
  struct Reference {
    Dimension dimension;
    const char* ucum;
    double to_si;
    double tolerance = 1e-9;  // relative
  };
  const std::vector<Reference> reference = {
      {Dimension::pressure, "cm[H2O]", cmH2O},
      {Dimension::pressure, "mm[Hg]", mmHg},
      {Dimension::pressure, "kPa", 1000.0},
      {Dimension::pressure, "hPa", 100.0},
      {Dimension::pressure, "Pa", 1.0},
      {Dimension::volume, "mL", 1e-6},
      {Dimension::volume, "L", L},
      {Dimension::flow, "L/min", L / min},
      {Dimension::flow, "L/s", L},
      {Dimension::flow, "mL/s", 1e-6},
      {Dimension::flow, "mL/min", 1e-6 / min},
      {Dimension::time, "s", 1.0},
      {Dimension::time, "ms", 1e-3},
      {Dimension::time, "min", min},
      {Dimension::time, "h", h},
      {Dimension::time, "d", 86400.0},
      {Dimension::length, "cm", 1e-2},
      {Dimension::length, "mm", 1e-3},
      {Dimension::length, "m", 1.0},
      {Dimension::area, "m2", 1.0},
      {Dimension::area, "cm2", 1e-4},
      {Dimension::mass, "kg", 1.0},
      {Dimension::mass, "g", 1e-3},
      {Dimension::haemoglobin, "g/dL", 10.0},  // kg/m3
      {Dimension::haemoglobin, "g/L", 1.0},
      {Dimension::haemoglobin, "mmol/L", 16.114, 1e-3},  // table: rounded 1.611
      {Dimension::lactate, "mmol/L", 1.0},
      {Dimension::lactate, "mg/dL", 1.0 / 9.008},
      {Dimension::fraction, "%", 0.01},
      {Dimension::frequency, "/min", 1.0 / min},
      {Dimension::frequency, "Hz", 1.0},
      {Dimension::power, "J/min", 1.0 / min},
      {Dimension::power, "W", 1.0},
      {Dimension::compliance, "mL/cm[H2O]", 1e-6 / cmH2O},
      {Dimension::compliance, "L/cm[H2O]", L / cmH2O},
      {Dimension::compliance, "mL/hPa", 1e-6 / 100.0},
      {Dimension::elastance, "cm[H2O]/L", cmH2O / L},
      {Dimension::elastance, "cm[H2O]/mL", cmH2O / 1e-6},
      {Dimension::resistance, "cm[H2O]/L/s", cmH2O / L},
      {Dimension::volume_per_mass, "mL/kg", 1e-6},
      {Dimension::flow_per_area, "L/min/m2", L / min},
      {Dimension::flow_per_area, "mL/min/m2", 1e-6 / min},
      {Dimension::infusion_rate, "mL/h", 1e-6 / h},
      {Dimension::infusion_rate, "mL/min", 1e-6 / min},
      {Dimension::infusion_rate, "L/h", L / h},
      {Dimension::drug_mass_concentration, "ug/mL", 1e-3},
      {Dimension::drug_mass_concentration, "mg/mL", 1.0},
      {Dimension::drug_mass_concentration, "ng/mL", 1e-6},
      {Dimension::drug_mass_concentration, "mg/L", 1e-3},
      {Dimension::drug_mass_concentration, "ug/L", 1e-6},
      {Dimension::drug_unit_concentration, "[iU]/mL", 1e6},
      {Dimension::drug_unit_concentration, "[iU]/L", 1e3},
      {Dimension::dose_per_kg, "ug/kg/min", 1e-9 / min},
      {Dimension::dose_per_kg, "ng/kg/min", 1e-12 / min},
      {Dimension::dose_per_kg, "ug/kg/h", 1e-9 / h},
      {Dimension::dose_per_kg, "mg/kg/h", 1e-6 / h},
      {Dimension::mass_dose, "ug/min", 1e-9 / min},
      {Dimension::mass_dose, "mg/min", 1e-6 / min},
      {Dimension::mass_dose, "ng/min", 1e-12 / min},
      {Dimension::mass_dose, "ug/h", 1e-9 / h},
      {Dimension::mass_dose, "mg/h", 1e-6 / h},
      {Dimension::unit_dose, "[iU]/min", 1.0 / min},
      {Dimension::unit_dose, "[iU]/h", 1.0 / h},
  };
  std::size_t in_table = 0;
  for (int d = 0; d <= static_cast<int>(Dimension::number); ++d) {
    const auto dimension = static_cast<Dimension>(d);
    for (const UnitSpelling& u : units_for(dimension)) {
      ++in_table;
      const auto ref = std::find_if(reference.begin(), reference.end(), [&](const Reference& r) {
        return r.dimension == dimension && u.ucum == r.ucum;
      });
      ASSERT_NE(ref, reference.end()) << "no reference factor for " << u.ucum;
      EXPECT_NEAR(u.to_si, ref->to_si, ref->to_si * ref->tolerance) << u.ucum;
      for (std::string_view spelled : u.spellings) {
        const std::string typed = "2 " + std::string(spelled);
        EXPECT_NEAR(parse_in_si(typed, dimension, Field{"f", ""}), 2 * ref->to_si,
                    2 * ref->to_si * ref->tolerance)
            << typed;
      }
    }
  }
  EXPECT_EQ(in_table, reference.size());
}

TEST(Parser, InUnitReadsTheStoredUnitExactly) {
  // A value typed in the unit asked for is the number typed (identity); other units convert
  // with the factors above (NIST SP 811, 2008): 0.2 mL/min = 12 mL/h.
  EXPECT_EQ(parse_in_unit("5.25", Dimension::infusion_rate, "mL/h", Field{"rate", "mL/h"}), 5.25);
  EXPECT_EQ(parse_in_unit("0.03U/min", Dimension::unit_dose, "[iU]/min", Field{"dose", ""}), 0.03);
  EXPECT_NEAR(parse_in_unit("0.2 mL/min", Dimension::infusion_rate, "mL/h", Field{"rate", ""}),
              12.0, 1e-12);
  EXPECT_THROW(parse_in_unit("5", Dimension::infusion_rate, "mL/h", Field{"rate", ""}),
               InputError);  // a bare number without a default unit
}

TEST(Parser, TypedQuantity) {
  const Pressure p = parse_quantity<Pressure>("2.45 kPa", Field{"peep", "cmH2O"});
  // 2.45 kPa = 24.98 cmH2O (NIST SP 811, 2008: 1 kPa = 10.1972 cmH2O).
  EXPECT_NEAR(in_cmH2O(p), 24.98, 0.01);
}

TEST(Parser, PlainNumberRejectsUnits) {
  EXPECT_DOUBLE_EQ(parse_number("42", Field{"age", ""}), 42.0);  // identity
  EXPECT_THROW(parse_number("42 years", Field{"age", ""}), InputError);
}

}  // namespace
}  // namespace bb
