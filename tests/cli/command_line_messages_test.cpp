// Command-line mistakes a new user makes get a message that says what is
// wrong, where, what was expected and what was probably meant: exit 2,
// nothing on stdout. Suggested units follow from the unit definitions (NIST SP
// 811, 2008, Appendix B) and the plausible ranges of presets/plausibility.toml
// (common practice, no source).
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

namespace fs = std::filesystem;

// Runs `args`; expects exit 2, nothing on stdout and each of `said` in stderr.
void expect_message(const std::vector<std::string>& args, const std::vector<std::string>& said) {
  const CliResult r = run_cli(args);
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_EQ(r.out, "");
  for (const std::string& s : said)
    EXPECT_NE(r.err.find(s), std::string::npos) << s << "\n" << r.err;
}

TEST(CommandLineMessages, ATypoedOptionGetsTheNearestOptionOfItsCommand) {
  expect_message(
      {"calc", "mechanics", "--pplta", "20", "--peep-total", "5", "--vt", "400"},
      {"'--pplta'", "not an option of breathbeat calc mechanics", "did you mean '--pplat'?"});
  expect_message({"calc", "ivc", "--dmaxx", "2", "--dmin", "1.6"}, {"did you mean '--dmax'?"});
  expect_message({"wave", "synth", "-o", "x.csv", "--duraton", "1min"},
                 {"did you mean '--duration'?"});
  // Nothing near: the command's --help is named instead of a guess.
  const CliResult r = run_cli({"calc", "mechanics", "--zzzzzzzzzz", "1"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_EQ(r.err.find("did you mean"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("breathbeat calc mechanics --help"), std::string::npos) << r.err;
  // A mistyped command.
  expect_message({"calc", "mechancs"}, {"did you mean 'mechanics'?"});
}

TEST(CommandLineMessages, ChoiceWordsIgnoreCaseAndAWrongOneGetsTheNearest) {
  const fs::path dir = temp_dir("messages_choice");
  const fs::path trial = dir / "t.toml";
  const CliResult made =
      run_cli({"trial", "new", trial.string(), "--sex", "Male", "--height", "178"});
  ASSERT_EQ(made.exit_code, 0) << made.err;
  EXPECT_NE(slurp(trial).find("sex = \"male\""), std::string::npos) << slurp(trial);
  expect_message({"trial", "new", (dir / "u.toml").string(), "--sex", "mael", "--height", "178"},
                 {"--sex", "did you mean 'male'?"});
  EXPECT_FALSE(fs::exists(dir / "u.toml"));

  const fs::path rec = dir / "r.csv";
  ASSERT_EQ(run_cli({"wave", "synth", "-o", rec.string(), "--duration", "1min"}).exit_code, 0);
  const CliResult json = run_cli({"wave", rec.string(), "--format", "JSON"});
  ASSERT_EQ(json.exit_code, 0) << json.err;
  EXPECT_TRUE(parse_json(json).contains("ppv"));
  expect_message({"wave", rec.string(), "--format", "jsno"}, {"--format", "did you mean 'json'?"});
  const CliResult edf =
      run_cli({"wave", "synth", "-o", (dir / "r.dat").string(), "--format", "EDF"});
  EXPECT_EQ(edf.exit_code, 0) << edf.err;  // --format decides over the extension
  fs::remove_all(dir);
}

// A report format word is read without regard to case by every command that takes
// one (common practice, no source); a wrong one is refused naming --format.
TEST(CommandLineMessages, ReportFormatWordsIgnoreCase) {
  const auto upper = run_cli({"demo", "--format", "JSON"});
  EXPECT_EQ(upper.exit_code, 0) << upper.err;
  EXPECT_EQ(upper.out, run_cli({"demo", "--format", "json"}).out);
  const auto wrong = run_cli({"demo", "--format", "htm"});
  EXPECT_EQ(wrong.exit_code, 2);
  EXPECT_TRUE(wrong.out.empty());
  EXPECT_NE(wrong.err.find("--format"), std::string::npos) << wrong.err;
}

TEST(CommandLineMessages, ADecimalCommaIsReadAsADecimalPoint) {
  const nlohmann::json point =
      parse_json(run_cli({"calc", "echo", "--lvot", "2.1", "--vti", "18", "--json"}));
  const CliResult comma = run_cli({"calc", "echo", "--lvot", "2,1", "--vti", "18", "--json"});
  ASSERT_EQ(comma.exit_code, 0) << comma.err;
  EXPECT_EQ(parse_json(comma)["results"]["stroke_volume"],
            point["results"]["stroke_volume"]);  // the same number, read two ways
  // Three digits after the comma may be thousands: refused, saying both readings.
  expect_message({"calc", "mechanics", "--vt", "0,450", "--pplat", "25", "--peep-total", "5"},
                 {"--vt", "thousands", "0.450", "0450"});
}

TEST(CommandLineMessages, ABareNumberImplausibleInItsDefaultUnitSuggestsTheUnitItFits) {
  // 9.1 kPa = 68 mmHg (NIST SP 811: 1 kPa = 7.50062 mmHg), inside 20-700 mmHg.
  expect_message({"calc", "oxygen", "--pao2", "9.1", "--fio2", "0.5"},
                 {"--pao2", "outside the plausible range", "did you mean 9.1kPa?"});
  // 92 g/L = 9.2 g/dL, inside 3-25 g/dL.
  expect_message({"calc", "oxygen", "--hb", "92", "--sao2", "0.95"},
                 {"--hb", "did you mean 92g/L?"});
  // 0.36 L = 360 mL, inside 50-1500 mL.
  expect_message({"calc", "mechanics", "--vt", "0.36", "--pplat", "25", "--peep-total", "5"},
                 {"--vt", "did you mean 0.36L?"});
  // 1.78 m = 178 cm, inside 100-250 cm.
  expect_message({"calc", "mechanics", "--vt", "400", "--height", "1.78", "--sex", "male"},
                 {"--height", "did you mean 1.78m?"});
  // 20 mm = 2.0 cm, inside 0.2-4.0 cm.
  expect_message({"calc", "ivc", "--dmax", "20", "--dmin", "1.6", "--breathing", "passive"},
                 {"--dmax", "did you mean 20mm?"});
  // The same in trial new and trial add-step, in the form the trial file holds (which the
  // command line reads too), said once.
  const fs::path dir = temp_dir("messages_units");
  const fs::path trial = dir / "t.toml";
  expect_message({"trial", "new", trial.string(), "--sex", "male", "--height", "1.78"},
                 {"--height", "did you mean \"1.78 m\"?"});
  ASSERT_EQ(run_cli({"trial", "new", trial.string(), "--sex", "male", "--height", "178"}).exit_code,
            0);
  const CliResult step =
      run_cli({"trial", "add-step", trial.string(), "--label", "a", "--pao2", "9.1"});
  EXPECT_EQ(step.exit_code, 2);
  EXPECT_NE(step.err.find("--pao2"), std::string::npos) << step.err;
  EXPECT_NE(step.err.find("did you mean \"9.1 kPa\"?"), std::string::npos) << step.err;
  EXPECT_EQ(step.err.find("did you mean"), step.err.rfind("did you mean")) << step.err;
  EXPECT_EQ(step.err.find("for a bare number"), step.err.rfind("for a bare number")) << step.err;
  EXPECT_EQ(
      run_cli({"trial", "add-step", trial.string(), "--label", "b", "--pao2", "9.1kPa"}).exit_code,
      0);
  fs::remove_all(dir);
  // A unit typed is what was meant: no guess.
  const CliResult typed = run_cli({"calc", "oxygen", "--pao2", "9.1mmHg", "--fio2", "0.5"});
  EXPECT_EQ(typed.exit_code, 2);
  EXPECT_EQ(typed.err.find("did you mean"), std::string::npos) << typed.err;
}

}  // namespace
}  // namespace bb::test
