// breathbeat calc ppv end to end: JSON keys, gates, readings, overrides, bad input.
#include <gtest/gtest.h>

#include <tuple>

#include <fstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const std::vector<std::string> kAllMet = {
    "--passive", "--regular", "--vt-per-kg",    "8",        "--hr",           "90", "--rr", "20",
    "--crs",     "40",        "--closed-chest", "--no-iah", "--no-rv-failure"};

CliResult ppv(std::vector<std::string> extra, bool all_met = true) {
  std::vector<std::string> args{"calc", "ppv", "--json"};
  if (all_met) args.insert(args.end(), kAllMet.begin(), kAllMet.end());
  args.insert(args.end(), extra.begin(), extra.end());
  return run_cli(args);
}

TEST(CalcPpv, JsonCarriesPpvGatesAndReading) {
  // Mean of 62/48, 60/47, 63/50 = 24.254 % (Michard et al., AJRCCM 2000;162:134; by hand)
  const CliResult r = ppv({"--pp-cycles", "62/48,60/47,63/50", "--sbp", "120", "--dbp", "70"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  EXPECT_EQ(j["command"], "calc ppv");
  EXPECT_NEAR(j["results"]["ppv"]["value"].get<double>(), 24.254, 0.01);
  EXPECT_EQ(j["results"]["ppv"]["unit"], "%");
  // 70 + 50/3 = 86.67 mmHg (textbook MAP estimate, common practice, no source)
  EXPECT_NEAR(j["results"]["map"]["value"].get<double>(), 86.67, 0.01);
  EXPECT_EQ(j["results"]["map"]["unit"], "mm[Hg]");
  // 90/20 = 4.5 (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_NEAR(j["results"]["hr_rr_ratio"]["value"].get<double>(), 4.5, 1e-9);
  ASSERT_EQ(j["gates"].size(), 8u);  // eight conditions (sources in docs/methods.md)
  for (const auto& g : j["gates"]) EXPECT_EQ(g["state"], "met") << g["key"];
  EXPECT_EQ(j["reading"]["category"], "above_grey_zone");  // > 13 %, Michard 2000
  EXPECT_FALSE(j["cautions"].empty());
  ASSERT_TRUE(j["results"].contains("ppv"));
  EXPECT_FALSE(j["results"].contains("spv"));  // needs beats
}

TEST(CalcPpv, BeatsGiveSpvAndMap) {
  // Breaths of 120/70, 126/70, 116/72: PPV 24 %, SPV 10 mmHg (Perel et al., Anesthesiology
  // 1987;67:498; Michard et al., AJRCCM 2000;162:134; arithmetic by hand)
  const CliResult r =
      ppv({"--beats", "120/70,126/70,116/72;120/70,126/70,116/72;120/70,126/70,116/72"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  EXPECT_NEAR(j["results"]["ppv"]["value"].get<double>(), 24.0, 1e-6);
  EXPECT_NEAR(j["results"]["spv"]["value"].get<double>(), 10.0, 1e-6);
  EXPECT_NEAR(j["results"]["map"]["value"].get<double>(), 87.33,
              0.01);  // DBP + PP/3 on the means, by hand
}

TEST(CalcPpv, EachFailedConditionFlagOnTheCommandLineRefusesTheDirectionItBiases) {
  // PPV about 24 % is high. Effort and an arrhythmia make it unreadable either way (Heenen 2006,
  // Michard 2000); IAH and RV failure can make it falsely high (Jacques 2011, Mahjoub 2009; from
  // memory): it cannot be read. An open chest can only make it falsely low (de Waal 2009, from
  // memory): the high value keeps its meaning. Sources in docs/methods.md.
  const std::vector<std::tuple<std::string, std::string, std::string>> flips = {
      {"--passive", "--effort", "not_interpretable"},
      {"--regular", "--irregular", "not_interpretable"},
      {"--closed-chest", "--open-chest", "above_grey_zone"},
      {"--no-iah", "--iah", "not_interpretable"},
      {"--no-rv-failure", "--rv-failure", "not_interpretable"}};
  for (const auto& [good, bad, want] : flips) {
    std::vector<std::string> args{"calc", "ppv", "--json", "--pp-cycles", "62/48,60/47,63/50"};
    for (const auto& a : kAllMet) {
      if (a != good) args.push_back(a);
    }
    args.push_back(bad);
    const CliResult r = run_cli(args);
    ASSERT_EQ(r.exit_code, 0) << bad << ": " << r.err;
    EXPECT_EQ(parse_json(r)["reading"]["category"], want) << bad;
  }
}

std::vector<std::string> with_numbers(const std::string& vt, const std::string& hr,
                                      const std::string& rr, const std::string& crs) {
  return {"calc",
          "ppv",
          "--json",
          "--pp-cycles",
          "62/48,60/47,63/50",
          "--passive",
          "--regular",
          "--closed-chest",
          "--no-iah",
          "--no-rv-failure",
          "--vt-per-kg",
          vt,
          "--hr",
          hr,
          "--rr",
          rr,
          "--crs",
          crs};
}

TEST(CalcPpv, NumericGateFailuresFromTheCommandLine) {
  auto category = [](const std::vector<std::string>& args) {
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return parse_json(r)["reading"]["category"].get<std::string>();
  };
  EXPECT_EQ(category(with_numbers("8", "90", "20", "40")), "above_grey_zone");  // all met (control)
  // Each numeric condition can only make PPV falsely low: a high PPV (about 24 %) keeps its
  // meaning and the JSON names the failed condition as one-sided.
  // VT 6 < 8 mL/kg PBW (De Backer et al., ICM 2005;31:517)
  EXPECT_EQ(category(with_numbers("6", "90", "20", "40")), "above_grey_zone");
  // HR/RR 60/30 = 2 <= 3.6 (De Backer et al., Anesthesiology 2009;110:1092)
  EXPECT_EQ(category(with_numbers("8", "60", "30", "40")), "above_grey_zone");
  // Crs 25 <= 30 mL/cmH2O (Monnet et al., Crit Care Med 2012;40:152)
  EXPECT_EQ(category(with_numbers("8", "90", "20", "25")), "above_grey_zone");
  const CliResult low_vt = run_cli(with_numbers("6", "90", "20", "40"));
  EXPECT_EQ(parse_json(low_vt)["reading"]["one_sided"][0], "vt_per_kg_pbw");
  // A low PPV (52/49, 51/48, 53/50: about 6 %, hand-worked) at VT 6 cannot be read.
  std::vector<std::string> low = with_numbers("6", "90", "20", "40");
  low[4] = "52/49,51/48,53/50";
  EXPECT_EQ(category(low), "not_interpretable");
}

TEST(CalcPpv, AbsentConditionsAreUnknownAndTheReadingConditional) {
  const CliResult r = ppv({"--pp-cycles", "62/48,60/47,63/50"}, false);
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  for (const auto& g : j["gates"]) EXPECT_EQ(g["state"], "unknown") << g["key"];
  EXPECT_EQ(j["reading"]["category"],
            "above_grey_zone");  // > 13 %, Michard et al., AJRCCM 2000;162:134
  EXPECT_NE(j["reading"]["text"].get<std::string>().find("Conditional"), std::string::npos);
}

TEST(CalcPpv, GreyZoneFromTheCommandLine) {
  // 52.25/47.75 is 9 %, the lower grey-zone bound (Cannesson et al., Anesthesiology 2011;115:231)
  const CliResult r = ppv({"--pp-cycles", "52.25/47.75,52.25/47.75,52.25/47.75"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(parse_json(r)["reading"]["category"], "grey_zone");
}

TEST(CalcPpv, ThresholdFileChangesTheReading) {
  // 55/45 three times is 20 % (Michard 2000 definition, by hand): above 13 % built in,
  // grey zone when a site file moves the upper bound to 25 %.
  const std::string dir = temp_dir("ppv_thresholds");
  const std::string file = dir + "/site.toml";
  std::ofstream(file)
      << "[ppv.grey_zone_high]\nvalue = 25\nunit = \"%\"\nsource = \"site protocol\"\n";
  const CliResult built_in = ppv({"--pp-cycles", "55/45,55/45,55/45"});
  const CliResult site = ppv({"--pp-cycles", "55/45,55/45,55/45", "--thresholds", file});
  ASSERT_EQ(site.exit_code, 0) << site.err;
  EXPECT_EQ(parse_json(built_in)["reading"]["category"], "above_grey_zone");
  EXPECT_EQ(parse_json(site)["reading"]["category"], "grey_zone");
}

TEST(CalcPpv, OldSpellingsStillWorkWithANote) {
  // --cycles is now --pp-cycles and --spontaneous is --effort (the registry's aliases).
  const CliResult r = run_cli({"calc", "ppv", "--json", "--cycles", "62/48,60/47,63/50",
                               "--spontaneous", "--vt-per-kg", "8", "--iah"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.err.find("old spelling"), std::string::npos) << r.err;
  const auto j = parse_json(r);
  // Spontaneous effort fails the passive gate (Michard et al., AJRCCM 2000;162:134).
  EXPECT_EQ(j["gates"][0]["state"], "failed");
  // JSON input keys are the field ids.
  EXPECT_EQ(j["inputs"]["passive"], "no");
  EXPECT_EQ(j["inputs"]["iah"], "yes");
  EXPECT_EQ(j["inputs"]["pp_cycles"]["value"], 3.0);  // three breaths given
  EXPECT_NEAR(j["inputs"]["vt_per_kg"]["value"].get<double>(), 8.0, 1e-9);
}

TEST(CalcPpv, TextOutputShowsConditionsAndCautions) {
  const CliResult r = run_cli({"calc", "ppv", "--pp-cycles", "62/48,60/47,63/50", "--effort"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("Conditions for this index"), std::string::npos);
  EXPECT_NE(r.out.find("[failed]"), std::string::npos);
  EXPECT_NE(r.out.find("cannot be read: breathing effort makes it unreadable either way"),
            std::string::npos)
      << r.out;
  EXPECT_NE(r.out.find("Cautions"), std::string::npos);
}

void expect_refused(const std::vector<std::string>& args, const std::string& field) {
  const CliResult r = run_cli(args);
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find(field), std::string::npos) << r.err;
}

TEST(CalcPpv, BadInputExitsTwoNamingTheField) {
  expect_refused({"calc", "ppv", "--pp-cycles", "62/48,60/47"}, "cycles");  // fewer than 3 breaths
  expect_refused({"calc", "ppv", "--pp-cycles", "62/48,47/60,63/50"}, "breath 2");  // PPmin > PPmax
  expect_refused({"calc", "ppv", "--pp-cycles", "62;48,60/47,63/50"}, "cycles");    // malformed
  expect_refused({"calc", "ppv", "--pp-cycles", "62/48,60/-47,63/50"}, "PPmin");    // negative
  expect_refused({"calc", "ppv", "--pp-cycles", "62/48,60/47,63/50", "--hr", "-80"}, "hr");
  expect_refused({"calc", "ppv"}, "cycles");  // nothing given
  expect_refused({"calc", "ppv", "--beats", "120/70,118/69;119/70;121/71,117/68"}, "breath 2");
  const CliResult both =
      run_cli({"calc", "ppv", "--pp-cycles", "62/48,60/47,63/50", "--passive", "--effort"});
  EXPECT_EQ(both.exit_code, 2);
  EXPECT_TRUE(both.out.empty());
}

TEST(CalcPpv, BareSvvBelowOneIsRefusedAsAPossibleFraction) {
  // "--svv 0.15" could be 15 % or 0.15 %: refused, exit 2, nothing on stdout, both spellings
  // suggested (common practice, no source).
  const CliResult r = run_cli({"calc", "ppv", "--pp-cycles", "62/48,60/47,63/50", "--svv", "0.15"});
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("svv"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("read as percent"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("15%"), std::string::npos) << r.err;
  // Written with "%" the same digits are accepted as 0.5 % (common practice, no source).
  const CliResult ok =
      run_cli({"calc", "ppv", "--json", "--pp-cycles", "62/48,60/47,63/50", "--svv", "0.5%"});
  ASSERT_EQ(ok.exit_code, 0) << ok.err;
  EXPECT_NEAR(parse_json(ok)["results"]["svv"]["value"].get<double>(), 0.5, 1e-9);
}

}  // namespace
}  // namespace bb::test
