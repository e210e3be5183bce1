// breathbeat calc mechanics, end to end.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const std::vector<std::string> kIssueExample = {
    "calc", "mechanics",    "--sex", "male",    "--height", "180cm", "--vt", "500mL", "--pplat",
    "25",   "--peep-total", "10",    "--ppeak", "30",       "--rr",  "20",   "--json"};

TEST(CalcMechanics, JsonEnvelopeAndCheckValues) {
  const CliResult r = run_cli(kIssueExample);
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  for (const char* key : {"tool", "version", "inputs", "results", "flags", "cautions"}) {
    EXPECT_TRUE(j.contains(key)) << key;
  }
  const auto& res = j["results"];
  // Brief section 3 check values: dP 15 cmH2O, Crs 33.3 mL/cmH2O, PBW 75.1 kg (ARDS Network
  // 2000), mechanical power 22.05 J/min (Gattinoni et al., ICM 2016;42:1567).
  EXPECT_NEAR(res["driving_pressure"]["value"].get<double>(), 15.0, 1e-9);
  EXPECT_EQ(res["driving_pressure"]["unit"], "cm[H2O]");
  EXPECT_NEAR(res["compliance_static"]["value"].get<double>(), 33.3, 0.05);
  EXPECT_EQ(res["compliance_static"]["unit"], "mL/cm[H2O]");
  EXPECT_NEAR(res["pbw"]["value"].get<double>(), 75.1, 0.05);
  EXPECT_EQ(res["pbw"]["unit"], "kg");
  EXPECT_NEAR(res["mechanical_power"]["value"].get<double>(), 22.05, 1e-6);
  EXPECT_EQ(res["mechanical_power"]["unit"], "J/min");
  EXPECT_FALSE(j["cautions"].empty());
  // Power 22.05 > 17 J/min (Serpa Neto 2018, from memory) is flagged; dP 15 is not (> 15).
  bool power_flag = false, dp_flag = false;
  for (const auto& f : j["flags"]) {
    power_flag |= f["key"] == "mechanical_power";
    dp_flag |= f["key"] == "driving_pressure";
  }
  EXPECT_TRUE(power_flag);
  EXPECT_FALSE(dp_flag);
}

