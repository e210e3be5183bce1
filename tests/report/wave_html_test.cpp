// `breathbeat wave FILE --format html`: well-formed, self-contained, and its
// points equal the other outputs: the PPV trend the JSON windows, the strip's
// beats the --beats CSV. The record is synthetic (breathbeat wave synth), so
// the numbers are the detector's, not invented.
#include <gtest/gtest.h>

#include <cstdlib>
#include <fstream>
#include <map>
#include <regex>
#include <set>

#include "cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

std::vector<std::map<std::string, std::string>> drawn(const std::string& html,
                                                      const std::string& cls,
                                                      const std::string& series) {
  std::vector<std::map<std::string, std::string>> out;
  static const std::regex g(R"re(<g class="([a-z ]+)"([^>]*)>)re");
  static const std::regex a(R"re(([a-z-]+)="([^"]*)")re");
  for (auto it = std::sregex_iterator(html.begin(), html.end(), g); it != std::sregex_iterator();
       ++it) {
    if (std::string((*it)[1]).rfind(cls, 0) != 0) continue;
    std::map<std::string, std::string> attr;
    const std::string attrs = (*it)[2];
    for (auto j = std::sregex_iterator(attrs.begin(), attrs.end(), a); j != std::sregex_iterator();
         ++j)
      attr[(*j)[1]] = (*j)[2];
    if (attr["data-series"] == series) out.push_back(attr);
  }
  return out;
}

std::string read(const std::string& file) {
  std::ifstream in(file);
  return std::string((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
}

class WaveHtml : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = new std::string(temp_dir("wave_html"));
    const std::string rec = *dir_ + "/rec.hea";
    ASSERT_EQ(
        run_cli({"wave", "synth", "-o", rec, "--duration", "3min", "--ectopy", "3%"}).exit_code, 0);
    const CliResult h = run_cli({"wave", rec, "--format", "html", "-o", *dir_ + "/wave.html",
                                 "--beats", *dir_ + "/beats.csv"});
    ASSERT_EQ(h.exit_code, 0) << h.err;
    html_ = new std::string(read(*dir_ + "/wave.html"));
    json_ = new json(parse_json(run_cli({"wave", rec, "--format", "json"})));
  }
  static void TearDownTestSuite() {
    delete dir_;
    delete html_;
    delete json_;
  }
  static std::string* dir_;
  static std::string* html_;
  static json* json_;
};
std::string* WaveHtml::dir_ = nullptr;
std::string* WaveHtml::html_ = nullptr;
json* WaveHtml::json_ = nullptr;

TEST_F(WaveHtml, ParsesAsWellFormedXmlAndIsSelfContained) {
  const std::string cmd = std::string(BREATHBEAT_PYTHON) +
                          " -c \"import sys, xml.etree.ElementTree as E; E.parse(sys.argv[1])\" " +
                          *dir_ + "/wave.html";
  EXPECT_EQ(std::system(cmd.c_str()), 0);
  EXPECT_EQ(html_->find("<script"), std::string::npos);
  EXPECT_EQ(html_->find("<img"), std::string::npos);
  EXPECT_EQ(html_->find("https:"), std::string::npos);
}

TEST_F(WaveHtml, TrendPointsAreTheJsonWindows) {
  const auto points = drawn(*html_, "point", "windows.ppv");
  const auto whiskers = drawn(*html_, "whisker", "windows.ppv_p10_p90");
  std::vector<const json*> with_ppv;
  for (const json& w : (*json_)["windows"])
    if (!w["ppv"].is_null()) with_ppv.push_back(&w);
  ASSERT_FALSE(with_ppv.empty());
  ASSERT_EQ(points.size(), with_ppv.size());
  ASSERT_EQ(whiskers.size(), with_ppv.size());
  for (std::size_t i = 0; i < points.size(); ++i) {
    const json& w = *with_ppv[i];
    EXPECT_EQ(std::stod(points[i].at("data-x")), w["start"]["value"].get<double>());
    EXPECT_EQ(std::stod(points[i].at("data-y")), w["ppv"]["value"].get<double>());
    EXPECT_EQ(std::stod(whiskers[i].at("data-low")), w["ppv"]["p10"].get<double>());
    EXPECT_EQ(std::stod(whiskers[i].at("data-high")), w["ppv"]["p90"].get<double>());
    const std::string mark = w["reading"] == "not_interpretable" ? "not valid"
                             : w["conditional"].get<bool>()      ? "conditional"
                                                                 : "valid";
    EXPECT_EQ(points[i].at("data-mark"), mark);
  }
}

TEST_F(WaveHtml, StripBeatsAreDetectedBeats) {
  // Every marked beat is a row of the --beats CSV (systolic_time [s], systolic [mmHg]).
  std::set<std::pair<double, double>> rows;
  std::map<std::pair<double, double>, std::string> verdict;
  std::istringstream csv(read(*dir_ + "/beats.csv"));
  std::string line;
  std::getline(csv, line);  // header
  while (std::getline(csv, line)) {
    std::vector<std::string> f;
    std::stringstream ss(line);
    for (std::string x; std::getline(ss, x, ',');) f.push_back(x);
    const std::pair<double, double> key{std::stod(f[1]), std::stod(f[2])};
    rows.insert(key);
    verdict[key] = f.back();
  }
  const auto beats = drawn(*html_, "point", "beats");
  // A 20 s strip at a synthetic heart rate of 90/min (wave synth default) holds about 30 beats.
  EXPECT_GE(beats.size(), 20u);
  for (const auto& b : beats) {
    const std::pair<double, double> key{std::stod(b.at("data-x")), std::stod(b.at("data-y"))};
    ASSERT_TRUE(rows.count(key)) << b.at("data-x") << " " << b.at("data-y");
    EXPECT_EQ(b.at("data-mark"), verdict[key] == "accepted" ? "valid" : "not valid");
  }
  EXPECT_GE(drawn(*html_, "point", "breaths").size(), 4u);  // 18/min over 20 s: 6 breaths
}

TEST_F(WaveHtml, StdoutWithoutOutput) {
  const CliResult r = run_cli({"wave", *dir_ + "/rec.hea", "--format", "html"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.out, *html_);
}

}  // namespace
}  // namespace bb::test
