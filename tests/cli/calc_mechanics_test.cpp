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
  // Hand-worked: dP 25 - 10 = 15 cmH2O (Amato et al., NEJM 2015;372:747), Crs 500/15 = 33.3
  // mL/cmH2O (common practice, no source), PBW 75.1 kg (ARDS Network, NEJM 2000;342:1301),
  // mechanical power 22.05 J/min (Gattinoni et al., ICM 2016;42:1567).
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
  // PEEP 0-30 cmH2O (presets/plausibility.toml; common practice, no source).
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
  // presets/plausibility.toml (common practice, no source): Pplat 5-60 cmH2O.
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

TEST(CalcMechanics, AmbiguousPinspIsRefusedAskingWhichIsMeant) {
  // Ventilators show the PC pressure either above PEEP or as total pressure (common practice,
  // no source): a bare --pinsp is refused, naming both options.
  const CliResult r =
      run_cli({"calc", "mechanics", "--mode", "pc", "--pinsp", "25", "--set-peep", "10"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("--pinsp"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("--pc-pressure-total"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("--pc-pressure-above-peep"), std::string::npos) << r.err;
  // Hidden from --help; the two new options are listed.
  const CliResult help = run_cli({"calc", "mechanics", "--help"});
  EXPECT_EQ(help.out.find("--pinsp"), std::string::npos);
  EXPECT_NE(help.out.find("--pc-pressure-total"), std::string::npos);
  EXPECT_NE(help.out.find("--pc-pressure-above-peep"), std::string::npos);
}

TEST(CalcMechanics, PressureControlTotalAndAbovePeepAgree) {
  // PC 15 above set PEEP 10 = 25 total (common practice, no source); no plateau hold: dP = 25 -
  // 10 = 15 cmH2O assuming zero end-inspiratory flow, power 0.098 x 20 x 0.45 x 25 = 22.05 J/min
  // (Becher et al., Intensive Care Med 2019, from memory).
  const std::vector<std::string> base = {"calc", "mechanics", "--mode", "pc",   "--set-peep",
                                         "10",   "--vt",      "450",    "--rr", "20",
                                         "--ti", "1.0",       "--json"};
  auto with = [&](std::vector<std::string> extra) {
    std::vector<std::string> args = base;
    args.insert(args.end(), extra.begin(), extra.end());
    return run_cli(args);
  };
  const CliResult total = with({"--pc-pressure-total", "25"});
  const CliResult above = with({"--pc-pressure-above-peep", "15"});
  ASSERT_EQ(total.exit_code, 0) << total.err;
  ASSERT_EQ(above.exit_code, 0) << above.err;
  for (const CliResult* r : {&total, &above}) {
    const auto j = parse_json(*r);
    EXPECT_NEAR(j["results"]["driving_pressure"]["value"].get<double>(), 15.0, 1e-9);
    EXPECT_NEAR(j["results"]["mechanical_power"]["value"].get<double>(), 22.05, 1e-9);
    bool note = false;
    for (const auto& n : j["notes"]) {
      note |=
          n.get<std::string>().find("assumes zero flow at end-inspiration") != std::string::npos;
    }
    EXPECT_TRUE(note) << j["notes"].dump();
  }
  // Typed the other way round (15 as if it were total) the driving pressure would be 5: the
  // two names make the mistake impossible to make silently.
  const CliResult both = with({"--pc-pressure-total", "25", "--pc-pressure-above-peep", "15"});
  EXPECT_EQ(both.exit_code, 2);
  EXPECT_NE(both.err.find("--pc-pressure-above-peep"), std::string::npos) << both.err;
}

TEST(CalcMechanics, FlowTimeLongerThanTiExits2) {
  // 500 mL at 20 L/min takes 1.5 s > Ti 1.0 s (constant-flow VC; common practice, no source).
  const CliResult r =
      run_cli({"calc", "mechanics", "--vt", "500", "--flow", "20", "--ti", "1.0", "--rr", "20"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("--flow"), std::string::npos) << r.err;
}

TEST(CalcMechanics, TrialFileRefusesPinspAndReadsThePcPressures) {
  // The same question in a trial file: ventilator.pinsp is refused naming both keys.
  const std::string dir = temp_dir("pinsp");
  const std::string file = dir + "/t.toml";
  const std::string head =
      "[patient]\nsex = \"male\"\nheight = 175\n\n[[step]]\nlabel = \"A\"\n"
      "[step.ventilator]\nmode = \"pc\"\nset_peep = 10\nvt = 450\nrr = 20\nti = 1.0\n";
  std::ofstream(file) << head << "pinsp = 25\n";
  CliResult r = run_cli({"check", file});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("ventilator.pinsp"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("pc_pressure_total"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("pc_pressure_above_peep"), std::string::npos) << r.err;
  // Above PEEP: 10 + 15 = 25 total, dP 15 cmH2O from the set pressure (common practice, no
  // source; zero end-inspiratory flow assumed, stated in the report).
  std::ofstream(file) << head << "pc_pressure_above_peep = 15\n";
  r = run_cli({"report", file, "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& step = j["steps"][0];
  bool note = false;
  for (const auto& n : step["notes"])
    note |= n.get<std::string>().find("assumes zero flow at end-inspiration") != std::string::npos;
  EXPECT_TRUE(note) << step["notes"].dump();
  ASSERT_TRUE(step["mechanics"].contains("driving_pressure")) << step["mechanics"].dump();
  EXPECT_NEAR(step["mechanics"]["driving_pressure"]["value"].get<double>(), 15.0, 1e-9);
  std::filesystem::remove_all(dir);
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
