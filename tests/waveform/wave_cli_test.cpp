// breathbeat wave FILE end to end: the JSON summary the issue asks for, the
// text report with its cautions, and bad input that fails midway through a
// record: exit code 2, nothing on stdout, no output file left behind.
#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>

#include "cli_runner.hpp"

namespace bb::wave {
namespace {

std::filesystem::path synth(const std::filesystem::path& dir, const std::string& name,
                            const std::string& duration) {
  const auto out = dir / name;
  const auto r = bb::test::run_cli({"wave", "synth", "-o", out.string(), "--duration", duration,
                                    "--fs", "125", "--hr", "96", "--rr", "16", "--ppv", "14"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return out;
}

TEST(WaveCli, JsonSummaryHasTheAgreedFieldsAndRecoversTheTruth) {
  const auto dir = std::filesystem::path(bb::test::temp_dir("wave_cli_json"));
  const auto rec = synth(dir, "r.hea", "3min");
  const auto r = bb::test::run_cli({"wave", rec.string(), "--format", "json"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const nlohmann::json j = bb::test::parse_json(r);
  for (const char* key : {"duration", "beats", "beats_rejected", "breaths", "heart_rate",
                          "respiratory_rate", "hr_rr_ratio", "ppv", "mean_airway_pressure",
                          "windows", "cautions"}) {
    EXPECT_TRUE(j.contains(key)) << key;
  }
  EXPECT_NEAR(j["duration"]["value"].get<double>(), 180.0, 1e-6);  // synthetic truth
  EXPECT_EQ(j["duration"]["unit"], "s");
  EXPECT_NEAR(j["heart_rate"]["value"].get<double>(), 96, 0.5);       // synthetic truth
  EXPECT_NEAR(j["respiratory_rate"]["value"].get<double>(), 16, 0.2);  // synthetic truth
  EXPECT_NEAR(j["ppv"]["value"].get<double>(), 14, 1.0);  // synthetic truth, issue: within 1 point
  EXPECT_EQ(j["ppv"]["unit"], "%");
  EXPECT_LE(j["ppv"]["p10"].get<double>(), j["ppv"]["value"].get<double>());
  EXPECT_GE(j["ppv"]["p90"].get<double>(), j["ppv"]["value"].get<double>());
  ASSERT_TRUE(j["windows"].is_array());
  EXPECT_EQ(j["windows"].size(), 6u);  // 180 s in windows of 30 s
}

TEST(WaveCli, TextReportCarriesTheCautionsAndTheTrend) {
  const auto dir = std::filesystem::path(bb::test::temp_dir("wave_cli_text"));
  const auto rec = synth(dir, "r.edf", "2min");
  const auto r = bb::test::run_cli({"wave", rec.string(), "--window", "1min"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("never a substitute"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("Trend (windows of 60 s)"), std::string::npos) << r.out;
}

TEST(WaveCli, AnErrorMidwayPrintsNothingAndLeavesNoFile) {
  const auto dir = std::filesystem::path(bb::test::temp_dir("wave_cli_bad"));
  const auto rec = synth(dir, "r.csv", "2min");
  // Break one row a minute in (row 7500 of 15000; the first 1000 set the rate).
  const auto broken = dir / "broken.csv";
  {
    std::ifstream in(rec);
    std::ofstream out(broken);
    std::string line;
    for (int n = 1; std::getline(in, line); ++n) out << (n == 7502 ? line + ",9" : line) << "\n";
  }
  const auto beats = dir / "beats.csv";
  const auto r = bb::test::run_cli({"wave", broken.string(), "--beats", beats.string()});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("broken.csv:7502"), std::string::npos) << r.err;
  EXPECT_FALSE(std::filesystem::exists(beats));
  // A channel that is not in the record: named, with the channels there are.
  const auto missing = bb::test::run_cli({"wave", rec.string(), "--abp", "ART2"});
  EXPECT_EQ(missing.exit_code, 2);
  EXPECT_TRUE(missing.out.empty());
  EXPECT_NE(missing.err.find("ABP"), std::string::npos) << missing.err;
}

}  // namespace
}  // namespace bb::wave
