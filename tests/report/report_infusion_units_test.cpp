// The trial report: infusion doses against their usual ranges at each step (issue 10, item
// 21), angiotensin II in ng/kg/min (item 16), and units (item 19): PPV changes in percentage
// points, micrograms spelled "mcg" in text and CSV.
#include <gtest/gtest.h>

#include <fstream>
#include <functional>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

// Two steps with infusions; the values are invented for the test.
constexpr const char* kTrial = R"(
[patient]
label = "infusion ranges"
sex = "male"
height = "180 cm"
weight = 80

[[step]]
label = "A"

[step.ventilator]
set_peep = 5
vt = "480 mL"

[[step.infusion]]
drug = "norepinephrine"
dose = "0.3 ug/kg/min"

[[step]]
label = "B"

[step.ventilator]
set_peep = 10
vt = "480 mL"

[[step.infusion]]
drug = "angiotensin-ii"
dose = "60"

[[step.infusion]]
drug = "dopamine"
dose = "5"
)";

std::string trial_file() {
  const std::string path = temp_dir("report_infusion_units") + "/trial.toml";
  std::ofstream(path, std::ios::binary) << kTrial;
  return path;
}

bool any_contains(const json& strings, const std::string& part) {
  for (const auto& s : strings) {
    if (s.get<std::string>().find(part) != std::string::npos) return true;
  }
  return false;
}

TEST(ReportInfusions, RangesFlagsAndNotesPerStep) {
  const std::string file = trial_file();
  const CliResult r = run_cli({"report", file, "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const json j = parse_json(r);
  const json& a = j["steps"][0];
  const json& b = j["steps"][1];
  // Step A: norepinephrine 0.3 ug/kg/min is within 0.25-0.5, where the guideline suggests
  // considering adding vasopressin (Evans et al., Intensive Care Med 2021;47:1181).
  EXPECT_TRUE(any_contains(a["notes"], "considering adding vasopressin")) << a["notes"].dump();
  EXPECT_TRUE(a["flags"].empty()) << a["flags"].dump();
  EXPECT_FALSE(any_contains(b["notes"], "considering adding vasopressin"));
  // Step B: angiotensin II 60 ng/kg/min is above the maintenance maximum of 40 (up to 80 only in
  // the first 3 h; Khanna et al., N Engl J Med 2017;377:419; FDA label 2017).
  ASSERT_EQ(b["flags"].size(), 1u) << b["flags"].dump();
  EXPECT_EQ(b["flags"][0]["key"], "angiotensin_ii_usual_range");
  EXPECT_NE(b["flags"][0]["message"].get<std::string>().find("60.0 ng/kg/min"), std::string::npos);
  EXPECT_EQ(b["circulation"]["angiotensin_ii_dose_per_kg"]["unit"], "ng/kg/min");
  EXPECT_NEAR(b["circulation"]["angiotensin_ii_dose_per_kg"]["value"].get<double>(), 60.0, 1e-6);
  // Dopamine: more arrhythmias than norepinephrine in shock (De Backer et al., N Engl J Med
  // 2010;362:779).
  EXPECT_TRUE(any_contains(b["notes"], "De Backer et al., N Engl J Med 2010;362:779"));

  const CliResult text = run_cli({"report", file});
  ASSERT_EQ(text.exit_code, 0) << text.err;
  EXPECT_NE(text.out.find("is above the usual range 1.25-40 ng/kg/min"), std::string::npos)
      << text.out;
  EXPECT_NE(text.out.find("considering adding vasopressin"), std::string::npos);
  EXPECT_EQ(text.out.find("0.060 mcg/kg/min"), std::string::npos);
}

TEST(ReportUnits, MicrogramsSpelledOneWayInTextAndCsv) {
  // "mcg" in text and in CSV headers (common practice, no source); JSON keeps UCUM "ug".
  const std::string file = trial_file();
  const CliResult csv = run_cli({"report", file, "--format", "csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  EXPECT_NE(csv.out.find("circulation.norepinephrine_dose_per_kg [mcg/kg/min]"), std::string::npos)
      << csv.out;
  EXPECT_NE(csv.out.find("circulation.angiotensin_ii_dose_per_kg [ng/kg/min]"), std::string::npos);
  EXPECT_EQ(csv.out.find("[ug"), std::string::npos) << csv.out;
  const CliResult text = run_cli({"report", file});
  EXPECT_EQ(text.out.find("ug/"), std::string::npos) << text.out;
  EXPECT_EQ(text.out.find("\xC2\xB5g"), std::string::npos);
  const json j = parse_json(run_cli({"report", file, "--format", "json"}));
  EXPECT_EQ(j["steps"][0]["circulation"]["norepinephrine_dose_per_kg"]["unit"], "ug/kg/min");
}

// Every number cell under `j` whose key names a PPV change.
void ppv_change_cells(const json& j,
                      const std::function<void(const std::string&, const json&)>& f) {
  if (j.is_object()) {
    for (auto it = j.begin(); it != j.end(); ++it) {
      if (it.key().find("ppv_change") != std::string::npos && it.value().is_object() &&
          it.value().contains("value"))
        f(it.key(), it.value());
      ppv_change_cells(it.value(), f);
    }
  } else if (j.is_array()) {
    for (const auto& x : j) ppv_change_cells(x, f);
  }
}

TEST(ReportUnits, PpvChangesAreInPercentagePoints) {
  // A PPV change is after - before in percentage points (Myatra et al., Crit Care Med
  // 2017;45:415); UCUM has no code for points: "%" labelled "points", key "_points" in CSV.
  const json j = parse_json(run_cli({"demo", "--format", "json"}));
  int cells = 0;
  ppv_change_cells(j, [&](const std::string& key, const json& cell) {
    ++cells;
    EXPECT_EQ(cell["unit"], "%") << key;
    EXPECT_EQ(cell.value("unit_label", ""), "points") << key << " " << cell.dump();
  });
  EXPECT_GT(cells, 0) << "the demo has a tidal-volume challenge and PPV at several steps";
  const CliResult csv = run_cli({"demo", "--format", "csv"});
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const std::string header = csv.out.substr(0, csv.out.find('\n'));
  EXPECT_EQ(header.find("ppv_change [%]"), std::string::npos) << header;
  EXPECT_NE(header.find("ppv_change_points [%]"), std::string::npos) << header;
  EXPECT_EQ(header.find("[ug"), std::string::npos) << header;
}

TEST(ReportUnits, CalcPreloadTestPpvChangeInPoints) {
  // VT 6 -> 8 mL/kg PBW, PPV 9 -> 13 %: +4 points (Myatra et al., Crit Care Med 2017;45:415;
  // by hand). Text says "points", JSON "%" with the label "points".
  const std::vector<std::string> args = {
      "calc", "preload-test", "--kind", "vt-challenge", "--before", "9%",       "--after",
      "13%",  "--vt-before",  "6",      "--vt-after",   "8",        "--passive"};
  const CliResult text = run_cli(args);
  ASSERT_EQ(text.exit_code, 0) << text.err;
  EXPECT_NE(text.out.find("4.0 points"), std::string::npos) << text.out;
  auto json_args = args;
  json_args.push_back("--json");
  const json j = parse_json(run_cli(json_args));
  EXPECT_NEAR(j["results"]["change"]["value"].get<double>(), 4.0, 1e-9);
  EXPECT_EQ(j["results"]["change"]["unit"], "%");
  EXPECT_EQ(j["results"]["change"]["unit_label"], "points");
}

}  // namespace
}  // namespace bb::test
