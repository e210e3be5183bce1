// Bad trial input: every case exits 2 with a located message, prints nothing
// on stdout and leaves every file as it was.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <sstream>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

const char* kGood =
    "[patient]\n"
    "sex = \"female\"\n"
    "height = 165\n"
    "\n"
    "[[step]]\n"
    "label = \"PEEP 8\"\n"
    "[step.hold]\n"
    "pplat = 22\n"
    "peep_total = 8\n"
    "[step.ventilator]\n"
    "vt = 400\n";

class BadTrial : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = temp_dir("trial_bad");
    out_ = dir_ + "/existing_report.txt";
    std::ofstream(out_, std::ios::binary) << "old report\n";
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }

  std::string write(const std::string& name, const std::string& text) {
    const std::string path = dir_ + "/" + name;
    std::ofstream(path, std::ios::binary) << text;
    return path;
  }

  // Runs `args`; expects exit 2, empty stdout, `located` in stderr, files unchanged.
  void expect_refused(const std::vector<std::string>& args, const std::string& file,
                      const std::string& located) {
    const std::string before = slurp(file);
    const std::string report_before = slurp(out_);
    const CliResult r = run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_NE(r.err.find(located), std::string::npos) << r.err;
    EXPECT_EQ(slurp(file), before);
    EXPECT_EQ(slurp(out_), report_before);
    std::size_t entries = 0;
    for (const auto& e : std::filesystem::directory_iterator(dir_)) entries += e.is_regular_file();
    EXPECT_EQ(entries, files_expected_);
  }

  std::string dir_;
  std::string out_;
  std::size_t files_expected_ = 2;
};

TEST_F(BadTrial, MalformedToml) {
  const std::string f = write("t.toml", std::string(kGood) + "[step.gases\npao2 = 80\n");
  expect_refused({"check", f}, f, "t.toml:12:");
  expect_refused({"report", f, "-o", out_}, f, "t.toml:12:");
}

TEST_F(BadTrial, WrongUnit) {
  std::string text = kGood;
  text.replace(text.find("pplat = 22"), 10, "pplat = \"22 mL\"");
  const std::string f = write("t.toml", text);
  expect_refused({"check", f}, f, "t.toml:8:9: field 'step[1].hold.pplat'");
  expect_refused({"report", f, "-o", out_}, f, "t.toml:8:9");
}

TEST_F(BadTrial, ImplausibleValue) {
  std::string text = kGood;
  text.replace(text.find("vt = 400"), 8, "vt = 4000");
  const std::string f = write("t.toml", text);
  expect_refused({"check", f}, f, "t.toml:11:6: field 'step[1].ventilator.vt'");
  // The override lets the real value through (plausibility ranges: common practice, no source).
  EXPECT_EQ(run_cli({"check", f, "--allow-implausible"}).exit_code, 0);
}

TEST_F(BadTrial, EveryProblemIsListedWithDidYouMean) {
  std::string text = kGood;
  text.replace(text.find("pplat = 22"), 10, "plat = 22\nppeak = \"abc\"");
  const std::string f = write("t.toml", text);
  const CliResult r = run_cli({"check", f});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("did you mean"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("'pplat'"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("step[1].hold.ppeak"), std::string::npos) << r.err;
}

TEST_F(BadTrial, UnknownReferenceLabel) {
  const std::string f = write("t.toml", kGood);
  expect_refused({"report", f, "--reference", "PEEP 9", "-o", out_}, f, "--reference");
}

TEST_F(BadTrial, TruncatedFile) {
  const std::string good = kGood;
  const std::string f =
      write("t.toml", good.substr(0, good.find("PEEP 8") + 3));  // cut inside a string
  expect_refused({"check", f}, f, "t.toml:6:");
  expect_refused({"trial", "add-step", f, "--label", "x", "--peep-total", "5"}, f, "t.toml:6:");
}

TEST_F(BadTrial, OldAndNewKeyOfOneFactInOneTable) {
  // chest_open is the old key of closed_chest (registry alias); both at once is a contradiction
  // waiting to happen, so it is refused and both are named (common practice, no source).
  const std::string f = write("t.toml", std::string(kGood) +
                                            "[step.circulation]\n"
                                            "closed_chest = true\n"
                                            "chest_open = false\n");
  expect_refused({"check", f}, f, "t.toml:14:14: field 'step[1].circulation.chest_open'");
  const CliResult r = run_cli({"check", f});
  EXPECT_NE(r.err.find("'closed_chest'"), std::string::npos) << r.err;
}

TEST_F(BadTrial, UnknownChoiceWordListsTheChoices) {
  std::string text = kGood;
  text.replace(text.find("vt = 400"), 8, "vt = 400\nmode = \"vcv\"");
  const std::string f = write("t.toml", text);
  expect_refused({"check", f}, f, "t.toml:12:8: field 'step[1].ventilator.mode'");
  EXPECT_NE(run_cli({"check", f}).err.find("vc or pc"), std::string::npos);
}

TEST_F(BadTrial, ContradictionIsLocatedAtTheValueItNames) {
  // IVC Dmin above Dmax cannot be (a diameter's minimum is not above its maximum; common
  // practice, no source): the IVC check names ivc_dmin, located where the file wrote it.
  const std::string f = write("t.toml", std::string(kGood) +
                                            "[step.ultrasound]\n"
                                            "ivc_dmax = 1.5\n"
                                            "ivc_dmin = 2.0\n");
  expect_refused({"check", f}, f, "t.toml:14:12: field 'step[1].ultrasound.ivc_dmin'");
}

TEST_F(BadTrial, AddStepWithABadValueLeavesTheFileUntouched) {
  const std::string f = write("t.toml", kGood);
  expect_refused({"trial", "add-step", f, "--label", "PEEP 12", "--pplat", "25 furlongs"}, f,
                 "--pplat");
  expect_refused({"trial", "add-step", f, "--label", "PEEP 12", "--peep-total", "45"}, f,
                 "--peep-total");
  // An old spelling is named as typed.
  expect_refused({"trial", "add-step", f, "--label", "PEEP 12", "--peep", "45"}, f, "--peep");
  expect_refused({"trial", "add-step", f, "--label", "PEEP 8", "--peep-total", "10"}, f, "--label");
  expect_refused({"trial", "add-step", f, "--label", "PEEP 12", "--mode", "vcv"}, f, "--mode");
  expect_refused({"trial", "add-step", f, "--label", "PEEP 12", "--passive", "--effort"}, f,
                 "--effort");
}

}  // namespace
}  // namespace bb::test
