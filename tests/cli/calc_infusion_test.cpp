// breathbeat calc infusion, end to end.
#include <gtest/gtest.h>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

TEST(CalcInfusion, RateToDose) {
  const CliResult r = run_cli({"calc", "infusion", "--drug", "norepinephrine", "--rate", "12",
                               "--conc", "64ug/mL", "--weight", "80", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& res = j["results"];
  // 12 mL/h x 64 ug/mL / (60 x 80 kg) = 0.16 ug/kg/min; 12.8 ug/min (dose-conversion formula,
  // hand-worked; common practice, no source).
  EXPECT_NEAR(res["norepinephrine_dose_per_kg"]["value"].get<double>(), 0.16, 1e-9);
  EXPECT_EQ(res["norepinephrine_dose_per_kg"]["unit"], "ug/kg/min");
  EXPECT_NEAR(res["norepinephrine_dose"]["value"].get<double>(), 12.8, 1e-9);
  EXPECT_EQ(res["norepinephrine_dose"]["unit"], "ug/min");
  // NE counts 1:1 (Goradia et al., J Crit Care 2021;61:233, from memory).
  EXPECT_NEAR(res["ne_equivalent"]["value"].get<double>(), 0.16, 1e-9);
  EXPECT_FALSE(j["cautions"].empty());
}

TEST(CalcInfusion, DoseToRateRoundTrip) {
  // 0.16 ug/kg/min at 64 ug/mL and 80 kg -> 12 mL/h (inverse of the test above).
  const CliResult r =
      run_cli({"calc", "infusion", "--drug", "norepinephrine", "--dose", "0.16mcg/kg/min", "--conc",
               "0.064mg/mL", "--weight", "80", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  EXPECT_NEAR(j["results"]["norepinephrine_rate"]["value"].get<double>(), 12.0, 1e-9);
  EXPECT_EQ(j["results"]["norepinephrine_rate"]["unit"], "mL/h");
}

TEST(CalcInfusion, SeveralInfusionsNorepinephrineEquivalent) {
  // NE 0.16 + vasopressin 0.03 U/min x 2.5 + phenylephrine 80 ug/min / 80 kg / 10 + dopamine
  // 5 / 100 + dobutamine (inotrope, not counted) = 0.16 + 0.075 + 0.1 + 0.05 = 0.385 ug/kg/min
  // (Goradia et al., J Crit Care 2021;61:233, from memory; hand-worked).
  const CliResult r = run_cli({"calc", "infusion", "--weight", "80", "--infusion",
                               "norepinephrine:rate=12mL/h,conc=64ug/mL", "--infusion",
                               "vasopressin:rate=9mL/h,conc=0.2U/mL", "--infusion",
                               "phenylephrine:dose=80ug/min", "--infusion", "dopamine:dose=5",
                               "--infusion", "dobutamine:dose=5ug/kg/min", "--json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const auto j = parse_json(r);
  const auto& res = j["results"];
  EXPECT_NEAR(res["vasopressin_dose"]["value"].get<double>(), 0.03, 1e-9);
  EXPECT_EQ(res["vasopressin_dose"]["unit"], "U/min");
  EXPECT_NEAR(res["ne_equivalent"]["value"].get<double>(), 0.385, 1e-9);
  EXPECT_FALSE(res.contains("dobutamine_ne_equivalent"));
  bool inotrope_note = false;
  for (const auto& n : j["notes"]) {
    inotrope_note |= n.get<std::string>().find("inotropes") != std::string::npos;
  }
  EXPECT_TRUE(inotrope_note);
}

TEST(CalcInfusion, TextShowsMcgUnits) {
  const CliResult r = run_cli({"calc", "infusion", "--drug", "epinephrine", "--rate", "5", "--conc",
                               "40", "--weight", "70"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  // 5 x 40 / (60 x 70) = 0.048 ug/kg/min (dose-conversion formula, hand-worked;
  // common practice, no source).
  EXPECT_NE(r.out.find("0.048 mcg/kg/min"), std::string::npos) << r.out;
}

TEST(CalcInfusion, UnknownDrugExitsTwoWithSuggestion) {
  const CliResult r = run_cli({"calc", "infusion", "--drug", "vasopresin", "--dose", "0.03"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("--drug"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("did you mean 'vasopressin'"), std::string::npos) << r.err;
}

TEST(CalcInfusion, ZeroWeightExitsTwo) {
  const CliResult r = run_cli({"calc", "infusion", "--drug", "norepinephrine", "--rate", "12",
                               "--conc", "64", "--weight", "0", "--allow-implausible"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty());
  EXPECT_NE(r.err.find("weight"), std::string::npos) << r.err;
}

TEST(CalcInfusion, BadInputsExitTwo) {
  const std::vector<std::vector<std::string>> bad = {
      {"calc", "infusion", "--rate", "12"},  // no drug
      {"calc", "infusion", "--drug", "norepinephrine", "--rate", "12", "--conc", "0.2U/mL"},
      {"calc", "infusion", "--drug", "vasopressin", "--dose", "0.1ug/kg/min"},
      {"calc", "infusion", "--drug", "norepinephrine", "--rate", "-4", "--conc", "64"},
      {"calc", "infusion", "--drug", "norepinephrine", "--rate", "4", "--conc", "64", "--dose",
       "0.1"},
      {"calc", "infusion", "--infusion", "norepinephrine:rate=12;conc=64"},
      {"calc", "infusion"},
  };
  for (const auto& args : bad) {
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << args.back();
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_FALSE(r.err.empty());
  }
}

}  // namespace
}  // namespace bb::test
