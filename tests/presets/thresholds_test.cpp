// The preset files: every entry has a source, units parse, overrides work and
// are checked.
#include <gtest/gtest.h>

#include "breathbeat/presets.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {
namespace {

TEST(Presets, EmbeddedFilesPresent) {
  EXPECT_TRUE(presets::find("thresholds/mechanics.toml"));
  EXPECT_TRUE(presets::find("plausibility.toml"));
  EXPECT_FALSE(presets::find("no/such.toml"));
}

TEST(Presets, EveryEntryNamesASource) {
  const Thresholds t = Thresholds::built_in();
  ASSERT_FALSE(t.entries().empty());
  for (const auto& [key, e] : t.entries()) {
    EXPECT_FALSE(e.source.empty()) << key;
  }
}

TEST(Presets, MechanicsLimits) {
  const Thresholds t = Thresholds::built_in();
  // ARDS Network, NEJM 2000;342:1301: Pplat 30 cmH2O.
  EXPECT_NEAR(in_cmH2O(t.get<Pressure>("mechanics.pplat_max")), 30.0, 1e-9);
  // Amato et al., NEJM 2015;372:747: driving pressure 15 cmH2O.
  EXPECT_NEAR(in_cmH2O(t.get<Pressure>("mechanics.driving_pressure_max")), 15.0, 1e-9);
  // Serpa Neto et al., ICM 2018;44:1914 (from memory): 17 J/min.
  EXPECT_NEAR(in_J_per_min(t.get<Power>("mechanics.mechanical_power_max")), 17.0, 1e-9);
  EXPECT_THROW(t.get<Volume>("mechanics.pplat_max"), std::logic_error);  // wrong dimension
  EXPECT_THROW(t.get<Pressure>("mechanics.no_such"), std::logic_error);
}

TEST(Overrides, SiteFileChangesAValue) {
  Thresholds t = Thresholds::built_in();
  t.load_overrides_text("[mechanics.pplat_max]\nvalue = 2.8\nunit = \"kPa\"\n", "site.toml");
  // 2.8 kPa = 28.55 cmH2O (NIST SP 811, 2008: 1 kPa = 10.1972 cmH2O).
  EXPECT_NEAR(in_cmH2O(t.get<Pressure>("mechanics.pplat_max")), 28.55, 0.01);
  EXPECT_NE(t.source("mechanics.pplat_max").find("site.toml"), std::string::npos);
}

TEST(Overrides, UnknownKeySuggestsTheNearest) {
  Thresholds t = Thresholds::built_in();
  try {
    t.load_overrides_text("[mechanics.plat_max]\nvalue = 28\nunit = \"cmH2O\"\n", "site.toml");
    FAIL();
  } catch (const InputError& e) {
    const std::string msg = e.what();
    EXPECT_NE(msg.find("site.toml:1:1"), std::string::npos) << msg;
    EXPECT_NE(msg.find("mechanics.pplat_max"), std::string::npos) << msg;
  }
}

TEST(Overrides, WrongDimensionRefused) {
  Thresholds t = Thresholds::built_in();
  EXPECT_THROW(
      t.load_overrides_text("[mechanics.pplat_max]\nvalue = 28\nunit = \"mL\"\n", "s.toml"),
      InputError);
}

TEST(Overrides, MalformedTomlIsLocated) {
  Thresholds t = Thresholds::built_in();
  try {
    t.load_overrides_text("[mechanics.pplat_max]\nvalue = = 28\n", "bad.toml");
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("bad.toml:2:"), std::string::npos) << e.what();
  }
}

TEST(Plausibility, RangeIsInclusive) {
  const Thresholds t = Thresholds::built_in();
  // Plausibility range (common practice, no source): FiO2 0.21-1.0.
  EXPECT_NO_THROW(t.check_plausible("fio2", fraction(0.21)));
  EXPECT_NO_THROW(t.check_plausible("fio2", fraction(1.0)));
  EXPECT_THROW(t.check_plausible("fio2", fraction(1.01)), InputError);
  EXPECT_THROW(t.check_plausible("fio2", fraction(0.2)), InputError);
}

TEST(DidYouMean, ClosestMatch) {
  EXPECT_EQ(closest_match("pplt", {"pplat", "ppeak", "peep"}).value_or(""), "pplat");
  EXPECT_FALSE(closest_match("zzzzzzzz", {"pplat", "ppeak"}));
  // A step label typed in another case (common practice, no source).
  EXPECT_EQ(closest_match("peep 12", {"PEEP 8", "PEEP 12"}).value_or(""), "PEEP 12");
  // A word cut short finds the one candidate it begins with; two such candidates are too
  // little to guess from (common practice, no source).
  EXPECT_EQ(closest_match("--vt", {"--svv", "--vt-per-kg", "--hr"}).value_or(""), "--vt-per-kg");
  EXPECT_EQ(closest_match("--CR", {"--crs", "--co"}).value_or(""), "--crs");
  EXPECT_FALSE(closest_match("--pp", {"--pp-cycles", "--ppv-site"}));
}

TEST(Overrides, InfusionDoseRangesKeepTheirKindOfUnit) {
  // Usual dose ranges are written in dose units (presets/thresholds/infusion.toml); a site file
  // may write them in another unit of the same kind, not in another kind. Vasopressin up to
  // 0.04 U/min (Dellinger et al., Crit Care Med 2013;41:580) = 2.4 U/h (h = 60 min).
  Thresholds t = Thresholds::built_in();
  ASSERT_TRUE(t.has("infusion.usual_vasopressin_high"));
  EXPECT_EQ(t.entry("infusion.usual_vasopressin_high").unit, "U/min");
  EXPECT_NO_THROW(t.load_overrides_text(
      "[infusion.usual_vasopressin_high]\nvalue = 2.4\nunit = \"U/h\"\n", "site.toml"));
  EXPECT_THROW(
      t.load_overrides_text(
          "[infusion.usual_vasopressin_high]\nvalue = 0.04\nunit = \"ug/kg/min\"\n", "site.toml"),
      InputError);
  // Angiotensin II in ng/kg/min (Khanna et al., N Engl J Med 2017;377:419); mcg/kg/min is the
  // same kind of unit, mL/h is not.
  EXPECT_NO_THROW(t.load_overrides_text(
      "[infusion.usual_angiotensin_ii_high]\nvalue = 0.04\nunit = \"mcg/kg/min\"\n", "site.toml"));
  EXPECT_THROW(t.load_overrides_text(
                   "[infusion.usual_angiotensin_ii_high]\nvalue = 40\nunit = \"mL/h\"\n", "s.toml"),
               InputError);
  // The guideline's norepinephrine range for adding vasopressin: 0.25-0.5 ug/kg/min (Evans et
  // al., Intensive Care Med 2021;47:1181).
  EXPECT_EQ(t.entry("infusion.vasopressin_consider_ne_low").value, 0.25);
  EXPECT_EQ(t.entry("infusion.vasopressin_consider_ne_high").value, 0.5);
  EXPECT_NE(t.source("infusion.vasopressin_consider_ne_low").find("Evans"), std::string::npos);
}

}  // namespace
}  // namespace bb
