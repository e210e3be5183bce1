// The HTML report: well-formed XML (parsed by python3's xml.etree), self-contained
// (no scripts, fonts, images or links to anywhere), and every plotted point,
// whisker and band equal to the JSON report's numbers (data-x/data-y attributes
// against report_json). The demo trial is invented (presets/demo/trial.toml).
#include <gtest/gtest.h>

#include <cstdlib>
#include <fstream>
#include <map>
#include <regex>
#include <set>

#include "breathbeat/present/svg.hpp"
#include "cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

struct Element {
  std::string cls;
  std::map<std::string, std::string> attr;
};

// Every <g class="point ..."> and <g class="whisker"> / <g class="band"> of the page.
std::vector<Element> drawn(const std::string& html, const std::string& cls_prefix) {
  std::vector<Element> out;
  static const std::regex g(R"re(<g class="([a-z ]+)"([^>]*)>)re");
  static const std::regex a(R"re(([a-z-]+)="([^"]*)")re");
  for (auto it = std::sregex_iterator(html.begin(), html.end(), g); it != std::sregex_iterator();
       ++it) {
    const std::string cls = (*it)[1];
    if (cls.rfind(cls_prefix, 0) != 0) continue;
    Element e{cls, {}};
    const std::string attrs = (*it)[2];
    for (auto j = std::sregex_iterator(attrs.begin(), attrs.end(), a); j != std::sregex_iterator();
         ++j)
      e.attr[(*j)[1]] = (*j)[2];
    out.push_back(e);
  }
  return out;
}

const json& step_of(const json& report, const std::string& label) {
  for (const json& s : report["steps"])
    if (s["label"] == label) return s;
  ADD_FAILURE() << "no step " << label;
  static const json none;
  return none;
}

const json* heart_lung_of(const json& report, const std::string& step) {
  for (const json& h : report["heart_lung"])
    if (h["step"] == step) return &h;
  return nullptr;
}

// The JSON number a series key names at a step ("mechanics.compliance_static",
// "preload.ppv.ppv", "heart_lung.observed.observed_cvp_change").
const json* json_value(const json& report, const std::string& series, const std::string& step) {
  const auto dot = series.find('.');
  const std::string section = series.substr(0, dot);
  const std::string rest = series.substr(dot + 1);
  if (section == "heart_lung") {
    const json* h = heart_lung_of(report, step);
    const auto d2 = rest.find('.');
    const json& part = (*h)[rest.substr(0, d2)];
    const std::string key = rest.substr(d2 + 1);
    return part.contains(key) ? &part[key] : nullptr;
  }
  const json& s = step_of(report, step);
  if (section == "preload") {
    const auto d2 = rest.find('.');
    for (const json& idx : s["preload"]["indices"]) {
      if (idx["key"] == rest.substr(0, d2)) return &idx["values"][rest.substr(d2 + 1)];
    }
    return nullptr;
  }
  return s[section].contains(rest) ? &s[section][rest] : nullptr;
}

double number(const std::string& text) {
  EXPECT_FALSE(text.empty());
  return std::stod(text);
}

class DemoHtml : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    const CliResult h = run_cli({"demo", "--format", "html"});
    ASSERT_EQ(h.exit_code, 0) << h.err;
    html_ = new std::string(h.out);
    json_ = new json(parse_json(run_cli({"demo", "--format", "json"})));
  }
  static void TearDownTestSuite() {
    delete html_;
    delete json_;
  }
  static std::string* html_;
  static json* json_;
};
std::string* DemoHtml::html_ = nullptr;
json* DemoHtml::json_ = nullptr;

