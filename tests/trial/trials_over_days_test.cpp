// End to end: a trial date (trial new --date, [trial] date) and several trials
// of one patient reported side by side; trials of two patients are refused.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <tuple>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

namespace fs = std::filesystem;

// One day's trial, recorded with the commands: two PEEP steps with the given plateau
// pressures (VT 480 mL, total PEEP as set) and norepinephrine 18 mL/h of 80 mcg/mL.
void record_day(const std::string& file, const std::string& date, const std::string& weight,
                const std::string& pplat8, const std::string& pplat12,
                const std::string& sex = "male", const std::string& height = "178") {
  CliResult r = run_cli(
      {"trial", "new", file, "--sex", sex, "--height", height, "--weight", weight, "--date", date});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  for (const auto& [peep, pplat] : {std::pair{"8", pplat8}, std::pair{"12", pplat12}}) {
    r = run_cli({"trial", "add-step", file, "--label", std::string("PEEP ") + peep, "--set-peep",
                 peep, "--peep-total", peep, "--vt", "480", "--pplat", pplat, "--infusion",
                 "norepinephrine:rate=18mL/h,conc=80ug/mL"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }
}

const nlohmann::json* cell(const nlohmann::json& step, const char* section, const char* key) {
  if (!step.contains(section) || !step[section].contains(key)) return nullptr;
  return &step[section][key];
}

TEST(TrialsOverDays, TrialNewWritesTheDateAndRefusesAnImpossibleOne) {
  const std::string dir = temp_dir("trial_date");
  const std::string file = dir + "/day.toml";
  CliResult r =
      run_cli({"trial", "new", file, "--sex", "male", "--height", "178", "--date", "2026-02-29"});
  EXPECT_EQ(r.exit_code, 2) << "2026 is not a leap year";
  EXPECT_NE(r.err.find("--date"), std::string::npos) << r.err;
  EXPECT_TRUE(r.out.empty());
  EXPECT_FALSE(fs::exists(file));
  r = run_cli({"trial", "new", file, "--sex", "male", "--height", "178", "--date", "2028-02-29"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(slurp(file).find("[trial]\ndate = \"2028-02-29\"\n"), std::string::npos) << slurp(file);
  r = run_cli({"trial", "add-step", file, "--label", "PEEP 8", "--set-peep", "8"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  r = run_cli({"report", file});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("Trial date: 2028-02-29"), std::string::npos) << r.out;
  r = run_cli({"report", file, "--format", "json"});
  EXPECT_EQ(parse_json(r)["date"], "2028-02-29");
}

TEST(TrialsOverDays, TwoDaysOfOnePatientSideBySide) {
  const std::string dir = temp_dir("trials_days");
  const std::string day1 = dir + "/day1.toml";
  const std::string day2 = dir + "/day2.toml";
  record_day(day1, "2026-12-02", "80", "26", "28");
  record_day(day2, "2026-12-03", "84", "22", "28");
  if (HasFatalFailure()) return;
  const CliResult r = run_cli({"report", day1, day2, "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  ASSERT_EQ(j["steps"].size(), 4u);
  EXPECT_EQ(j["steps"][0]["label"], "2026-12-02 PEEP 8");
  EXPECT_EQ(j["steps"][3]["label"], "2026-12-03 PEEP 12");
  EXPECT_EQ(j["trials"], (nlohmann::json{"2026-12-02", "2026-12-03"}));
  // Static compliance VT / (Pplat - total PEEP) (common practice, no source):
  // day 1: 480/18 = 26.7 and 480/16 = 30.0; day 2: 480/14 = 34.3 and 480/16 = 30.0 mL/cmH2O.
  const double expected[] = {480.0 / 18, 480.0 / 16, 480.0 / 14, 480.0 / 16};
  for (std::size_t i = 0; i < 4; ++i) {
    const nlohmann::json* c = cell(j["steps"][i], "mechanics", "compliance_static");
    ASSERT_NE(c, nullptr) << j["steps"][i]["mechanics"].dump(2);
    EXPECT_NEAR((*c)["value"].get<double>(), expected[i], 0.05) << i;
  }
  // Each trial is read with its own weight: 18 mL/h x 80 mcg/mL / 60 = 24 mcg/min, i.e.
  // 0.300 mcg/kg/min at 80 kg and 0.286 at 84 kg (dose = rate x concentration / weight;
  // common practice, no source).
  const std::string c1 = j["steps"][1]["circulation"].dump();
  const std::string c2 = j["steps"][3]["circulation"].dump();
  EXPECT_NE(c1.find("0.3"), std::string::npos) << c1;
  EXPECT_NE(c2.find("0.28"), std::string::npos) << c2;
  // What changed: the best compliance was at PEEP 12 on day 1, at PEEP 8 on day 2.
  bool said = false;
  for (const auto& f : j["comparison"]) {
    if (f["key"] != "best_across_trials.best_compliance") continue;
    said = true;
    EXPECT_EQ(f["steps"], (nlohmann::json{"2026-12-02 PEEP 12", "2026-12-03 PEEP 8"}));
    EXPECT_NE(f["text"].get<std::string>().find("differs"), std::string::npos) << f.dump();
  }
  EXPECT_TRUE(said) << j["comparison"].dump(2);
  // The text report names the trials, and its steps by their dates.
  const CliResult t = run_cli({"report", day1, day2});
  ASSERT_EQ(t.exit_code, 0) << t.err;
  EXPECT_NE(t.out.find("Trials side by side: 2026-12-02, 2026-12-03"), std::string::npos) << t.out;
  EXPECT_NE(t.out.find("2026-12-03 at 'PEEP 8'"), std::string::npos) << t.out;
  // Each trial is read against its own first step, and the report says so where it names one.
  const std::string own =
      "each trial's own reference step ('2026-12-02 PEEP 8', '2026-12-03 PEEP 8')";
  EXPECT_NE(t.out.find("Reference steps: " + own), std::string::npos) << t.out;
  EXPECT_NE(t.out.find("Against " + own), std::string::npos) << t.out;
  for (const auto& h : j["heart_lung"]) {
    const std::string step = h["step"];
    EXPECT_EQ(h["reference"], step.substr(0, 10) + " PEEP 8") << h.dump();
  }
  const CliResult html = run_cli({"report", day1, day2, "--format", "html"});
  ASSERT_EQ(html.exit_code, 0) << html.err;
  std::string own_html;  // the HTML escapes the apostrophes
  for (char c : own) own_html += c == '\'' ? std::string("&#39;") : std::string(1, c);
  EXPECT_NE(html.out.find(own_html), std::string::npos);
}

TEST(TrialsOverDays, TrialsOfTwoPatientsAreRefused) {
  const std::string dir = temp_dir("trials_two_patients");
  const std::string day1 = dir + "/bed7.toml";
  const std::string other = dir + "/bed8.toml";
  record_day(day1, "2026-12-02", "80", "26", "28");
  record_day(other, "2026-12-03", "62", "22", "28", "female", "165");
  if (HasFatalFailure()) return;
  const std::string before = slurp(day1) + slurp(other);
  const CliResult r = run_cli({"report", day1, other});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("bed8.toml"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("another patient (sex and height)"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(day1) + slurp(other), before);
  // One of the same sex but another height is refused too.
  const std::string taller = dir + "/taller.toml";
  record_day(taller, "2026-12-04", "80", "22", "28", "male", "185");
  const CliResult h = run_cli({"report", day1, taller});
  EXPECT_EQ(h.exit_code, 2);
  EXPECT_NE(h.err.find("(height)"), std::string::npos) << h.err;
  // --reference names a step of one trial only.
  const std::string same = dir + "/bed7-day2.toml";
  record_day(same, "2026-12-03", "80", "22", "28");
  const CliResult ref = run_cli({"report", day1, same, "--reference", "PEEP 8"});
  EXPECT_EQ(ref.exit_code, 2);
  EXPECT_NE(ref.err.find("--reference"), std::string::npos) << ref.err;
}

// Two patients of the same sex and height (common at a bedside) are told apart by their labels:
// bed7 and bed9 are refused, both named. The same file given twice, by a second name (a hard
// link, same device and inode), is no second trial.
TEST(TrialsOverDays, DifferentPatientLabelsAndTheSameFileTwiceAreRefused) {
  const std::string dir = temp_dir("trials_labels");
  const std::string bed7 = dir + "/a.toml";
  const std::string bed9 = dir + "/b.toml";
  for (const auto& [file, label, date] :
       {std::tuple{bed7, "bed7", "2026-12-01"}, std::tuple{bed9, "bed9", "2026-12-02"}}) {
    CliResult r = run_cli({"trial", "new", file, "--sex", "male", "--height", "178",
                           "--patient-label", label, "--date", date});
    ASSERT_EQ(r.exit_code, 0) << r.err;
    r = run_cli({"trial", "add-step", file, "--label", "PEEP 8", "--set-peep", "8"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }
  const CliResult r = run_cli({"report", bed7, bed9});
  EXPECT_EQ(r.exit_code, 2) << r.out;
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("bed7"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("bed9"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("another patient"), std::string::npos) << r.err;

  const std::string link = dir + "/a-again.toml";
  fs::create_hard_link(bed7, link);
  for (const std::string& second : {bed7, link}) {
    const CliResult t = run_cli({"report", bed7, second});
    EXPECT_EQ(t.exit_code, 2) << t.out;
    EXPECT_TRUE(t.out.empty()) << t.out;
    EXPECT_NE(t.err.find("the same file"), std::string::npos) << t.err;
  }
}

}  // namespace
}  // namespace bb::test