TEST(CalcMechanics, KeysForFullInput) {
  const CliResult r = run_cli(
      {"calc",         "mechanics", "--sex",      "female", "--height", "165", "--vt",     "450",
       "--peep-total", "12",        "--set-peep", "10",     "--pplat",  "26",  "--ppeak",  "32",
       "--rr",         "18",        "--ti",       "1.0",    "--flow",   "50",  "--pes-ee", "9",
       "--pes-ei",     "13",        "--paco2",    "6.2kPa", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  for (const char* key :
       {"pbw", "vt_per_kg_pbw", "driving_pressure", "compliance_static", "compliance_dynamic",
        "resistance_airway", "mean_airway_pressure", "mechanical_power", "intrinsic_peep",
        "ventilatory_ratio", "elastance_ratio_cw_rs", "transpulmonary_pressure_ee",
        "transpulmonary_pressure_ei"}) {
    EXPECT_TRUE(j["results"].contains(key)) << key;
  }
  // Talmor et al., NEJM 2008;359:2095: PL,ee = PEEPtot - Pes,ee = 12 - 9 = 3 cmH2O.
  EXPECT_NEAR(j["results"]["transpulmonary_pressure_ee"]["value"].get<double>(), 3.0, 1e-6);
  // Intrinsic PEEP = 12 - 10 = 2 cmH2O (common practice, no source).
  EXPECT_NEAR(j["results"]["intrinsic_peep"]["value"].get<double>(), 2.0, 1e-6);
  // Ecw/Ers = dPes/dP = 4/14 = 0.2857 (Gattinoni/Chiumello 2008, from memory).
  EXPECT_NEAR(j["results"]["elastance_ratio_cw_rs"]["value"].get<double>(), 0.2857, 1e-3);
}

TEST(CalcMechanics, TextSaysWhatWasSkippedAndCautions) {
  const CliResult r =
      run_cli({"calc", "mechanics", "--vt", "500", "--pplat", "25", "--peep-total", "10"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("Driving pressure"), std::string::npos);
  EXPECT_NE(r.out.find("15.0 cmH2O"), std::string::npos);  // Amato 2015 definition, 25 - 10
  EXPECT_NE(r.out.find("Not computed"), std::string::npos);
  EXPECT_NE(r.out.find("Predicted body weight: needs --sex, --height"), std::string::npos);
  // Needs are named by the canonical options (field ids from the registry).
  EXPECT_NE(r.out.find("Intrinsic PEEP: needs --peep-total, --set-peep"), std::string::npos);
  EXPECT_NE(r.out.find("Airway resistance (constant-flow VC only): needs --ppeak, --pplat, "
                       "--flow, --mode vc"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("Cautions"), std::string::npos);
  EXPECT_TRUE(r.err.empty());
}

TEST(CalcMechanics, OldPeepOptionStillWorksWithANote) {
  // --peep is the old spelling of --peep-total: same answer, one note on stderr.
  const CliResult old_name =
      run_cli({"calc", "mechanics", "--vt", "500", "--pplat", "25", "--peep", "10", "--json"});
  const CliResult new_name = run_cli(
      {"calc", "mechanics", "--vt", "500", "--pplat", "25", "--peep-total", "10", "--json"});
  ASSERT_EQ(old_name.exit_code, 0) << old_name.err;
  ASSERT_EQ(new_name.exit_code, 0) << new_name.err;
  EXPECT_EQ(old_name.out, new_name.out);
  EXPECT_NE(old_name.err.find("'--peep' is an old spelling of '--peep-total'"), std::string::npos)
      << old_name.err;
  EXPECT_TRUE(new_name.err.empty());
  // JSON input keys are the field ids (Amato 2015 definition: dP 25 - 10 = 15 cmH2O).
  const auto j = parse_json(new_name);
  EXPECT_TRUE(j["inputs"].contains("peep_total"));
  EXPECT_NEAR(j["results"]["driving_pressure"]["value"].get<double>(), 15.0, 1e-9);
}

TEST(CalcMechanics, ChoicesMatchWithoutCase) {
  // PBW female 160 cm = 45.5 + 0.91 x 7.6 = 52.4 kg (ARDS Network 2000).
  const CliResult r = run_cli(
      {"calc", "mechanics", "--sex", "Female", "--height", "160", "--mode", "PC", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  EXPECT_EQ(j["inputs"]["sex"], "female");
  EXPECT_EQ(j["inputs"]["mode"], "pc");
  EXPECT_NEAR(j["results"]["pbw"]["value"].get<double>(), 52.416, 1e-3);
  const CliResult bad = run_cli({"calc", "mechanics", "--mode", "vcc"});
  EXPECT_EQ(bad.exit_code, 2);
  EXPECT_TRUE(bad.out.empty());
  EXPECT_NE(bad.err.find("--mode"), std::string::npos) << bad.err;
}

TEST(CalcMechanics, PlausibilityErrorNamesTheCanonicalOption) {
  // PEEP 0-30 cmH2O (brief section 10, common practice, no source).
  const CliResult r = run_cli({"calc", "mechanics", "--peep-total", "35"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("field '--peep-total'"), std::string::npos) << r.err;
}

TEST(CalcMechanics, UnitsAreEquivalent) {
  // NIST SP 811 (2008): 2.45 kPa = 24.98 cmH2O; 0.5 L = 500 mL.
  const auto a = parse_json(run_cli({"calc", "mechanics", "--vt", "0.5 L", "--pplat", "2.45kPa",
                                     "--peep-total", "10cmH2O", "--json"}));
  EXPECT_NEAR(a["results"]["driving_pressure"]["value"].get<double>(), 14.98, 0.01);
}

TEST(CalcMechanics, BadValueExits2NamingTheField) {
  const CliResult r = run_cli({"calc", "mechanics", "--pplat", "25 mL", "--peep-total", "10"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("--pplat"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("cmH2O"), std::string::npos) << r.err;
}

TEST(CalcMechanics, ContradictionExits2) {
  CliResult r = run_cli({"calc", "mechanics", "--pplat", "8", "--peep-total", "10", "--json"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("pplat"), std::string::npos) << r.err;
  r = run_cli({"calc", "mechanics", "--pplat", "25", "--ppeak", "20", "--peep-total", "10"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("ppeak"), std::string::npos) << r.err;
}

TEST(CalcMechanics, ImplausibleValueExits2UnlessAllowed) {
  // Brief section 10 (common practice, no source): Pplat 5-60 cmH2O.
  CliResult r = run_cli({"calc", "mechanics", "--pplat", "75", "--peep-total", "10"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("plausible"), std::string::npos) << r.err;
  r = run_cli({"calc", "mechanics", "--pplat", "75", "--peep-total", "10", "--allow-implausible"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
}

TEST(CalcMechanics, BadOptionExits2) {
  const CliResult r = run_cli({"calc", "mechanics", "--plateau", "25"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_FALSE(r.err.empty());
  EXPECT_EQ(run_cli({"calc", "mechanics", "--sex", "other"}).exit_code, 2);
  EXPECT_EQ(run_cli({"calc", "mechanics", "--vt", "nan"}).exit_code, 2);
}

TEST(Cli, VersionAndHelp) {
  CliResult r = run_cli({"--version"});
  EXPECT_EQ(r.exit_code, 0);
  EXPECT_NE(r.out.find("breathbeat"), std::string::npos);
  r = run_cli({"--help"});
  EXPECT_EQ(r.exit_code, 0);
  EXPECT_NE(r.out.find("calc"), std::string::npos);
  r = run_cli({"calc", "mechanics", "--help"});
  EXPECT_EQ(r.exit_code, 0);
  EXPECT_NE(r.out.find("--pplat"), std::string::npos);
}

TEST(Cli, SiteThresholdsChangeFlags) {
  const std::string dir = temp_dir("site");
  const std::string site = dir + "/site.toml";
  {
    std::ofstream(site) << "[mechanics.driving_pressure_max]\nvalue = 12\nunit = \"cmH2O\"\n"
                           "source = \"local protocol\"\n";
  }
  const auto j = parse_json(run_cli({"calc", "mechanics", "--vt", "450", "--pplat", "24",
                                     "--peep-total", "10", "--thresholds", site, "--json"}));
  bool dp_flag = false;
  for (const auto& f : j["flags"]) dp_flag |= f["key"] == "driving_pressure";
  EXPECT_TRUE(dp_flag);  // dP 14 > site limit 12 (site file, common practice, no source)
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace bb::test
