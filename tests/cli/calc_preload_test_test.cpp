// breathbeat calc preload-test end to end: each test around its cut-off, the fluid
// record, overrides and bad input.
#include <gtest/gtest.h>

#include <fstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

nlohmann::json preload(std::vector<std::string> extra) {
  std::vector<std::string> args{"calc", "preload-test", "--json"};
  args.insert(args.end(), extra.begin(), extra.end());
  const CliResult r = run_cli(args);
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return parse_json(r);
}

std::string category(std::vector<std::string> extra) {
  return preload(std::move(extra))["reading"]["category"].get<std::string>();
}

TEST(CalcPreloadTest, TidalVolumeChallenge) {
  // Absolute PPV rise >= 3.5 points after VT 6 -> 8 mL/kg PBW (Myatra et al., Crit Care Med
  // 2017;45:415)
  const auto j = preload({"--kind", "vt_challenge", "--before", "6", "--after", "9.5",
                          "--vt-before", "6", "--vt-after", "8", "--passive"});
  EXPECT_EQ(j["reading"]["category"], "responsive");
  // JSON input keys are the field ids; the tidal volumes are per kg PBW on the command line.
  EXPECT_NEAR(j["inputs"]["vt_before"]["value"].get<double>(), 6.0, 1e-9);
  EXPECT_EQ(j["inputs"]["vt_before"]["unit"], "mL/kg");
  EXPECT_NEAR(j["results"]["change"]["value"].get<double>(), 3.5, 1e-6);  // points, by hand
  EXPECT_EQ(category({"--kind", "vt-challenge", "--before", "6", "--after", "9.4"}),
            "not_responsive");  // +3.4
  // VT only raised to 7 mL/kg: not the published step (Myatra et al., Crit Care Med 2017;45:415)
  EXPECT_EQ(category({"--kind", "vt-challenge", "--before", "6", "--after", "12", "--vt-before",
                      "6", "--vt-after", "7"}),
            "not_interpretable");
}

TEST(CalcPreloadTest, EndExpiratoryOcclusion) {
  // CO rise >= 5 % over a 15 s hold (Monnet et al., Crit Care Med 2009;37:951)
  EXPECT_EQ(
      category({"--kind", "eeo", "--before", "4.0 L/min", "--after", "4.2 L/min", "--hold", "15"}),
      "responsive");
  EXPECT_EQ(category({"--kind", "eeo", "--measure", "co", "--before", "4.0", "--after", "4.19",
                      "--hold", "15"}),
            "not_responsive");
  EXPECT_EQ(
      category({"--kind", "eeo", "--before", "4.0L/min", "--after", "4.4L/min", "--hold", "8"}),
      "not_interpretable");
}

TEST(CalcPreloadTest, PassiveLegRaising) {
  // CO rise >= 10 % (Monnet et al., Crit Care Med 2006;34:1402)
  const auto j = preload({"--kind", "plr", "--before", "5.0 L/min", "--after", "5.5 L/min"});
  EXPECT_EQ(j["reading"]["category"], "responsive");
  EXPECT_NEAR(j["results"]["change"]["value"].get<double>(), 10.0, 1e-6);  // (5.5 - 5)/5, by hand
  EXPECT_EQ(j["results"]["change"]["unit"], "%");
  EXPECT_EQ(category({"--kind", "plr", "--before", "5.0 L/min", "--after", "5.45 L/min"}),
            "not_responsive");  // +9 %
  // Same change in mL/min (5000 -> 5500 mL/min) reads the same (units are types)
  EXPECT_EQ(category({"--kind", "plr", "--before", "5000 mL/min", "--after", "5500mL/min"}),
            "responsive");
  // By LVOT VTI: 20 -> 22 cm, +10 % (Monnet et al., Crit Care Med 2006;34:1402)
  EXPECT_EQ(category({"--kind", "plr", "--measure", "vti", "--before", "20", "--after", "22"}),
            "responsive");
}

