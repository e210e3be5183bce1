// breathbeat calc ivc, end to end.
#include <gtest/gtest.h>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const nlohmann::json* gate(const nlohmann::json& j, const std::string& key) {
  for (const auto& g : j["gates"]) {
    if (g["key"] == key) return &g;
  }
  return nullptr;
}

TEST(CalcIvc, BriefCheckValuesInJson) {
  const CliResult r =
      run_cli({"calc", "ivc", "--dmax", "2.0", "--dmin", "1.6", "--breathing", "passive",
               "--vt-per-kg", "8", "--no-effort", "--no-iah", "--no-rv-failure", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& res = j["results"];
  // Hand-worked: 2.0 / 1.6 cm -> collapsibility 20 % (Rudski et al., JASE 2010),
  // distensibility 25 % (Barbier et al., ICM 2004), variation 22.2 % (Feissel et al., ICM 2004).
  EXPECT_NEAR(res["ivc_collapsibility"]["value"].get<double>(), 20.0, 1e-9);
  EXPECT_NEAR(res["ivc_distensibility"]["value"].get<double>(), 25.0, 1e-9);
  EXPECT_NEAR(res["ivc_variation"]["value"].get<double>(), 22.2, 0.05);  // 22.22 by hand
  EXPECT_EQ(res["ivc_distensibility"]["unit"], "%");
  EXPECT_FALSE(res.contains("rap_estimate"));  // spontaneous breathing only
  EXPECT_EQ(j["gates"].size(), 4u);
  EXPECT_EQ(j["reading"]["category"], "responsive");  // 25 > 18 and 22.2 > 12 (same sources)
  EXPECT_FALSE(j["cautions"].empty());
}

TEST(CalcIvc, MillimetresAndCentimetresAgree) {
  const auto a = parse_json(run_cli(
      {"calc", "ivc", "--dmax", "2.0", "--dmin", "1.6", "--breathing", "passive", "--json"}));
  const auto b = parse_json(run_cli(
      {"calc", "ivc", "--dmax", "20mm", "--dmin", "16 mm", "--breathing", "passive", "--json"}));
  EXPECT_EQ(a["results"], b["results"]);
  EXPECT_EQ(a["reading"], b["reading"]);
}

TEST(CalcIvc, SpontaneousGivesRapWithRange) {
  // 2.5 / 2.0 cm: IVC > 2.1 cm, collapse 20 % < 50 % -> 15 (10-20) mmHg
  // (Rudski et al., JASE 2010;23:685).
  const CliResult r = run_cli(
      {"calc", "ivc", "--dmax", "25mm", "--dmin", "20mm", "--breathing", "spontaneous", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& rap = j["results"]["rap_estimate"];
  EXPECT_EQ(rap["value"], 15);
  EXPECT_EQ(rap["unit"], "mm[Hg]");
  EXPECT_EQ(rap["low"], 10);
  EXPECT_EQ(rap["high"], 20);
  EXPECT_EQ(j["reading"]["category"], "not_applicable");
  EXPECT_EQ(j["reading"]["basis"][0], "ivc_collapsibility");
}

TEST(CalcIvc, EachGateFlipsTheReading) {
  const std::vector<std::string> base = {"calc", "ivc",         "--dmax",  "2.0",   "--dmin",
                                         "1.6",  "--breathing", "passive", "--json"};
  // Gates (Barbier et al., ICM 2004;30:1740; Feissel et al., ICM 2004;30:1834); the 8 mL/kg
  // floor: Barbier et al., ICM 2004 (from memory).
  const std::vector<std::pair<std::vector<std::string>, std::string>> cases = {
      {{"--effort"}, "passive"},
      {{"--vt-per-kg", "6"}, "vt_per_kg"},
      {{"--iah"}, "no_iah"},
      {{"--rv-failure"}, "no_rv_failure"},
  };
  for (const auto& [extra, key] : cases) {
    std::vector<std::string> args = base;
    args.insert(args.end(), extra.begin(), extra.end());
    const CliResult r = run_cli(args);
    ASSERT_EQ(r.exit_code, 0) << r.err;
    const auto j = parse_json(r);
    EXPECT_EQ(j["reading"]["category"], "not_interpretable") << key;
    const auto* g = gate(j, key);
    ASSERT_NE(g, nullptr) << key;
    EXPECT_EQ((*g)["state"], "failed") << key;
  }
}

TEST(CalcIvc, TextOutputMarksTheIndexThatDoesNotApply) {
  const CliResult r =
      run_cli({"calc", "ivc", "--dmax", "2.0", "--dmin", "1.6", "--breathing", "passive"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("not applicable (passive)"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("Cautions"), std::string::npos);
}

TEST(CalcIvc, DminAboveDmaxExitsTwo) {
  const CliResult r =
      run_cli({"calc", "ivc", "--dmax", "1.6", "--dmin", "2.0", "--breathing", "passive"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("dmin"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("Dmax"), std::string::npos) << r.err;
}

TEST(CalcIvc, BadInputsExitTwo) {
  const std::vector<std::vector<std::string>> bad = {
      {"calc", "ivc", "--dmax", "2.0", "--dmin", "1.6"},  // no --breathing
      {"calc", "ivc", "--dmax", "2.0", "--dmin", "1.6", "--breathing", "sedated"},
      {"calc", "ivc", "--dmax", "2.0kPa", "--dmin", "1.6", "--breathing", "passive"},
      {"calc", "ivc", "--dmax", "20", "--dmin", "16", "--breathing", "passive"},  // 20 cm
      {"calc", "ivc", "--dmax", "2", "--dmin", "1.6", "--breathing", "passive", "--iah",
       "--no-iah"},
  };
  for (const auto& args : bad) {
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << args[3];
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_FALSE(r.err.empty());
  }
}

}  // namespace
}  // namespace bb::test
