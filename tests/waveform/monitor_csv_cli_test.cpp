// Monitor exports read as they come, end to end: a `wave synth` record, written
// as CSV by `wave convert --format csv`, rewritten here into the dialects of
// docs/waveform-formats.md (semicolons and decimal commas with `ART (mmHg)`,
// `Paw [cmH2O]`, `Time [s]` headers; tabs with clock times; other units), must
// give the same PPV as the original record. The synthetic PPV is exact by
// construction: PPV = (PPmax - PPmin) / ((PPmax + PPmin) / 2) (Michard F et al.
// Am J Respir Crit Care Med 2000;162:134-138), set per breath by `wave synth`.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <functional>
#include <sstream>

#include "cli_runner.hpp"

namespace bb::wave {
namespace {

namespace fs = std::filesystem;

// A 3-minute synthetic record converted to this project's CSV
// (time_s,ABP_mmHg,Paw_cmH2O,Flow_L/min) by `wave convert`.
fs::path converted_csv(const fs::path& dir) {
  const auto rec = dir / "r.hea";
  auto r = test::run_cli({"wave", "synth", "-o", rec.string(), "--duration", "3min", "--fs", "125",
                          "--hr", "96", "--rr", "16", "--ppv", "14", "--seed", "4"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  const auto csv = dir / "r.csv";
  r = test::run_cli({"wave", "convert", rec.string(), "-o", csv.string(), "--format", "csv"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return csv;
}

std::vector<std::vector<std::string>> cells_of(const fs::path& csv) {
  std::ifstream in(csv);
  std::vector<std::vector<std::string>> rows;
  for (std::string line; std::getline(in, line);) {
    std::vector<std::string> cells;
    std::stringstream s(line);
    for (std::string cell; std::getline(s, cell, ',');) cells.push_back(cell);
    if (!line.empty() && line.back() == ',') cells.emplace_back();
    rows.push_back(cells);
  }
  return rows;
}

// Writes `rows` with a new header, separator and decimal mark; `cell` may
// rewrite a data cell (row index from 0, column index).
fs::path rewrite(
    const fs::path& out, const std::vector<std::vector<std::string>>& rows,
    const std::string& header, char sep, bool decimal_comma, const char* eol = "\n",
    const std::function<std::string(std::size_t, std::size_t, const std::string&)>& cell = {}) {
  std::ofstream o(out, std::ios::binary);
  o << header << eol;
  for (std::size_t r = 1; r < rows.size(); ++r) {
    for (std::size_t c = 0; c < rows[r].size(); ++c) {
      std::string v = cell ? cell(r - 1, c, rows[r][c]) : rows[r][c];
      if (decimal_comma)
        for (char& ch : v)
          if (ch == '.') ch = ',';
      o << (c ? std::string(1, sep) : "") << v;
    }
    o << eol;
  }
  return out;
}

nlohmann::json wave_json(const fs::path& record, std::vector<std::string> extra = {}) {
  std::vector<std::string> args{"wave", record.string(), "--format", "json"};
  args.insert(args.end(), extra.begin(), extra.end());
  const auto r = test::run_cli(args);
  EXPECT_EQ(r.exit_code, 0) << record << ": " << r.err;
  return r.exit_code == 0 ? test::parse_json(r) : nlohmann::json::object();
}

double ppv(const nlohmann::json& j) {
  return j.value("/ppv/value"_json_pointer, -1.0);
}

TEST(MonitorCsv, SemicolonDecimalCommaExportGivesTheSamePpvAsTheOriginal) {
  const fs::path dir = test::temp_dir("monitor_csv_semicolon");
  const auto original = converted_csv(dir);
  const auto rows = cells_of(original);
  ASSERT_EQ(rows[0], (std::vector<std::string>{"time_s", "ABP_mmHg", "Paw_cmH2O", "Flow_L/min"}));
  const auto exported = rewrite(dir / "export.csv", rows,
                                "Time [s];ART (mmHg);Paw [cmH2O];Flow (L/min)", ';', true, "\r\n");
  const auto a = wave_json(original);
  const auto b = wave_json(exported);
  EXPECT_NEAR(ppv(a), 14.0, 1.0);  // synthetic truth (Michard 2000 definition), within 1 point
  EXPECT_EQ(ppv(b), ppv(a));       // the same samples: the same PPV, to the last digit
  EXPECT_EQ(b["breaths"], a["breaths"]);
  EXPECT_EQ(b["heart_rate"], a["heart_rate"]);
  EXPECT_EQ(b["results"], a["results"]);  // mechanics from Paw and flow too
  // The dialect detected is said, so that it can be checked.
  EXPECT_NE(b["notes"].dump().find("separated by semicolons (detected), with decimal commas"),
            std::string::npos)
      << b["notes"].dump();
}

TEST(MonitorCsv, EachHeaderStyleTabsClockTimesAndOtherUnitsGiveTheSamePpv) {
  const fs::path dir = test::temp_dir("monitor_csv_styles");
  const auto original = converted_csv(dir);
  const auto rows = cells_of(original);
  const double expected = ppv(wave_json(original));
  ASSERT_GT(expected, 0.0);
  // name_unit (this project's own), name [unit], mixed, with a tab separator.
  for (const char* header : {"Time_s\tART_mmHg\tPaw_cmH2O\tFlow_L/min",
                             "Time [s]\tAP [mmHg]\tPressure airway [cmH2O]\tFlow [L/min]",
                             "t (s)\tabp (mmHg)\tPAW_cmH2O\tflow [L/min]"}) {
    const auto f = rewrite(dir / "tab.csv", rows, header, '\t', false);
    EXPECT_EQ(ppv(wave_json(f)), expected) << header;
  }
  // Clock times from 23:59:00.000, crossing midnight a minute in; semicolons.
  const auto clock = [](std::size_t r, std::size_t c, const std::string& v) {
    if (c != 0) return v;
    const long ms = (86340000L + static_cast<long>(r) * 8) % 86400000L;  // 125 Hz: 8 ms
    char buf[32];
    std::snprintf(buf, sizeof buf, "%02ld:%02ld:%02ld.%03ld", ms / 3600000, ms / 60000 % 60,
                  ms / 1000 % 60, ms % 1000);
    return std::string(buf);
  };
  const auto clocked = rewrite(dir / "clock.csv", rows, "Time;ART (mmHg);Paw [cmH2O];Flow (L/min)",
                               ';', true, "\n", clock);
  const auto j = wave_json(clocked);
  EXPECT_EQ(ppv(j), expected);
  EXPECT_NEAR(j["duration"]["value"].get<double>(), 180.0, 1e-6);  // rows x 8 ms
  // Time 0 as the file writes it (decimal comma).
  EXPECT_NE(j["notes"].dump().find("clock time, 23:59:00,000"), std::string::npos)
      << j["notes"].dump();
  // Units through the unit table: ABP in kPa, flow in L/s (1 mmHg = 133.322387415 Pa,
  // NIST SP 811 (2008) Appendix B; 1 L/s = 60 L/min).
  const auto scaled = [](std::size_t, std::size_t c, const std::string& v) {
    if (v.empty() || c == 0 || c == 2) return v;
    std::ostringstream s;
    s.precision(17);
    s << (c == 1 ? std::stod(v) * 0.133322387415 : std::stod(v) / 60.0);
    return s.str();
  };
  const auto other_units =
      rewrite(dir / "units.csv", rows, "Time [s];ABP (kPa);Paw [cmH2O];Flow (L/s)", ';', true, "\n",
              scaled);
  EXPECT_NEAR(ppv(wave_json(other_units)), expected, 1e-6);
}

TEST(MonitorCsv, AmbiguousCommaSeparatorWithDecimalCommasIsRefused) {
  const fs::path dir = test::temp_dir("monitor_csv_ambiguous");
  const auto rows = cells_of(converted_csv(dir));
  const auto f =
      rewrite(dir / "amb.csv", rows, "Time [s],ART (mmHg),Paw [cmH2O],Flow (L/min)", ',', true);
  const auto r = test::run_cli({"wave", f.string()});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("amb.csv:2:"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("ambiguous"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("--delimiter semicolon --decimal comma"), std::string::npos) << r.err;
}

TEST(MonitorCsv, UnplacedHeadersListTheColumnsAndTheOverridesWhichThenWork) {
  const fs::path dir = test::temp_dir("monitor_csv_unplaced");
  const auto original = converted_csv(dir);
  const auto rows = cells_of(original);
  const auto f =
      rewrite(dir / "ch.csv", rows, "Time [s];Ch 1 (mmHg);Ch 2 (cmH2O);Ch 3 (L/min)", ';', true);
  const auto r = test::run_cli({"wave", f.string()});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  for (const char* word : {"Ch 1", "Ch 2", "Ch 3", "--abp NAME", "--paw NAME", "--flow NAME"})
    EXPECT_NE(r.err.find(word), std::string::npos) << word << ": " << r.err;
  const auto j = wave_json(f, {"--abp", "Ch 1", "--paw", "Ch 2", "--flow", "Ch 3"});
  EXPECT_EQ(ppv(j), ppv(wave_json(original)));
  // A unit of the wrong dimension for its channel: located at its header cell.
  const auto w =
      rewrite(dir / "unit.csv", rows, "Time [s];ART (L/min);Paw [cmH2O];Flow (L/min)", ';', true);
  const auto bad = test::run_cli({"wave", w.string()});
  EXPECT_EQ(bad.exit_code, 2);
  EXPECT_NE(bad.err.find("unit.csv:1:10"), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("mmHg"), std::string::npos) << bad.err;
}

TEST(MonitorCsv, ConvertReadsTheExportWithTheDialectForced) {
  const fs::path dir = test::temp_dir("monitor_csv_convert");
  const auto original = converted_csv(dir);
  const auto rows = cells_of(original);
  const auto f =
      rewrite(dir / "export.csv", rows, "Time [s];ART (mmHg);Paw [cmH2O];Flow (L/min)", ';', true);
  const auto back = dir / "back.csv";
  const auto r = test::run_cli({"wave", "convert", f.string(), "-o", back.string(), "--delimiter",
                                "SEMICOLON", "--decimal", "Comma"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  auto again = cells_of(back);
  ASSERT_EQ(again.size(), rows.size());
  for (std::size_t i = 1; i < rows.size(); ++i) EXPECT_EQ(again[i], rows[i]) << "row " << i;
}

}  // namespace
}  // namespace bb::wave
