// End-to-end: breathbeat calc oxygen, text and JSON, unit variants and bad input.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

std::vector<std::string> oxygen_args(std::vector<std::string> extra) {
  std::vector<std::string> args = {"calc", "oxygen", "--json"};
  args.insert(args.end(), extra.begin(), extra.end());
  return args;
}

nlohmann::json run_json(const std::vector<std::string>& extra) {
  const CliResult r = run_cli(oxygen_args(extra));
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.err, "");
  return parse_json(r);
}

double result(const nlohmann::json& j, const std::string& key) {
  if (!j["results"].contains(key)) {
    ADD_FAILURE() << "no result " << key << " in " << j["results"].dump();
    return 0.0;
  }
  return j["results"][key]["value"].get<double>();
}

// A hand-worked check case (Marino, The ICU Book, from memory): Hb 15 g/dL, SaO2 0.98,
// PaO2 100 mmHg, CO 5 L/min, FiO2 0.21, PaCO2 40 mmHg at sea level.
const std::vector<std::string> kCheckCase = {"--hb", "15", "--sao2", "0.98", "--pao2",  "100",
                                             "--co", "5",  "--fio2", "0.21", "--paco2", "40"};

TEST(CalcOxygen, HandWorkedCheckValuesInJson) {
  const nlohmann::json j = run_json(kCheckCase);
  EXPECT_EQ(j["command"], "calc oxygen");
  // CaO2 20.0 mL/dL, DO2 1000 mL/min, PAO2 99.7 mmHg (hand-worked on Marino, The ICU Book;
  // West, Respiratory Physiology, from memory).
  EXPECT_NEAR(result(j, "cao2"), 20.0, 0.05);
  EXPECT_EQ(j["results"]["cao2"]["unit"], "mL/dL");
  EXPECT_NEAR(result(j, "do2"), 1000.0, 0.5);
  EXPECT_EQ(j["results"]["do2"]["unit"], "mL/min");
  EXPECT_NEAR(result(j, "pao2_alveolar"), 99.7, 0.05);
  EXPECT_EQ(j["results"]["pao2_alveolar"]["unit"], "mm[Hg]");
  // P/F = 100 / 0.21 = 476 mmHg: Berlin category none, conditional (no PEEP given).
  EXPECT_NEAR(result(j, "pf_ratio"), 476.19, 0.01);
  EXPECT_EQ(j["reading"]["key"], "pf_ratio");
  EXPECT_EQ(j["reading"]["category"], "none");
  ASSERT_EQ(j["gates"].size(), 1u);
  EXPECT_EQ(j["gates"][0]["key"], "berlin_peep");
  EXPECT_EQ(j["gates"][0]["state"], "unknown");
  EXPECT_FALSE(j["cautions"].empty());
}

TEST(CalcOxygen, EveryNamedKeyWithAFullSet) {
  // A full set of inputs: every key named in issue 3 is present.
  const nlohmann::json j =
      run_json({"--hb",     "12",  "--sao2",   "94%", "--spo2",  "93", "--pao2",       "70",
                "--paco2",  "45",  "--fio2",   "0.6", "--svo2",  "65", "--pvo2",       "35",
                "--co",     "5.5", "--pmean",  "18",  "--peco2", "30", "--peep-total", "10",
                "--height", "175", "--weight", "80",  "--age",   "60"});
  for (const char* key :
       {"cao2", "cvo2", "do2", "do2i", "vo2", "o2_extraction", "pao2_alveolar", "aa_gradient",
        "pf_ratio", "sf_ratio", "oxygenation_index", "oxygen_saturation_index", "shunt_fraction",
        "dead_space_fraction", "bsa"}) {
    EXPECT_TRUE(j["results"].contains(key)) << key;
  }
  EXPECT_EQ(j["results"]["do2i"]["unit"], "mL/min/m2");
  EXPECT_EQ(j["results"]["bsa"]["unit"], "m2");
  // P/F 70 / 0.6 = 117 mmHg with PEEP 10: moderate (ARDS Definition Task Force, JAMA 2012).
  EXPECT_EQ(j["reading"]["category"], "moderate");
  EXPECT_EQ(j["gates"][0]["state"], "met");
  // VD/VT (45 - 30)/45 = 0.333 (Bohr-Enghoff, by hand); OI 0.6*18*100/70 = 15.43 (PALICC 2015).
  EXPECT_NEAR(result(j, "dead_space_fraction"), 1.0 / 3.0, 1e-4);
  EXPECT_NEAR(result(j, "oxygenation_index"), 0.6 * 18 * 100 / 70.0, 0.01);
  // S/F 93 / 0.6 = 155 (Matthay et al., AJRCCM 2024), shown without decimals.
  EXPECT_NEAR(result(j, "sf_ratio"), 155.0, 0.01);
}

