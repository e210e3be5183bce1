// The text report a clinician reads (issue 12, items 1-7): the answer on the first screen,
// nothing cut, numbered footnotes printed, plain labels, display units a site chooses, CSV
// headers `name [unit]`. The 3-step trial is a fixture with invented values.
#include <gtest/gtest.h>

#include <fstream>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include "breathbeat/present/report.hpp"
#include "breathbeat/present/wave.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "cli_runner.hpp"

namespace bb {
namespace {

TrialAnalysis analyse(const std::string& text, const std::string& site = "") {
  LoadedTrial t = load_trial_text(text, "fixture.toml", TrialReadOptions{});
  if (!site.empty()) t.limits.load_overrides_text(site, "site.toml");
  return analyse_trial(t.trial, t.limits);
}

std::string demo_text() {
  return std::string(*presets::find("demo/trial.toml"));
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) out.push_back(line);
  return out;
}

std::string first_lines(const std::string& text, std::size_t n) {
  std::string out;
  const auto lines = lines_of(text);
  for (std::size_t i = 0; i < n && i < lines.size(); ++i) out += lines[i] + "\n";
  return out;
}

// Whitespace runs as one space: a label wrapped over two lines reads as one.
std::string collapsed(const std::string& text) {
  std::string out;
  for (char c : text) {
    const bool space = c == ' ' || c == '\n';
    if (space && !out.empty() && out.back() == ' ') continue;
    out += space ? ' ' : c;
  }
  return out;
}

// Three steps with PPV from pulse-pressure cycles (invented values): PPV (44-36)/40 = 20 % at
// VT 8 mL/kg PBW (male 180 cm, PBW 75.0 kg: 600 mL = 8.0 mL/kg; ARDS Network, NEJM
// 2000;342:1301), so the statements read.
const char* kThreeSteps = R"(
[patient]
sex = "male"
height = 180
weight = 80
[[step]]
label = "low PEEP"
time = "08:00"
[step.ventilator]
mode = "vc"
set_peep = 5
vt = 600
rr = 18
fio2 = "50%"
[step.hold]
peep_total = 6
pplat = 22
[step.gases]
pao2 = 70
paco2 = 45
sao2 = 0.92
hb = 10.0
lactate = 2.5
[step.circulation]
co = 5.0
map = 70
hr = 100
rhythm_regular = true
spontaneous_effort = false
chest_open = false
pp_cycles = "44/36, 44/36, 44/36"
iah = false
rv_failure = false
[[step]]
label = "middle PEEP"
time = "08:20"
[step.ventilator]
mode = "vc"
set_peep = 10
vt = 600
rr = 18
fio2 = "50%"
[step.hold]
peep_total = 11
pplat = 26
[step.gases]
pao2 = 85
paco2 = 46
sao2 = 0.95
hb = 10.0
[step.circulation]
co = 4.6
map = 66
hr = 104
rhythm_regular = true
spontaneous_effort = false
chest_open = false
pp_cycles = "44/36, 44/36, 44/36"
iah = false
rv_failure = false
[[step]]
label = "high PEEP"
time = "08:40"
[step.ventilator]
mode = "vc"
set_peep = 15
vt = 600
rr = 18
fio2 = "50%"
[step.hold]
peep_total = 16
pplat = 31
[step.gases]
pao2 = 100
paco2 = 48
sao2 = 0.97
hb = 10.0
lactate = 3.0
[step.circulation]
co = 4.0
map = 60
hr = 110
rhythm_regular = true
spontaneous_effort = false
chest_open = false
pp_cycles = "44/36, 44/36, 44/36"
iah = false
rv_failure = false
)";

