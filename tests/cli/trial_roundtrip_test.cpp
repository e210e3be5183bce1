// End to end: record a trial with `trial new` and `trial add-step`, check it,
// report it; comments of a hand-written file survive add-step byte for byte.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

void spit(const std::string& path, const std::string& text) {
  std::ofstream(path, std::ios::binary) << text;
}

TEST(TrialRoundTrip, NewPlusAddStepsThenCheckAndReport) {
  const std::string dir = temp_dir("trial_roundtrip");
  const std::string file = dir + "/bed4.toml";
  CliResult r = run_cli({"trial", "new", file, "--sex", "Female", "--height", "165 cm", "--weight",
                         "70", "--patient-label", "bed 4"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(slurp(file).find("sex = \"female\""), std::string::npos) << slurp(file);

  r = run_cli({"trial", "new", file, "--sex", "male", "--height", "180"});
  EXPECT_EQ(r.exit_code, 2) << "trial new must refuse to overwrite";
  EXPECT_TRUE(r.out.empty());

  r = run_cli({"trial", "add-step",   file,        "--label",       "PEEP 5",  "--time",
               "08:00", "--set-peep", "5",         "--peep-total",  "6",       "--vt",
               "350",   "--pplat",    "20",        "--ppeak",       "25",      "--rr",
               "22",    "--fio2",     "0.5",       "--pao2",        "9.1 kPa", "--hb",
               "10",    "--sao2",     "93",        "--co",          "4.8",     "--map",
               "68",    "--passive",  "--regular", "--closed-chest"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(r.err.empty()) << r.err;
  r = run_cli({"trial", "add-step",     file, "--label", "PEEP 10", "--set-peep",
               "10",    "--peep-total", "10", "--vt",    "350",     "--pplat",
               "23",    "--rr",         "22", "--fio2",  "50%",     "--pao2",
               "85",    "--hb",         "10", "--sao2",  "95%",     "--co",
               "4.5",   "--map",        "66", "--mode",  "VC"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  r = run_cli({"trial", "add-step", file, "--label", "PEEP 14", "--set-peep", "14", "--peep-total",
               "14", "--vt", "350", "--pplat", "27", "--ivc-dmax", "2.1", "--ivc-dmin", "1.9",
               "--ivc-breathing", "passive"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  // Written under the registry's keys (docs/trial-file.md), choice words as the registry spells
  // them.
  const std::string written = slurp(file);
  for (const char* line : {"peep_total = \"6\"", "passive = true", "regular_rhythm = true",
                           "closed_chest = true", "mode = \"vc\"", "ivc_dmax = \"2.1\"",
                           "ivc_breathing = \"passive\"", "label = \"bed 4\""}) {
    EXPECT_NE(written.find(line), std::string::npos) << line << " in\n" << written;
  }

  r = run_cli({"check", file});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("3 steps"), std::string::npos);

  r = run_cli({"report", file, "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = parse_json(r);
  ASSERT_EQ(j["steps"].size(), 3u);
  EXPECT_EQ(j["steps"][0]["label"], "PEEP 5");
  EXPECT_EQ(j["steps"][2]["label"], "PEEP 14");
  // dP = Pplat - PEEPtotal = 20 - 6 = 14 cmH2O (Amato et al., NEJM 2015;372:747).
  EXPECT_NEAR(j["steps"][0]["mechanics"]["driving_pressure"]["value"].get<double>(), 14.0, 1e-9);
  EXPECT_EQ(j["steps"][0]["mechanics"]["driving_pressure"]["unit"], "cm[H2O]");
  // PaO2 9.1 kPa = 68.26 mmHg (1 kPa = 7.50062 mmHg, NIST SP 811); P/F = 68.26/0.5 = 136.5 mmHg.
  EXPECT_NEAR(j["steps"][0]["gas_exchange"]["pf_ratio"]["value"].get<double>(), 9.1 * 7.50062 / 0.5,
              0.05);
  // Cost: CO (4.5 - 4.8)/4.8 = -6.25 %, not flagged (10 %: common practice, no source).
  for (const auto& f : j["comparison"]) EXPECT_NE(f["key"], "haemodynamic_cost");

  r = run_cli({"report", file, "--format", "csv"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(std::count(r.out.begin(), r.out.end(), '\n'), 4);  // header + one row per step
  EXPECT_NE(r.out.find("mechanics.driving_pressure [cm[H2O]]"), std::string::npos);
  std::filesystem::remove_all(dir);
}

TEST(TrialRoundTrip, CommentsOfAHandWrittenFileSurviveAddStep) {
  const std::string dir = temp_dir("trial_comments");
  const std::string file = dir + "/hand.toml";
  const std::string original =
      "# hand-written trial, bed 9\n"
      "[patient]\n"
      "sex = \"male\"   # for PBW\n"
      "height = \"180 cm\"\n"
      "\n"
      "[[step]]\n"
      "label = \"PEEP 8\"  # baseline\n"
      "[step.hold]\n"
      "pplat = 24 # noisy hold\n"
      "peep_total = 8\n"
      "[step.ventilator]\n"
      "vt = 480\n"
      "# trailing comment without newline";
  spit(file, original);
  const CliResult r = run_cli({"trial", "add-step", file, "--label", "PEEP 12", "--peep-total",
                               "12", "--pplat", "27", "--vt", "480"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const std::string after = slurp(file);
  ASSERT_GT(after.size(), original.size());
  EXPECT_EQ(after.substr(0, original.size()), original);  // every earlier byte unchanged
  EXPECT_EQ(run_cli({"check", file}).exit_code, 0);
  std::filesystem::remove_all(dir);
}

// The old spellings of add-step and of the file keep working, with one note on stderr each;
// they mean what they meant (the registry's aliases; common practice, no source).
TEST(TrialRoundTrip, OldSpellingsStillWorkWithANote) {
  const std::string dir = temp_dir("trial_old");
  const std::string file = dir + "/old.toml";
  CliResult r =
      run_cli({"trial", "new", file, "--sex", "male", "--height", "180", "--label", "b9"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.err.find("'--label' is an old spelling of '--patient-label'"), std::string::npos)
      << r.err;
  // Both spellings at once: refused, the file not written; the help of --patient-label
  // names no hidden option (common practice, no source).
  const std::string both = dir + "/both.toml";
  const CliResult twice = run_cli({"trial", "new", both, "--sex", "male", "--height", "180",
                                   "--label", "b9", "--patient-label", "b9"});
  EXPECT_EQ(twice.exit_code, 2) << twice.err;
  EXPECT_NE(twice.err.find("old spelling of --patient-label"), std::string::npos) << twice.err;
  EXPECT_TRUE(twice.out.empty());
  EXPECT_FALSE(std::filesystem::exists(both));
  const CliResult help = run_cli({"trial", "new", "--help"});
  EXPECT_EQ(help.out.find("Excludes: \n"), std::string::npos) << help.out;
  r = run_cli({"trial",
               "add-step",
               file,
               "--label",
               "PEEP 8",
               "--peep",
               "8",
               "--pplat",
               "24",
               "--vt",
               "480",
               "--spontaneous",
               "--chest-open",
               "--dmax",
               "2.0",
               "--dmin",
               "1.2",
               "--breathing",
               "assisted",
               "--cycles",
               "50/40,52/41,49/40",
               "--lvot",
               "2.1",
               "--vti",
               "18"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(r.out.find("note") == std::string::npos) << r.out;
  for (const char* old : {"'--peep'", "'--spontaneous'", "'--chest-open'", "'--dmax'", "'--dmin'",
                          "'--breathing'", "'--cycles'", "'--lvot'"}) {
    EXPECT_NE(r.err.find(old), std::string::npos) << old << " in " << r.err;
  }
  const std::string written = slurp(file);
  for (const char* line :
       {"peep_total = \"8\"", "passive = false", "closed_chest = false", "ivc_dmin = \"1.2\"",
        "ivc_breathing = \"assisted\"", "pp_cycles = \"50/40,52/41,49/40\"",
        "lvot_diameter = \"2.1\"", "label = \"b9\""}) {
    EXPECT_NE(written.find(line), std::string::npos) << line << " in\n" << written;
  }
  EXPECT_EQ(run_cli({"check", file}).exit_code, 0);

  // Old file keys: the same facts under the new keys give the same report, and each old key
  // gives one note (with its first place), on stderr only.
  const std::string common =
      "[patient]\nsex = \"male\"\nheight = 180\n\n"
      "[[step]]\nlabel = \"PEEP 8\"\n[step.ventilator]\nvt = 480\nset_peep = 8\n"
      "[step.hold]\npplat = 24\npeep_total = 8\n"
      "[step.circulation]\npp_cycles = \"50/40,52/41,49/40\"\nhr = 90\n";
  const std::string old_keys = dir + "/old_keys.toml";
  const std::string new_keys = dir + "/new_keys.toml";
  spit(old_keys, common +
                     "spontaneous_effort = false\nchest_open = false\nrhythm_regular = true\n"
                     "intra_abdominal_hypertension = false\n\n"
                     "[[step]]\nlabel = \"PEEP 12\"\n[step.circulation]\nchest_open = false\n");
  spit(new_keys, common +
                     "passive = true\nclosed_chest = true\nregular_rhythm = true\niah = false\n\n"
                     "[[step]]\nlabel = \"PEEP 12\"\n[step.circulation]\nclosed_chest = true\n");
  const CliResult old_report = run_cli({"report", old_keys, "--format", "json"});
  const CliResult new_report = run_cli({"report", new_keys, "--format", "json"});
  ASSERT_EQ(old_report.exit_code, 0) << old_report.err;
  ASSERT_EQ(new_report.exit_code, 0) << new_report.err;
  nlohmann::json a = parse_json(old_report), b = parse_json(new_report);
  a.erase("file");
  b.erase("file");
  EXPECT_EQ(a, b);
  EXPECT_TRUE(new_report.err.empty()) << new_report.err;
  EXPECT_NE(old_report.err.find("old_keys.toml:16:22: note: 'spontaneous_effort' is an old "
                                "spelling of 'passive' (with the opposite true/false)"),
            std::string::npos)
      << old_report.err;
  EXPECT_NE(old_report.err.find("'chest_open'"), std::string::npos) << old_report.err;
  EXPECT_NE(old_report.err.find("used 2 times"), std::string::npos) << old_report.err;
  EXPECT_NE(old_report.err.find("'rhythm_regular' is an old spelling of 'regular_rhythm'"),
            std::string::npos)
      << old_report.err;
  EXPECT_NE(old_report.err.find("'intra_abdominal_hypertension' is an old spelling of 'iah'"),
            std::string::npos)
      << old_report.err;
  const CliResult check = run_cli({"check", old_keys});
  EXPECT_EQ(check.exit_code, 0) << check.err;
  EXPECT_EQ(check.out.find("note"), std::string::npos) << check.out;
  EXPECT_NE(check.err.find("note"), std::string::npos) << check.err;
  std::filesystem::remove_all(dir);
}

TEST(TrialRoundTrip, ReportToAFileIsWrittenAtomically) {
  const std::string dir = temp_dir("trial_out");
  const std::string trial = source_dir() + "/presets/demo/trial.toml";
  const std::string out = dir + "/report.json";
  CliResult r = run_cli({"report", trial, "--format", "json", "-o", out});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(nlohmann::json::parse(slurp(out))["steps"].size(), 5u);
  for (const auto& e : std::filesystem::directory_iterator(dir)) {
    EXPECT_EQ(e.path().filename(), "report.json") << "temporary file left behind";
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace bb::test