TEST(CalcOxygen, TextOutputShowsResultsReadingAndCautions) {
  std::vector<std::string> args = {"calc", "oxygen"};
  args.insert(args.end(), kCheckCase.begin(), kCheckCase.end());
  const CliResult r = run_cli(args);
  const CliResult low = run_cli({"calc", "oxygen", "--pao2", "75", "--fio2", "0.5"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("Arterial O2 content (CaO2)"), std::string::npos);
  EXPECT_NE(r.out.find("20.0 mL/dL"), std::string::npos);
  EXPECT_NE(r.out.find("1000 mL/min"), std::string::npos);
  EXPECT_NE(r.out.find("99.7 mmHg"), std::string::npos);
  EXPECT_NE(r.out.find("outside the Berlin ARDS oxygenation bands"), std::string::npos);
  EXPECT_NE(r.out.find("Cautions"), std::string::npos);
  // P/F 150 without PEEP: the category is shown as conditional on PEEP >= 5 cmH2O.
  ASSERT_EQ(low.exit_code, 0) << low.err;
  EXPECT_NE(low.out.find("Conditional"), std::string::npos);
  EXPECT_NE(low.out.find("moderate"), std::string::npos);
}

TEST(CalcOxygen, BerlinBoundariesFromTheCommandLine) {
  // ARDS Definition Task Force, JAMA 2012;307:2526: severe <= 100 < moderate <= 200 < mild <= 300.
  // FiO2 0.5 with PaO2 150, 100, 50 gives P/F exactly 300, 200, 100 mmHg.
  struct Case {
    std::string pao2, category;
  };
  for (const Case& c : {Case{"151", "none"}, Case{"150", "mild"}, Case{"101", "mild"},
                        Case{"100", "moderate"}, Case{"51", "moderate"}, Case{"50", "severe"}}) {
    const nlohmann::json j = run_json({"--pao2", c.pao2, "--fio2", "0.5", "--peep-total", "5"});
    EXPECT_EQ(j["reading"]["category"], c.category) << "PaO2 " << c.pao2;
    EXPECT_EQ(j["gates"][0]["state"], "met");
  }
  // PEEP below 5 cmH2O: the categories do not apply.
  const nlohmann::json low = run_json({"--pao2", "75", "--fio2", "0.5", "--peep-total", "4"});
  EXPECT_EQ(low["reading"]["category"], "not_applicable");
  EXPECT_EQ(low["gates"][0]["state"], "failed");
}

TEST(CalcOxygen, PressuresInKpaGiveTheSameAnswerAsMmHg) {
  // 1 kPa = 7.50062 mmHg (NIST SP 811, 2008): 13.3322 kPa = 100 mmHg, 5.3329 kPa = 40 mmHg,
  // 101.325 kPa = 760 mmHg.
  const nlohmann::json mm = run_json({"--hb", "15", "--sao2", "0.98", "--pao2", "100", "--paco2",
                                      "40", "--fio2", "0.21", "--pb", "760"});
  const nlohmann::json kpa =
      run_json({"--hb", "15", "--sao2", "0.98", "--pao2", "13.3322kPa", "--paco2", "5.3329 kPa",
                "--fio2", "0.21", "--pb", "101.325kPa"});
  for (const char* key : {"cao2", "pao2_alveolar", "aa_gradient", "pf_ratio"}) {
    EXPECT_NEAR(result(mm, key), result(kpa, key), 0.01) << key;
  }
}

TEST(CalcOxygen, HaemoglobinUnitsGiveTheSameAnswer) {
  // 15 g/dL = 150 g/L; 9.311 mmol/L x 1.611 = 15.0 g/dL (Hb monomer 16.11 kDa: common
  // practice, no source; monomer mass from memory).
  const double g_dl = result(run_json({"--hb", "15", "--sao2", "0.98", "--pao2", "100"}), "cao2");
  const double g_l =
      result(run_json({"--hb", "150 g/L", "--sao2", "0.98", "--pao2", "100"}), "cao2");
  const double mmol =
      result(run_json({"--hb", "9.311mmol/L", "--sao2", "0.98", "--pao2", "100"}), "cao2");
  EXPECT_NEAR(g_dl, g_l, 1e-9);
  EXPECT_NEAR(g_dl, mmol, 0.005);
}

TEST(CalcOxygen, SaturationsAsFractionPercentOrPercentSign) {
  // The parser's fraction rule: "0.98", "98" and "98%" are the same saturation.
  const double frac = result(run_json({"--hb", "15", "--sao2", "0.98"}), "cao2");
  const double bare = result(run_json({"--hb", "15", "--sao2", "98"}), "cao2");
  const double sign = result(run_json({"--hb", "15", "--sao2", "98%"}), "cao2");
  EXPECT_NEAR(frac, bare, 1e-9);
  EXPECT_NEAR(frac, sign, 1e-9);
  const double fio2_pct = result(run_json({"--pao2", "80", "--fio2", "40%"}), "pf_ratio");
  EXPECT_NEAR(fio2_pct, 200.0, 1e-6);
}

TEST(CalcOxygen, CardiacIndexWithOrWithoutUnit) {
  // CI 3 L/min/m2 with CaO2 19.998 mL/dL -> DO2I 599.94 mL/min/m2 (arithmetic, textbook).
  for (const std::string ci : {"3", "3 L/min/m2", "3000mL/min/m2"}) {
    const nlohmann::json j =
        run_json({"--hb", "15", "--sao2", "0.98", "--pao2", "100", "--ci", ci});
    EXPECT_NEAR(result(j, "do2i"), 599.94, 0.01) << ci;
  }
  const CliResult bad = run_cli(oxygen_args({"--hb", "15", "--sao2", "0.98", "--ci", "3 L/min"}));
  EXPECT_EQ(bad.exit_code, 2);
  EXPECT_EQ(bad.out, "");
  EXPECT_NE(bad.err.find("--ci"), std::string::npos);
}

TEST(CalcOxygen, BsaFromHeightAndWeight) {
  // Mosteller, NEJM 1987;317:1098: 180 cm, 80 kg -> sqrt(14400/3600) = 2.00 m2 (by hand).
  const nlohmann::json m =
      run_json({"--height", "180", "--weight", "80", "--bsa-formula", "mosteller"});
  EXPECT_NEAR(result(m, "bsa"), 2.0, 1e-9);
  // Du Bois & Du Bois, Arch Intern Med 1916;17:863: 175 cm, 70 kg -> 1.8481 m2 (by hand,
  // logarithms).
  const nlohmann::json d = run_json({"--height", "175", "--weight", "70"});
  EXPECT_NEAR(result(d, "bsa"), 1.8481, 5e-4);
  // The old spelling du-bois of the default formula still works (same Du Bois value).
  const nlohmann::json old =
      run_json({"--height", "175", "--weight", "70", "--bsa-formula", "du-bois"});
  EXPECT_NEAR(result(old, "bsa"), result(d, "bsa"), 1e-12);
}

TEST(CalcOxygen, SiteThresholdFileChangesTheConstant) {
  const std::string dir = temp_dir("oxygen_site");
  const std::string file = dir + "/site.toml";
  std::ofstream(file) << "[oxygen.hb_binding_ml_per_g]\nvalue = 1.39\nunit = \"\"\n"
                         "source = \"site choice\"\n";
  // 1.39 * 15 * 0.98 + 0.003 * 100 = 20.733 mL/dL (arithmetic, Marino).
  const nlohmann::json j =
      run_json({"--hb", "15", "--sao2", "0.98", "--pao2", "100", "--thresholds", file});
  EXPECT_NEAR(result(j, "cao2"), 20.733, 1e-3);
  std::filesystem::remove_all(dir);
}

struct BadInput {
  std::vector<std::string> args;
  std::string field;    // the field the message must name
  std::string problem;  // part of the message
};

class CalcOxygenBadInput : public ::testing::TestWithParam<BadInput> {};

TEST_P(CalcOxygenBadInput, ExitsTwoWithTheFieldNamedAndNothingOnStdout) {
  const BadInput& c = GetParam();
  for (bool json : {false, true}) {
    std::vector<std::string> args = {"calc", "oxygen"};
    if (json) args.push_back("--json");
    args.insert(args.end(), c.args.begin(), c.args.end());
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_EQ(r.out, "");
    EXPECT_NE(r.err.find("field '" + c.field + "'"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(c.problem), std::string::npos) << r.err;
  }
}

INSTANTIATE_TEST_SUITE_P(
    Refused, CalcOxygenBadInput,
    ::testing::Values(
        // SaO2 above 100 %: impossible, even with --allow-implausible.
        BadInput{{"--hb", "15", "--sao2", "101%"}, "--sao2", "is above 100 %"},
        BadInput{
            {"--hb", "15", "--sao2", "101", "--allow-implausible"}, "--sao2", "is above 100 %"},
        // FiO2 above 1.
        BadInput{{"--pao2", "80", "--fio2", "105%"}, "--fio2", "is above 1.0"},
        BadInput{
            {"--pao2", "80", "--fio2", "110", "--allow-implausible"}, "--fio2", "is above 1.0"},
        // Negative cardiac output.
        BadInput{{"--hb", "15", "--sao2", "0.98", "--co", "-5"}, "--co", "is negative"},
        BadInput{{"--co", "-5", "--allow-implausible"}, "--co", "is negative"},
        // SvO2 not below SaO2.
        BadInput{{"--hb", "15", "--sao2", "0.90", "--svo2", "0.95"}, "--svo2", "is not below SaO2"},
        // Out of the plausible range (common practice, no source): the range is named.
        BadInput{{"--hb", "40"}, "--hb", "outside the plausible range"},
        BadInput{{"--pao2", "80", "--fio2", "0.15"}, "--fio2", "outside the plausible range"},
        // Total PEEP out of range: named by its canonical option.
        BadInput{{"--pao2", "80", "--fio2", "0.5", "--peep-total", "35"},
                 "--peep-total",
                 "outside the plausible range"},
        // A choice word that is none of the choices.
        BadInput{{"--height", "180", "--weight", "80", "--bsa-formula", "haycock"},
                 "--bsa-formula",
                 "is not a recognised choice"},
        // Text that is not a value.
        BadInput{{"--pao2", "eighty"}, "--pao2", "is not a number"},
        BadInput{{"--hb", "15 mg"}, "--hb", "unknown or wrong unit"}));

TEST(CalcOxygen, TrialFileTakesAMeasuredMeanAirwayPressure) {
  // OI = FiO2 x Pmean x 100 / PaO2 (PALICC, Pediatr Crit Care Med 2015). Without a measured
  // ventilator.pmean the report uses the VC estimate (Marini & Ravenscraft, Crit Care Med
  // 1992;20:1461) and says so; with one it uses it without that note.
  const std::string dir = temp_dir("pmean");
  const std::string file = dir + "/t.toml";
  const std::string head =
      "[patient]\nsex = \"male\"\nheight = 175\n\n[[step]]\nlabel = \"A\"\n"
      "[step.ventilator]\nmode = \"vc\"\nset_peep = 10\nvt = 450\nrr = 20\nti = 1.0\n"
      "fio2 = 0.6\nflow = 40\n";
  const std::string rest =
      "[step.hold]\nppeak = 30\npplat = 25\npeep_total = 10\n"
      "[step.gases]\npao2 = 80\n";
  auto oi_of = [&]() {
    const CliResult r = run_cli({"report", file, "--format", "json"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return parse_json(r)["steps"][0];
  };
  auto has_note = [](const nlohmann::json& step, const std::string& text) {
    for (const auto& n : step["notes"])
      if (n.get<std::string>().find(text) != std::string::npos) return true;
    return false;
  };
  std::ofstream(file) << head << rest;
  nlohmann::json step = oi_of();
  // Estimate 10 + 0.5 x (30 - 10) x 1/3 = 13.33 cmH2O -> OI 0.6 x 13.33 x 100 / 80 = 10.0.
  ASSERT_TRUE(step["gas_exchange"].contains("oxygenation_index")) << step.dump();
  EXPECT_NEAR(step["gas_exchange"]["oxygenation_index"]["value"].get<double>(), 10.0, 0.05);
  EXPECT_EQ(step["gas_exchange"]["oxygenation_index"]["note"], "estimated Pmean");
  EXPECT_TRUE(has_note(step, "estimated mean airway pressure")) << step["notes"].dump();
  std::ofstream(file) << head << "pmean = 18\n" << rest;
  step = oi_of();
  // 0.6 x 18 x 100 / 80 = 13.5 (hand-worked on the PALICC formula).
  EXPECT_NEAR(step["gas_exchange"]["oxygenation_index"]["value"].get<double>(), 13.5, 0.05);
  EXPECT_FALSE(step["gas_exchange"]["oxygenation_index"].contains("note"));
  EXPECT_FALSE(has_note(step, "estimated mean airway pressure")) << step["notes"].dump();
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace bb::test