// The summary on the first 40 lines: every step, every row, the preload statements.
void expect_summary_first(const std::string& text, const std::vector<std::string>& steps,
                          const std::vector<std::string>& rows,
                          const std::vector<std::string>& statements) {
  const auto lines = lines_of(text);
  const std::string screen = first_lines(text, 40);
  EXPECT_NE(screen.find("\nSummary\n"), std::string::npos) << screen;
  for (const auto& s : steps) EXPECT_NE(screen.find(s), std::string::npos) << s << "\n" << screen;
  for (const auto& r : rows)
    EXPECT_NE(screen.find("  " + r), std::string::npos) << r << "\n" << screen;
  std::string preload_row;
  for (std::size_t i = 0; i < 40 && i < lines.size(); ++i) {
    if (lines[i].rfind("  Preload statement ", 0) == 0) preload_row = lines[i];
  }
  ASSERT_FALSE(preload_row.empty()) << screen;
  std::istringstream words(preload_row.substr(std::string("  Preload statement").size()));
  std::vector<std::string> got;
  std::string w;
  while (words >> w) got.push_back(w);
  EXPECT_EQ(got, statements) << preload_row;
  EXPECT_NE(screen.find("Cautions in short:"), std::string::npos) << screen;
  for (std::size_t i = 0; i < 40 && i < lines.size(); ++i)
    EXPECT_LE(lines[i].size(), 100u) << lines[i];
}

TEST(ReportText, DemoAnswersOnTheFirstScreen) {
  const std::string text = report_text(analyse(demo_text()));
  // The demo's statements: PPV unreadable at VT 6 mL/kg PBW (n/a) at the first three steps,
  // likely responsive with the challenge's open conditions (?) at 'PEEP 14 VT 8', likely at
  // 'PEEP 18' (the same as its Preload section; Michard 2000, Myatra 2017).
  expect_summary_first(
      text, {"PEEP 6=", "PEEP 10", "PEEP 14", "PEEP 14 VT 8", "PEEP 18"},
      {"Total PEEP [cmH2O]", "Pplat [cmH2O]", "Driving pressure [cmH2O]", "Crs [mL/cmH2O]",
       "PaO2/FiO2 [mmHg]", "PaCO2 [mmHg]", "MAP [mmHg]", "CO [L/min]", "DO2 [mL/min]",
       "NE equivalent [mcg/kg/min]", "Lactate [mmol/L]"},
      {"n/a", "n/a", "n/a", "likely?", "likely"});
  const std::string screen = first_lines(text, 40);
  // What still applies where PPV cannot be read (VT 6.0 < 8.0 mL/kg PBW): at 'PEEP 14' the
  // tidal-volume challenge was done (to 'PEEP 14 VT 8'), so it is not offered again.
  EXPECT_NE(collapsed(screen).find("PEEP 10: PPV cannot be read at this tidal volume: a "
                                   "tidal-volume challenge"),
            std::string::npos)
      << screen;
  EXPECT_NE(collapsed(screen).find("PEEP 14: PPV cannot be read at this tidal volume: an "
                                   "end-expiratory occlusion or passive leg raising still applies"),
            std::string::npos)
      << screen;
  EXPECT_NE(screen.find("Trade-off: 'PEEP 18'"), std::string::npos) << screen;
  // Details follow the summary; the method notes come after the cautions.
  const std::size_t cautions = text.find("\nCautions\n");
  const std::size_t appendix = text.find("\nAppendix: method notes\n");
  ASSERT_NE(cautions, std::string::npos);
  ASSERT_NE(appendix, std::string::npos);
  EXPECT_LT(text.find("\nMechanics\n"), cautions);
  EXPECT_LT(cautions, appendix);
}

TEST(ReportText, ThreeStepTrialAnswersOnTheFirstScreen) {
  const std::string text = report_text(analyse(kThreeSteps));
  // PPV 20 % > 13 % with every condition met or stated (Michard et al., AJRCCM 2000;162:134)
  // except Crs: 600/(22-6) = 37.5, 600/(26-11) = 40.0, 600/(31-16) = 40.0 mL/cmH2O, all above
  // 30 (arithmetic): likely responsive at each step, not conditional.
  expect_summary_first(text, {"low PEEP=", "middle PEEP", "high PEEP"},
                       {"Total PEEP [cmH2O]", "Pplat [cmH2O]", "Driving pressure [cmH2O]",
                        "Crs [mL/cmH2O]", "PaO2/FiO2 [mmHg]", "PaCO2 [mmHg]", "MAP [mmHg]",
                        "CO [L/min]", "DO2 [mL/min]", "Lactate [mmol/L]"},
                       {"likely", "likely", "likely"});
  // Crs 37.5 mL/cmH2O at 'low PEEP' (arithmetic above) in the summary.
  EXPECT_NE(first_lines(text, 40).find("37.5"), std::string::npos);
}