TEST(CalcPreloadTest, FluidChallengeRecordAndBothCutOffs) {
  // SV 60 -> 68 mL is +13.3 %: between 10 % and 15 % (Cecconi et al., ICM 2015, from memory)
  const auto j = preload({"--kind", "fluid", "--measure", "sv", "--before", "60", "--after", "68",
                          "--volume", "250", "--duration", "10", "--fluid", "crystalloid"});
  EXPECT_EQ(j["reading"]["category"], "between_cut_offs");
  EXPECT_NEAR(j["results"]["cut_off"]["value"].get<double>(), 10.0,
              1e-9);  // Cecconi 2015, from memory
  EXPECT_NEAR(j["results"]["cut_off_high"]["value"].get<double>(), 15.0,
              1e-9);  // Cecconi 2015, from memory
  // 250 mL over 10 min = 25 mL/min (by hand); both outside 300-500 mL / 20-30 min
  // (common practice, no source): flagged, not refused
  EXPECT_NEAR(j["results"]["fluid_rate"]["value"].get<double>(), 25.0, 1e-6);
  ASSERT_EQ(j["flags"].size(), 2u);
  EXPECT_EQ(j["inputs"]["fluid"], "crystalloid");
  const auto usual =
      preload({"--kind", "fluid_challenge", "--before", "4.0 L/min", "--after", "4.6 L/min",
               "--volume", "500", "--duration", "30", "--fluid", "albumin"});
  EXPECT_TRUE(usual["flags"].empty());
  EXPECT_EQ(usual["reading"]["category"],
            "responsive");  // +15 % (Cecconi et al., ICM 2015, from memory)
}

TEST(CalcPreloadTest, MiniFluidChallenge) {
  // VTI rise >= 10 % after 100 mL over 1 min (Muller et al., Anesthesiology 2011;115:541)
  EXPECT_EQ(category({"--kind", "mini-fluid", "--before", "18", "--after", "19.8", "--volume",
                      "100", "--duration", "1"}),
            "responsive");
  EXPECT_EQ(category({"--kind", "Mini_Fluid", "--before", "180mm", "--after", "197mm"}),
            "not_responsive");
}

TEST(CalcPreloadTest, ThresholdFileChangesTheReading) {
  // +8 % after PLR is below the built-in 10 % (Monnet et al., Crit Care Med 2006;34:1402)
  const std::string dir = temp_dir("preload_thresholds");
  const std::string file = dir + "/site.toml";
  std::ofstream(file) << "[preload_tests.plr_co_rise]\nvalue = 7\nunit = \"%\"\n";
  EXPECT_EQ(category({"--kind", "plr", "--before", "5.0 L/min", "--after", "5.4 L/min"}),
            "not_responsive");
  EXPECT_EQ(category({"--kind", "plr", "--before", "5.0 L/min", "--after", "5.4 L/min",
                      "--thresholds", file}),
            "responsive");
}

void expect_preload_refused(const std::vector<std::string>& extra, const std::string& field) {
  std::vector<std::string> args{"calc", "preload-test"};
  args.insert(args.end(), extra.begin(), extra.end());
  const CliResult r = run_cli(args);
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find(field), std::string::npos) << r.err;
}

TEST(CalcPreloadTest, BadInputExitsTwoNamingTheField) {
  expect_preload_refused({"--kind", "plr", "--before", "-5 L/min", "--after", "5.5 L/min"},
                         "before");
  expect_preload_refused({"--kind", "plr", "--before", "5 L/min", "--after", "abc"}, "after");
  expect_preload_refused({"--kind", "plr", "--before", "5 mmHg", "--after", "5.5"},
                         "before");  // a unit that names no measure
  expect_preload_refused(
      {"--kind", "mini-fluid", "--measure", "co", "--before", "5", "--after", "5.5"}, "measure");
  expect_preload_refused(
      {"--kind", "fluid", "--before", "5 L/min", "--after", "5.5", "--volume", "-250"}, "volume");
  expect_preload_refused({"--kind", "nonsense", "--before", "5", "--after", "5.5"}, "kind");
  expect_preload_refused({"--kind", "plr", "--before", "5"}, "after");  // missing
}

// ---- the measure from the unit of --before/--after --------------------------------------