TEST_F(DemoHtml, ParsesAsWellFormedXml) {
  const std::string dir = temp_dir("report_html_xml");
  const std::string file = dir + "/demo.html";
  std::ofstream(file) << *html_;
  // xml.etree refuses any unclosed, misnested or unescaped markup.
  const std::string cmd = std::string(BREATHBEAT_PYTHON) +
                          " -c \"import sys, xml.etree.ElementTree as E; r = E.parse(sys.argv[1])."
                          "getroot(); sys.exit(0 if r.tag.endswith('html') else 3)\" " +
                          file;
  EXPECT_EQ(std::system(cmd.c_str()), 0) << "not well-formed: " << file;
}

TEST_F(DemoHtml, IsSelfContained) {
  const std::string& h = *html_;
  EXPECT_EQ(h.find("<script"), std::string::npos);
  EXPECT_EQ(h.find("<img"), std::string::npos);
  EXPECT_EQ(h.find("<link"), std::string::npos);
  EXPECT_EQ(h.find("@import"), std::string::npos);
  EXPECT_EQ(h.find("@font-face"), std::string::npos);
  // The only URIs are the XML namespaces; url() only points inside the page.
  std::string rest = std::regex_replace(
      h, std::regex(R"re(xmlns="http://www\.w3\.org/(1999/xhtml|2000/svg)")re"), "");
  EXPECT_EQ(rest.find("http:"), std::string::npos);
  EXPECT_EQ(rest.find("https:"), std::string::npos);
  for (std::size_t at = h.find("url("); at != std::string::npos; at = h.find("url(", at + 1))
    EXPECT_EQ(h.compare(at, 5, "url(#"), 0) << h.substr(at, 30);
}

TEST_F(DemoHtml, ShowsPatientTimeCautionsAndSummaryFirst) {
  const std::string& h = *html_;
  const json& j = *json_;
  const std::string label = j["patient"]["label"];
  EXPECT_NE(h.find("<strong id=\"patient-label\">" + label + "</strong>"), std::string::npos);
  // The demo's first and last step times (presets/demo/trial.toml).
  EXPECT_NE(h.find("<strong id=\"trial-time\">09:10 to 09:55</strong>"), std::string::npos);
  const auto cautions = h.find("id=\"cautions\"");
  const auto summary = h.find("id=\"summary-table\"");
  const auto plots = h.find("id=\"plots\"");
  ASSERT_NE(cautions, std::string::npos);
  ASSERT_NE(summary, std::string::npos);
  EXPECT_LT(cautions, summary);
  EXPECT_LT(summary, plots);
  for (const auto& c : j["cautions"]) EXPECT_NE(h.find(c.get<std::string>()), std::string::npos);
}

TEST_F(DemoHtml, EveryPointEqualsTheJsonReport) {
  const json& j = *json_;
  const std::vector<Element> points = drawn(*html_, "point");
  ASSERT_FALSE(points.empty());
  std::map<std::string, int> per_series;
  for (const Element& p : points) {
    const std::string series = p.attr.at("data-series");
    const std::string step = p.attr.at("data-step");
    ++per_series[series];
    const json* v = json_value(j, series, step);
    ASSERT_NE(v, nullptr) << series << " at " << step;
    EXPECT_EQ(number(p.attr.at("data-y")), (*v)["value"].get<double>()) << series << " " << step;
    // The demo's total PEEP differs between steps: the x axis is total PEEP.
    EXPECT_EQ(number(p.attr.at("data-x")),
              step_of(j, step)["mechanics"]["peep_total"]["value"].get<double>())
        << series << " " << step;
    if (series.rfind("preload.", 0) == 0) {
      const std::string index = series.substr(8, series.find('.', 8) - 8);
      for (const json& idx : step_of(j, step)["preload"]["indices"]) {
        if (idx["key"] != index) continue;
        const std::string expected = idx["direction"] == "not_valid"  ? "not valid"
                                     : idx["conditional"].get<bool>() ? "conditional"
                                                                      : "valid";
        EXPECT_EQ(p.attr.at("data-mark"), expected) << series << " " << step;
      }
    }
  }
  // No value is left out: as many points as steps with the value in the JSON.
  for (const char* series :
       {"mechanics.compliance_static", "mechanics.driving_pressure", "gas_exchange.pf_ratio",
        "gas_exchange.do2", "circulation.co", "circulation.map", "preload.ppv.ppv",
        "preload.ivc.ivc_distensibility", "preload.ivc.ivc_variation"}) {
    int expected = 0;
    for (const json& s : j["steps"]) {
      if (json_value(j, series, s["label"]) && !json_value(j, series, s["label"])->is_null())
        ++expected;
    }
    EXPECT_GT(expected, 0) << series;
    EXPECT_EQ(per_series[series], expected) << series;
  }
  int observed = 0;
  for (const json& h : j["heart_lung"]) observed += h["observed"].contains("observed_co_change");
  EXPECT_EQ(per_series["heart_lung.observed.observed_co_change"], observed);
}

TEST_F(DemoHtml, WhiskersAreTheEstimatedRanges) {
  const json& j = *json_;
  const std::vector<Element> whiskers = drawn(*html_, "whisker");
  int ranges = 0;
  for (const json& h : j["heart_lung"])
    ranges += h["estimated"].contains("right_atrial_pressure_change");
  int seen = 0;
  for (const Element& w : whiskers) {
    const json* v = json_value(j, w.attr.at("data-series"), w.attr.at("data-step"));
    ASSERT_NE(v, nullptr);
    EXPECT_EQ(number(w.attr.at("data-y")), (*v)["value"].get<double>());
    EXPECT_EQ(number(w.attr.at("data-low")), v->value("low", (*v)["value"].get<double>()));
    EXPECT_EQ(number(w.attr.at("data-high")), v->value("high", (*v)["value"].get<double>()));
    seen += w.attr.at("data-series") == "heart_lung.estimated.right_atrial_pressure_change";
  }
  EXPECT_EQ(seen, ranges);
}

TEST_F(DemoHtml, GreyZoneBandIsThePresetThreshold) {
  const json& j = *json_;
  const std::vector<Element> bands = drawn(*html_, "band");
  ASSERT_EQ(bands.size(), 1u);
  // The JSON's thresholds read "9.0 % (source)": the band's ends are those numbers.
  EXPECT_EQ(number(bands[0].attr.at("data-low")),
            std::stod(j["thresholds"]["ppv.grey_zone_low"].get<std::string>()));
  EXPECT_EQ(number(bands[0].attr.at("data-high")),
            std::stod(j["thresholds"]["ppv.grey_zone_high"].get<std::string>()));
}

TEST_F(DemoHtml, EveryPlotHasAxisLabelsWithUnitsAndACaption) {
  const std::string& h = *html_;
  std::size_t plots = 0;
  for (std::size_t at = h.find("<svg"); at != std::string::npos; at = h.find("<svg", at + 1)) {
    const std::string one = h.substr(at, h.find("</svg>", at) - at);
    ++plots;
    const std::regex label(R"re(class="axis-label"[^>]*>[^<]*\[[^\]]+\]</text>)re");
    // Two labels (x and y), each naming a unit in brackets; a step axis names no unit.
    const auto n =
        std::distance(std::sregex_iterator(one.begin(), one.end(), label), std::sregex_iterator());
    EXPECT_GE(n, 1) << one.substr(0, 200);
  }
  EXPECT_GE(plots, 10u);  // compliance, dP, P/F, DO2, CO, MAP, PPV, IVC, two heart-lung
  std::size_t figures = 0, captions = 0;
  for (std::size_t at = h.find("<figure"); at != std::string::npos; at = h.find("<figure", at + 1))
    ++figures;
  for (std::size_t at = h.find("<figcaption>"); at != std::string::npos;
       at = h.find("<figcaption>", at + 1))
    ++captions;
  EXPECT_EQ(figures, 5u);
  EXPECT_EQ(captions, figures);
}

TEST(ReportHtml, EscapesTheTrialsWords) {
  // The demo trial with a patient label that is markup.
  std::ifstream in(source_dir() + "/presets/demo/trial.toml");
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  const std::regex label(R"re(label = "[^"]*")re");
  text = std::regex_replace(text, label, "label = \"bed <4> & 'A'\"",
                            std::regex_constants::format_first_only);
  const std::string dir = temp_dir("report_html_escape");
  std::ofstream(dir + "/trial.toml") << text;
  const CliResult r = run_cli({"report", dir + "/trial.toml", "--format", "html"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("bed &lt;4&gt; &amp; &#39;A&#39;"), std::string::npos);
  EXPECT_EQ(r.out.find("bed <4>"), std::string::npos);
}

TEST(ReportHtml, DemoWritesTheFileWithOutput) {
  const std::string dir = temp_dir("report_html_output");
  const CliResult r = run_cli({"demo", "--format", "html", "-o", dir + "/demo.html"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  std::ifstream in(dir + "/demo.html");
  const std::string written((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  EXPECT_EQ(written.rfind("<!DOCTYPE html>", 0), 0u);
  EXPECT_EQ(written, run_cli({"demo", "--format", "html"}).out);
  EXPECT_EQ(r.out, "Report written to " + dir + "/demo.html\n");
}

// ---- the SVG module ---------------------------------------------------------------------

TEST(Svg, EscapesMarkup) {
  EXPECT_EQ(svg::escape("a<b>&\"c'"), "a&lt;b&gt;&amp;&quot;c&#39;");
}

TEST(Svg, DataNumbersReadBackExactly) {
  for (double v : {0.1, 35.0, -15.38, 1.0 / 3.0, 113.33})
    EXPECT_EQ(std::stod(svg::data_number(v)), v);
}

TEST(Svg, NiceTicksAreRound) {
  // 0 to 40 in five steps: 0, 10, ..., 40 (common practice, no source).
  EXPECT_EQ(svg::nice_ticks(0, 40, 5), (std::vector<double>{0, 10, 20, 30, 40}));
  EXPECT_EQ(svg::nice_ticks(7, 19, 5), (std::vector<double>{8, 10, 12, 14, 16, 18}));
}

TEST(Svg, MarksReadingsByShapeAndWord) {
  svg::Plot p;
  p.id = "t";
  p.x.categories = {"A", "B", "C"};
  p.x.label = "Step";
  p.y.label = "PPV [%]";
  svg::Series s;
  s.key = "k";
  for (int i = 0; i < 3; ++i) {
    svg::Point pt;
    pt.x = i;
    pt.y = 10 + i;
    pt.data_x = std::to_string(i);
    pt.data_y = svg::data_number(pt.y);
    pt.step = p.x.categories[i];
    pt.mark = static_cast<svg::Mark>(i);
    s.points.push_back(pt);
  }
  p.series.push_back(s);
  const std::string out = svg::render(p);
  EXPECT_NE(out.find("data-mark=\"valid\""), std::string::npos);
  EXPECT_NE(out.find("data-mark=\"conditional\""), std::string::npos);
  EXPECT_NE(out.find("data-mark=\"not valid\""), std::string::npos);
  // Filled circle, open circle, cross; and the legend says each in words.
  EXPECT_NE(out.find("fill=\"#000\" stroke=\"#000\""), std::string::npos);
  EXPECT_NE(out.find("fill=\"#fff\" stroke=\"#000\""), std::string::npos);
  EXPECT_NE(out.find("<path d=\"M"), std::string::npos);
  EXPECT_NE(out.find(">not valid</text>"), std::string::npos);
  EXPECT_NE(out.find(">conditional</text>"), std::string::npos);
  // A step axis labels each step.
  for (const char* c : {">A</text>", ">B</text>", ">C</text>"})
    EXPECT_NE(out.find(c), std::string::npos) << c;
}

}  // namespace
}  // namespace bb::test