TEST(ReportText, NoLabelOrStepNameIsCut) {
  for (const std::string& trial : {demo_text(), std::string(kThreeSteps)}) {
    const TrialAnalysis a = analyse(trial);
    const std::string text = report_text(a);
    for (const auto& line : lines_of(text)) {
      EXPECT_LE(line.size(), 100u) << line;
      EXPECT_EQ(line.find("~ "), std::string::npos) << line;  // the old clip mark
      if (!line.empty()) EXPECT_NE(line.back(), '~') << line;
    }
    // Every row label of every step, with its unit, is printed whole (a wrapped label reads
    // whole once line breaks are spaces).
    const std::string flat = collapsed(text);
    const auto j = report_json(a);
    for (const auto& step : j["steps"]) {
      EXPECT_NE(flat.find(step["label"].get<std::string>()), std::string::npos);
    }
    const std::string csv = report_csv(a);
    EXPECT_FALSE(csv.empty());
  }
  // A long step name wraps in the header instead of being cut.
  std::string long_names = kThreeSteps;
  long_names.replace(long_names.find("\"middle PEEP\""), 13,
                     "\"middle PEEP after the second recruitment manoeuvre\"");
  const std::string text = report_text(analyse(long_names));
  const std::string flat = collapsed(text);
  EXPECT_NE(flat.find("middle PEEP after the second recruitment manoeuvre"), std::string::npos)
      << text;
  for (const auto& line : lines_of(text)) EXPECT_LE(line.size(), 100u) << line;
}

TEST(ReportText, LongLabelsWrapWithTheirUnits) {
  const std::string flat = collapsed(report_text(analyse(demo_text())));
  // Labels longer than the label column (44) keep their unit (the old text cut them).
  EXPECT_NE(flat.find("Norepinephrine NE-equivalent share [mcg/kg/min]"), std::string::npos);
  EXPECT_NE(flat.find("IVC respiratory variation (Dmax-Dmin)/mean [%]"), std::string::npos);
  EXPECT_EQ(flat.find("[mcg/kg/~"), std::string::npos);
}

TEST(ReportText, FootnotesAreNumberedAndPrinted) {
  const std::string text = report_text(analyse(demo_text()));
  // The demo's CO method (a cell note in the JSON) is footnote 1 of the summary's CO row.
  EXPECT_NE(text.find("  CO [L/min] [1] "), std::string::npos) << text;
  EXPECT_NE(text.find("\n  [1] CO: transpulmonary thermodilution\n"), std::string::npos) << text;
  // Each number used is printed once as a note line.
  const std::regex mark(R"(\[(\d+)\])");
  for (auto it = std::sregex_iterator(text.begin(), text.end(), mark); it != std::sregex_iterator();
       ++it) {
    const std::string line = "\n  [" + (*it)[1].str() + "] ";
    EXPECT_NE(text.find(line), std::string::npos) << line;
  }
  // No bare star marks pointing at the JSON any more.
  EXPECT_EQ(text.find("(JSON)"), std::string::npos);
  EXPECT_EQ(std::regex_search(text, std::regex(R"(\d\*)")), false);
}

TEST(ReportText, PlainLabelsNotKeys) {
  const std::string text = report_text(analyse(demo_text()));
  for (const char* key : {"ppv reading", "vt_challenge reading", "ivc reading", "above_grey_zone",
                          "(ppv, vt_challenge)", "(ppv)", "(ivc)"})
    EXPECT_EQ(text.find(key), std::string::npos) << key;
  EXPECT_NE(collapsed(text).find("the arterial pressure swing (PPV, tidal-volume challenge)"),
            std::string::npos);
}