TEST(CalcPreloadTest, TheUnitNamesTheMeasure) {
  // cm -> LVOT VTI, L/min -> cardiac output, mL -> stroke volume, % -> PPV. PLR judged by a
  // rise >= 10 % in each (Monnet et al., Crit Care Med 2006;34:1402): 16 -> 18 is +12.5 % by
  // hand, whichever it measures.
  for (const auto& [unit, measure] :
       {std::pair{"cm", "vti"}, std::pair{"L/min", "co"}, std::pair{"mL", "sv"}}) {
    const auto j = preload({"--kind", "plr", "--before", std::string("16 ") + unit, "--after",
                            std::string("18 ") + unit});
    EXPECT_EQ(j["inputs"]["measure"], measure) << unit;
    EXPECT_EQ(j["reading"]["category"], "responsive") << unit;
    EXPECT_NEAR(j["results"]["change"]["value"].get<double>(), 12.5, 1e-6) << unit;
  }
  // Any unit of a length is a VTI: 160 -> 180 mm, the same +12.5 % (same source).
  EXPECT_EQ(
      preload({"--kind", "plr", "--before", "160 mm", "--after", "180 mm"})["inputs"]["measure"],
      "vti");
  // A VT challenge in %: PPV 6 -> 9.5 %, +3.5 points (Myatra et al., Crit Care Med 2017;45:415).
  const auto ppv = preload({"--kind", "vt_challenge", "--before", "6%", "--after", "9.5 %"});
  EXPECT_EQ(ppv["inputs"]["measure"], "ppv");
  EXPECT_EQ(ppv["reading"]["category"], "responsive");
}

TEST(CalcPreloadTest, SixteenCentimetresAreNeverSixteenLitresPerMinute) {
  // LVOT VTI 16 -> 18 cm after PLR (+12.5 % by hand, >= 10 %: Monnet et al., Crit Care Med
  // 2006;34:1402) is a VTI, not a cardiac output of 16 L/min.
  const auto j = preload({"--kind", "plr", "--before", "16cm", "--after", "18cm"});
  EXPECT_EQ(j["inputs"]["measure"], "vti");
  EXPECT_EQ(j["inputs"]["before"]["unit"], "cm");
  EXPECT_NEAR(j["inputs"]["before"]["value"].get<double>(), 16.0, 1e-9);
  // One unit is enough; the bare other value is read in it.
  const auto one = preload({"--kind", "plr", "--before", "16", "--after", "18 cm"});
  EXPECT_EQ(one["inputs"]["measure"], "vti");
}

TEST(CalcPreloadTest, BareNumbersForATestOfSeveralMeasuresAreRefused) {
  // PLR is judged by CO, SV or VTI (Monnet et al., Crit Care Med 2006;34:1402): "16" could be
  // any of them. Refused, suggesting the units and --measure.
  const CliResult r =
      run_cli({"calc", "preload-test", "--kind", "plr", "--before", "16", "--after", "18"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("field '--before'"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("has no unit"), std::string::npos) << r.err;
  for (const char* hint : {"16 L/min", "16 mL", "16 cm", "--measure co|sv|vti"}) {
    EXPECT_NE(r.err.find(hint), std::string::npos) << hint << " in " << r.err;
  }
  // A test with one measure reads a bare number in its unit: mini fluid VTI in cm, +10 %
  // (Muller et al., Anesthesiology 2011;115:541).
  EXPECT_EQ(category({"--kind", "mini-fluid", "--before", "18", "--after", "19.8"}), "responsive");
}

TEST(CalcPreloadTest, UnitsThatDisagreeAreRefused) {
  // Before and after of different measures, a unit against --measure, and a measure the test
  // is not judged by (mini fluid: VTI only, Muller et al., Anesthesiology 2011;115:541).
  expect_preload_refused({"--kind", "plr", "--before", "16 cm", "--after", "5 L/min"},
                         "field '--after'");
  expect_preload_refused(
      {"--kind", "plr", "--measure", "co", "--before", "16 cm", "--after", "18 cm"},
      "field '--measure'");
  expect_preload_refused({"--kind", "mini-fluid", "--before", "5 L/min", "--after", "5.5 L/min"},
                         "field '--before'");
  const CliResult r = run_cli({"calc", "preload-test", "--kind", "plr", "--measure", "co",
                               "--before", "16 cm", "--after", "18 cm"});
  EXPECT_NE(r.err.find("--measure vti"), std::string::npos) << r.err;
}

}  // namespace
}  // namespace bb::test
