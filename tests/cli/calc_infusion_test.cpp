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
  // International units are [iU] in UCUM; plain U is the enzyme unit (Schadow & McDonald, UCUM,
  // Regenstrief Institute).
  EXPECT_EQ(res["vasopressin_dose"]["unit"], "[iU]/min");
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

// ---- item 16: angiotensin II in ng/kg/min -------------------------------------------------

TEST(CalcInfusion, AngiotensinIiDoseInNanogramsPerKgPerMinute) {
  // 19.2 mL/h of 5000 ng/mL in 80 kg = 19.2 x 5 / (60 x 80) = 0.02 ug/kg/min = 20 ng/kg/min
  // (dose-conversion formula, hand-worked; common practice, no source). Labelled and dosed in
  // ng/kg/min (Khanna et al., N Engl J Med 2017;377:419).
  const std::vector<std::string> args = {"calc",     "infusion", "--drug", "angiotensin-ii",
                                         "--rate",   "19.2",     "--conc", "5000ng/mL",
                                         "--weight", "80"};
  const CliResult text = run_cli(args);
  ASSERT_EQ(text.exit_code, 0) << text.err;
  EXPECT_NE(text.out.find("20.0 ng/kg/min"), std::string::npos) << text.out;
  EXPECT_EQ(text.out.find("0.020 mcg/kg/min"), std::string::npos) << text.out;
  auto json_args = args;
  json_args.push_back("--json");
  const auto j = parse_json(run_cli(json_args));
  EXPECT_EQ(j["results"]["angiotensin_ii_dose_per_kg"]["unit"], "ng/kg/min");
  EXPECT_NEAR(j["results"]["angiotensin_ii_dose_per_kg"]["value"].get<double>(), 20.0, 1e-6);
  // The NE-equivalent share stays in ug/kg/min of norepinephrine: 0.02 x 10 = 0.2 (Goradia et
  // al., J Crit Care 2021;61:233, from memory).
  EXPECT_EQ(j["results"]["angiotensin_ii_ne_equivalent"]["unit"], "ug/kg/min");
  EXPECT_NEAR(j["results"]["angiotensin_ii_ne_equivalent"]["value"].get<double>(), 0.2, 1e-9);
  // A bare dose is in the drug's unit: --dose 20 is 20 ng/kg/min, the pump rate 19.2 mL/h again.
  const auto back = parse_json(run_cli({"calc", "infusion", "--drug", "angiotensin-ii", "--dose",
                                        "20", "--conc", "5000ng/mL", "--weight", "80", "--json"}));
  EXPECT_NEAR(back["results"]["angiotensin_ii_rate"]["value"].get<double>(), 19.2, 1e-6);
}

// ---- item 21: doses against their usual ranges ---------------------------------------------

TEST(CalcInfusion, DoseOutsideItsUsualRangeIsFlaggedInTextAndJson) {
  // Dobutamine usual up to 20 ug/kg/min (common practice, no source); 25 is above.
  const std::vector<std::string> args = {"calc",   "infusion", "--drug",   "dobutamine",
                                         "--dose", "25",       "--weight", "80"};
  const CliResult text = run_cli(args);
  ASSERT_EQ(text.exit_code, 0) << text.err;
  EXPECT_NE(text.out.find("Dobutamine dose 25.0 mcg/kg/min is above the usual range 2.5-20 "
                          "mcg/kg/min"),
            std::string::npos)
      << text.out;
  auto json_args = args;
  json_args.push_back("--json");
  const auto j = parse_json(run_cli(json_args));
  ASSERT_EQ(j["flags"].size(), 1u);
  EXPECT_EQ(j["flags"][0]["key"], "dobutamine_usual_range");
  EXPECT_FALSE(j["flags"][0]["source"].get<std::string>().empty());
  // Within the range: no flag (vasopressin 0.03 U/min, Russell et al., N Engl J Med
  // 2008;358:877).
  const auto ok = parse_json(
      run_cli({"calc", "infusion", "--drug", "vasopressin", "--dose", "0.03", "--json"}));
  EXPECT_TRUE(ok["flags"].empty());
}

TEST(CalcInfusion, NorepinephrineDoseNotesTheVasopressinSuggestion) {
  // NE 0.3 ug/kg/min is within 0.25-0.5: the guideline suggests considering adding vasopressin
  // (Evans et al., Intensive Care Med 2021;47:1181).
  const auto j = parse_json(run_cli({"calc", "infusion", "--drug", "norepinephrine", "--dose",
                                     "0.3", "--weight", "80", "--json"}));
  bool noted = false;
  for (const auto& n : j["notes"]) {
    const std::string t = n.get<std::string>();
    noted |= t.find("considering adding vasopressin") != std::string::npos &&
             t.find("Evans et al., Intensive Care Med 2021;47:1181") != std::string::npos;
  }
  EXPECT_TRUE(noted) << j["notes"].dump();
  const CliResult text =
      run_cli({"calc", "infusion", "--drug", "norepinephrine", "--dose", "0.3", "--weight", "80"});
  EXPECT_NE(text.out.find("considering adding"), std::string::npos) << text.out;
  // With vasopressin running the note is not repeated.
  const auto both = parse_json(
      run_cli({"calc", "infusion", "--weight", "80", "--infusion", "norepinephrine:dose=0.3",
               "--infusion", "vasopressin:dose=0.03", "--json"}));
  for (const auto& n : both["notes"])
    EXPECT_EQ(n.get<std::string>().find("considering adding vasopressin"), std::string::npos);
}

TEST(CalcInfusion, DopamineCarriesItsArrhythmiaNote) {
  // De Backer et al., N Engl J Med 2010;362:779: more arrhythmias with dopamine than NE.
  const CliResult r = run_cli({"calc", "infusion", "--drug", "dopamine", "--dose", "8"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("more arrhythmias than norepinephrine"), std::string::npos) << r.out;
  // The text wraps; the JSON note carries the citation whole.
  const auto j =
      parse_json(run_cli({"calc", "infusion", "--drug", "dopamine", "--dose", "8", "--json"}));
  bool cited = false;
  for (const auto& n : j["notes"])
    cited |= n.get<std::string>().find("De Backer et al., N Engl J Med 2010;362:779") !=
             std::string::npos;
  EXPECT_TRUE(cited) << j["notes"].dump();
}

// ---- item 19: one spelling of micrograms in text --------------------------------------------

TEST(CalcInfusion, TextSpellsMicrogramsOneWay) {
  // "mcg" in text (common practice, no source); never "ug" or the micro sign.
  const CliResult r = run_cli({"calc", "infusion", "--weight", "80", "--infusion",
                               "norepinephrine:rate=12mL/h,conc=64ug/mL", "--infusion",
                               "dopamine:dose=25", "--infusion", "phenylephrine:dose=80ug/min"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("mcg/kg/min"), std::string::npos);
  EXPECT_NE(r.out.find("mcg/mL"), std::string::npos);
  EXPECT_EQ(r.out.find("ug/"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("\xC2\xB5g"), std::string::npos) << r.out;
  const CliResult help = run_cli({"calc", "infusion", "--help"});
  EXPECT_EQ(help.out.find("ug/"), std::string::npos) << help.out;
}

}  // namespace
}  // namespace bb::test