TEST(ReportText, NoRepetition) {
  const std::string text = report_text(analyse(demo_text()));
  // Mechanical power above 17 J/min (Serpa Neto et al. 2018) at four steps: one line.
  std::size_t count = 0;
  for (std::size_t at = text.find("J/min is above 17 J/min"); at != std::string::npos;
       at = text.find("J/min is above 17 J/min", at + 1))
    ++count;
  EXPECT_EQ(count, 1u) << text;
  EXPECT_NE(
      collapsed(text).find("Mechanical power 18.52/21.40/32.11/25.11 J/min is above 17 J/min"),
      std::string::npos);
  // Pplat above 30 cmH2O (ARDS Network 2000) at two steps: once.
  count = 0;
  for (std::size_t at = text.find("cmH2O is above 30.0 cmH2O"); at != std::string::npos;
       at = text.find("cmH2O is above 30.0 cmH2O", at + 1))
    ++count;
  EXPECT_EQ(count, 1u) << text;
  // The oxygenation-index note differs by step only in the estimated Pmean: one line.
  count = 0;
  for (std::size_t at = text.find("The oxygenation index (and OSI)"); at != std::string::npos;
       at = text.find("The oxygenation index (and OSI)", at + 1))
    ++count;
  EXPECT_EQ(count, 1u);
}

TEST(ReportText, DisplayUnitsChangeTextNotJson) {
  const std::string kpa = R"(
[display.blood_gas]
value = 1
unit = "kPa"
[display.haemoglobin]
value = 0
unit = "g/L"
)";
  const TrialAnalysis mm = analyse(kThreeSteps);
  const TrialAnalysis kp = analyse(kThreeSteps, kpa);
  const std::string text_mm = report_text(mm), text_kp = report_text(kp);
  EXPECT_NE(text_mm.find("PaO2/FiO2 [mmHg]"), std::string::npos);
  EXPECT_NE(text_kp.find("PaO2/FiO2 [kPa]"), std::string::npos) << text_kp;
  EXPECT_EQ(text_kp.find("PaO2/FiO2 [mmHg]"), std::string::npos);
  EXPECT_NE(text_kp.find("PaCO2 [kPa]"), std::string::npos);
  EXPECT_NE(text_kp.find("Haemoglobin [g/L]"), std::string::npos);
  // PaO2 70 mmHg / FiO2 0.5 = 140 mmHg = 18.7 kPa (1 mmHg = 0.133322 kPa, BIPM SI brochure);
  // Hb 10.0 g/dL = 100 g/L. MAP stays in mmHg: it is not a blood gas.
  EXPECT_NE(text_kp.find("18.7"), std::string::npos);
  EXPECT_NE(text_kp.find("Haemoglobin [g/L]                "), std::string::npos);
  EXPECT_NE(text_kp.find("MAP [mmHg]"), std::string::npos);
  // JSON and CSV keep the stored unit and its UCUM code.
  EXPECT_EQ(report_json(mm).dump(), report_json(kp).dump());
  EXPECT_EQ(report_csv(mm), report_csv(kp));
  EXPECT_EQ(report_json(kp)["steps"][0]["gas_exchange"]["pf_ratio"]["unit"], "mm[Hg]");
  // Haemoglobin in mmol/L (monomer, 1 mmol/L = 1.611 g/dL; units.hpp): 10.0 / 1.611 = 6.2.
  const std::string text_mmol = report_text(analyse(kThreeSteps, R"(
[display.haemoglobin]
value = 1
unit = "mmol/L"
)"));
  EXPECT_NE(text_mmol.find("Haemoglobin [mmol/L]"), std::string::npos);
  EXPECT_NE(text_mmol.find(" 6.2 "), std::string::npos) << text_mmol;
}

TEST(ReportText, CalcAnswersUseTheDisplayUnitsInTextOnly) {
  const std::string site = test::temp_dir("report_display_units") + "/site.toml";
  std::ofstream(site, std::ios::binary) << "[display.blood_gas]\nvalue = 1\nunit = \"kPa\"\n";
  // PaO2 80 mmHg = 10.7 kPa; PaO2/FiO2 80 / 0.5 = 160 mmHg = 21.3 kPa (1 mmHg = 0.133322 kPa).
  const test::CliResult text =
      test::run_cli({"calc", "oxygen", "--pao2", "80", "--fio2", "0.5", "--thresholds", site});
  ASSERT_EQ(text.exit_code, 0) << text.err;
  EXPECT_NE(text.out.find("10.7 kPa"), std::string::npos) << text.out;
  EXPECT_NE(text.out.find("21.3 kPa"), std::string::npos) << text.out;
  const test::CliResult json = test::run_cli(
      {"calc", "oxygen", "--pao2", "80", "--fio2", "0.5", "--thresholds", site, "--json"});
  ASSERT_EQ(json.exit_code, 0) << json.err;
  EXPECT_NE(json.out.find("\"mm[Hg]\""), std::string::npos);
  EXPECT_EQ(json.out.find("\"unit\": \"kPa\""), std::string::npos) << json.out;
}

TEST(ReportText, DisplayUnitsBadChoiceNamesTheEntry) {
  // cmH2O is a pressure (the thresholds loader accepts it) but not a blood-gas display unit.
  const TrialAnalysis a =
      analyse(kThreeSteps, "[display.blood_gas]\nvalue = 0\nunit = \"cmH2O\"\n");
  try {
    report_text(a);
    FAIL() << "cmH2O accepted as a blood-gas display unit";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("display.blood_gas"), std::string::npos) << e.what();
  }
}

// `name [unit]`, a plain name (words, counts), never a unit glued to the name.
void expect_headers(const std::string& header_line) {
  const std::regex ok(R"(^[a-z0-9_.]+( \[[^ ]+\])?$)");
  std::istringstream in(header_line);
  std::string h;
  while (std::getline(in, h, ',')) {
    if (!h.empty() && h.back() == '\n') h.pop_back();
    EXPECT_TRUE(std::regex_match(h, ok)) << "'" << h << "' in " << header_line;
    EXPECT_EQ(h.find("_mm[Hg]"), std::string::npos) << h;
    EXPECT_FALSE(h.size() >= 2 && h.substr(h.size() - 2) == "_s") << h;  // "start_s" style
  }
}

TEST(ReportCsv, HeadersAreNameAndUnit) {
  const std::string csv = report_csv(analyse(demo_text()));
  const std::string header = csv.substr(0, csv.find('\n'));
  expect_headers(header);
  // PBW (ARDS Network 2000) and the tidal-volume challenge's PPV change are columns.
  EXPECT_NE(header.find("patient.pbw [kg]"), std::string::npos) << header;
  EXPECT_NE(header.find("preload.vt_challenge.ppv_change_points [%]"), std::string::npos) << header;
  EXPECT_NE(header.find("gas_exchange.pao2 [mm[Hg]]"), std::string::npos);
  std::ostringstream beats, breaths, windows;
  wave::write_beat_csv_header(beats);
  wave::write_breath_csv_header(breaths);
  wave::write_window_csv_header(windows);
  for (const std::string& h : {beats.str(), breaths.str(), windows.str()}) {
    expect_headers(h.substr(0, h.find('\n')));
    EXPECT_EQ(h.find("_s,"), std::string::npos) << h;
    EXPECT_EQ(h.find("_mm[Hg]"), std::string::npos) << h;
  }
  EXPECT_NE(beats.str().find("systolic [mm[Hg]]"), std::string::npos);
  EXPECT_NE(windows.str().find("ppv [%]"), std::string::npos);
}

}  // namespace
}  // namespace bb
