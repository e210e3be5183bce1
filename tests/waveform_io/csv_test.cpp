// CSV reader: the header convention documented in docs/waveform-formats.md
// (this project's own convention) and every malformed input a clear InputError
// with file:line:column.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <functional>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/csv.hpp"
#include "breathbeat/waveform/source.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

std::filesystem::path write_text(const std::string& dir, const std::string& name,
                                 const std::string& text) {
  const auto path = std::filesystem::path(dir) / name;
  std::ofstream(path, std::ios::binary) << text;
  return path;
}

std::vector<std::vector<double>> read_all_csv(SignalSource& src) {
  std::vector<std::vector<double>> all(src.channels().size());
  Chunk chunk;
  while (src.next(chunk, 0.02)) {
    for (std::size_t c = 0; c < all.size(); ++c) {
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    }
  }
  return all;
}

// Opens and reads the whole file in chunks of `seconds`, returning the InputError it throws.
InputError error_of(const std::filesystem::path& path, std::optional<double> fs = std::nullopt,
                    double seconds = 0.02) {
  try {
    OpenOptions options;
    options.csv_fs = fs;
    auto src = open_record(path, options);
    Chunk chunk;
    while (src->next(chunk, seconds)) {
    }
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "no InputError for " << path;
  return InputError("", "", "", "");
}

TEST(Csv, HeaderNamesChannelsUnitsAndTheTimeColumnGivesTheRate) {
  const auto dir = bb::test::temp_dir("csv_ok");
  const auto path = write_text(dir, "r.csv",
                               "time_s,abp_mmHg,paw_cmH2O,flow_L/min\n"
                               "0,80.5,5,0\n0.008,81,6.5,30\n0.016,,7,30\n0.024,83,8,-1e1\n");
  auto src = open_record(path);
  const auto& ch = src->channels();
  ASSERT_EQ(ch.size(), 3u);
  EXPECT_EQ(ch[0].name, "abp");
  EXPECT_EQ(ch[0].unit, "mmHg");
  EXPECT_EQ(ch[0].role, Role::arterial_pressure);
  EXPECT_EQ(ch[2].name, "flow");
  EXPECT_EQ(ch[2].unit, "L/min");  // unit after the last underscore (our convention)
  EXPECT_EQ(ch[2].role, Role::flow);
  EXPECT_DOUBLE_EQ(ch[0].fs, 125.0);  // 1 / 0.008 s, the file's time step
  const auto all = read_all_csv(*src);
  ASSERT_EQ(all[0].size(), 4u);
  EXPECT_EQ(all[0][1], 81.0);
  EXPECT_TRUE(std::isnan(all[0][2]));  // empty cell: a missing sample (our convention)
  EXPECT_EQ(all[2][3], -10.0);
}

TEST(Csv, RateFromTheCommandLineWithoutTimeColumn) {
  const auto dir = bb::test::temp_dir("csv_fs");
  const auto path = write_text(dir, "r.csv", "abp_mmHg\r\n80\r\n81\r\n82\r\n");
  OpenOptions options;
  options.csv_fs = 100.0;
  auto src = open_record(path, options);
  EXPECT_DOUBLE_EQ(src->channels()[0].fs, 100.0);
  EXPECT_EQ(read_all_csv(*src)[0], (std::vector<double>{80, 81, 82}));
  EXPECT_EQ(error_of(path).field(), "--fs");  // no time column and no rate
}

TEST(Csv, EmptyFileIsAnError) {
  const auto dir = bb::test::temp_dir("csv_empty");
  const InputError e = error_of(write_text(dir, "e.csv", ""));
  EXPECT_NE(std::string(e.what()).find("empty"), std::string::npos) << e.what();
}

TEST(Csv, RaggedRowNamesLineAndColumn) {
  const auto dir = bb::test::temp_dir("csv_ragged");
  const InputError e = error_of(write_text(dir, "r.csv", "time_s,abp_mmHg\n0,80\n0.01,81,5\n"));
  ASSERT_TRUE(e.where().has_value());
  EXPECT_EQ(e.where()->line, 3);
  EXPECT_EQ(e.where()->column, 9);  // where the extra cell starts
  const InputError short_row = error_of(write_text(dir, "s.csv", "time_s,abp_mmHg\n0,80\n0.01\n"));
  EXPECT_EQ(short_row.where()->line, 3);
}

TEST(Csv, NanSampleIsAnError) {
  const auto dir = bb::test::temp_dir("csv_nan");
  const InputError e = error_of(write_text(dir, "n.csv", "time_s,abp_mmHg\n0,80\n0.01,NaN\n"));
  EXPECT_EQ(e.where()->line, 3);
  EXPECT_EQ(e.where()->column, 6);
  EXPECT_NE(std::string(e.what()).find("NaN"), std::string::npos) << e.what();
}

TEST(Csv, NonNumericCellIsAnError) {
  const auto dir = bb::test::temp_dir("csv_text");
  const InputError e = error_of(write_text(dir, "t.csv", "time_s,abp_mmHg\n0,80\n0.01,8O\n"));
  EXPECT_EQ(e.where()->line, 3);
  EXPECT_EQ(e.field(), "abp_mmHg");
}

TEST(Csv, NonMonotonicTimeIsAnError) {
  const auto dir = bb::test::temp_dir("csv_time");
  const InputError e =
      error_of(write_text(dir, "t.csv", "time_s,abp_mmHg\n0,80\n0.01,81\n0.02,82\n0.01,83\n"));
  EXPECT_EQ(e.where()->line, 5);
  EXPECT_NE(std::string(e.what()).find("does not increase"), std::string::npos) << e.what();
}

TEST(Csv, IrregularTimeStepIsAnError) {
  const auto dir = bb::test::temp_dir("csv_step");
  std::string text = "time_s,abp_mmHg\n";
  for (int i = 0; i < 50; ++i) text += std::to_string(i * 0.01) + ",80\n";
  text += "0.52,80\n";  // a missing row
  const InputError e = error_of(write_text(dir, "t.csv", text));
  EXPECT_EQ(e.where()->line, 52);
  EXPECT_NE(std::string(e.what()).find("irregular"), std::string::npos) << e.what();
}

// Rows at 125 Hz: time_s,abp_mmHg,paw_cmH2O with made-up values; `edit` may change a row's text.
std::string rows_125hz(int n, const std::function<void(int, std::string&)>& edit = {}) {
  std::string text = "time_s,abp_mmHg,paw_cmH2O\n";
  for (int i = 0; i < n; ++i) {
    char buf[96];
    std::snprintf(buf, sizeof buf, "%.3f,%.4f,%.2f", i / 125.0, 80 + 20 * std::sin(i * 0.05),
                  5 + (i % 300) * 0.05);
    std::string row = buf;
    if (edit) edit(i, row);
    text += row + "\n";
  }
  return text;
}

// 20 s chunks at 125 Hz: 2500 rows, parsed in two halves at once.
InputError error_in_big_chunks(const std::filesystem::path& path) {
  return error_of(path, std::nullopt, 20.0);
}

TEST(Csv, BigChunksParsedInTwoHalvesGiveTheSameSamples) {
  const auto dir = bb::test::temp_dir("csv_halves");
  const auto path = write_text(dir, "r.csv", rows_125hz(6000));
  auto small = open_record(path);
  const auto expected = read_all_csv(*small);  // 0.02 s chunks: parsed row by row in one thread
  auto big = open_record(path);
  std::vector<std::vector<double>> got(2);
  Chunk chunk;
  double start = 0;
  while (big->next(chunk, 20.0)) {
    EXPECT_DOUBLE_EQ(chunk.start_time, start);
    start += chunk.duration;
    for (std::size_t c = 0; c < 2; ++c)
      got[c].insert(got[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
  }
  EXPECT_EQ(got, expected);
  EXPECT_EQ(got[0].size(), 6000u);  // the rows written above
}

TEST(Csv, ErrorsInEitherHalfOfABigChunkNameTheirLine) {
  const auto dir = bb::test::temp_dir("csv_halves_errors");
  // A bad cell in the second half of the first 2500-row chunk (data row 2000 is file line 2002).
  InputError e = error_in_big_chunks(write_text(dir, "a.csv", rows_125hz(5000, [](int i, auto& r) {
                                                  if (i == 2000) r += "x";
                                                })));
  EXPECT_EQ(e.where()->line, 2002);
  EXPECT_EQ(e.field(), "paw_cmH2O");
  // Bad cells in both halves: the first one in the file is reported.
  e = error_in_big_chunks(write_text(dir, "b.csv", rows_125hz(5000, [](int i, auto& r) {
                                       if (i == 300) r = r.substr(0, r.find(',')) + ",8O,5";
                                       if (i == 2000) r += "x";
                                     })));
  EXPECT_EQ(e.where()->line, 302);  // data row 300 + header line + 1 (by construction)
  EXPECT_EQ(e.field(), "abp_mmHg");
  // A time step broken exactly where the halves meet (data rows 1249 | 1250).
  e = error_in_big_chunks(write_text(dir, "c.csv", rows_125hz(5000, [](int i, auto& r) {
                                       if (i == 1250) r.replace(0, r.find(','), "10.500");
                                     })));
  EXPECT_EQ(e.where()->line, 1252);
  EXPECT_NE(std::string(e.what()).find("irregular"), std::string::npos) << e.what();
}

TEST(Csv, HeaderStylesNameUnitInBracketsOrAfterTheLastUnderscore) {
  // The header styles of docs/waveform-formats.md (common practice, no source).
  const auto col = [](const std::string& cell) { return parse_csv_column(cell, "h.csv", 1); };
  EXPECT_EQ(col("ART (mmHg)").name, "ART");
  EXPECT_EQ(col("ART (mmHg)").unit, "mmHg");
  EXPECT_EQ(col("Paw [cmH2O]").name, "Paw");
  EXPECT_EQ(col("Paw [cmH2O]").unit, "cmH2O");
  EXPECT_EQ(col("Pressure airway (kPa)").name, "Pressure airway");
  EXPECT_EQ(col("Flow_in (L/s)").name, "Flow_in");  // brackets win over an underscore
  EXPECT_EQ(col("Flow_in (L/s)").unit, "L/s");
  EXPECT_EQ(col("flow_L/min").name, "flow");
  EXPECT_EQ(col("flow_L/min").unit, "L/min");
  EXPECT_EQ(col("ART_1").name, "ART_1");  // no letter after the underscore: not a unit
  EXPECT_EQ(col("ART_1").unit, "");
  EXPECT_EQ(col("Time").unit, "");
  for (const char* bad : {"ART (mmHg", "ART mmHg)", "(mmHg)", "ART []", ""}) {
    try {
      parse_csv_column(bad, "h.csv", 7, 3);
      ADD_FAILURE() << bad;
    } catch (const InputError& e) {
      EXPECT_EQ(e.field(), "header") << bad;
      ASSERT_TRUE(e.where());
      EXPECT_EQ(e.where()->line, 3);
      EXPECT_EQ(e.where()->column, 7);
    }
  }
}

TEST(Csv, HeaderCellWithoutUnitIsAChannelWithoutUnitAndItsPlace) {
  const auto dir = bb::test::temp_dir("csv_header");
  auto src = open_record(write_text(dir, "h.csv", "time_s,abp\n0,80\n0.01,81\n"));
  ASSERT_EQ(src->channels().size(), 1u);
  EXPECT_EQ(src->channels()[0].unit, "");
  ASSERT_TRUE(src->channels()[0].declared);  // where a unit error will point
  EXPECT_EQ(src->channels()[0].declared->line, 1);
  EXPECT_EQ(src->channels()[0].declared->column, 8);
}

// The record of rows_125hz in another dialect: separator `sep`, decimal commas
// when `comma`, and these header cells.
std::string dialect(const std::string& text, char sep, bool comma, const std::string& header) {
  std::string out = header + "\n";
  out.reserve(text.size() + header.size());
  for (std::size_t i = text.find('\n') + 1; i < text.size(); ++i) {
    const char c = text[i];
    out.push_back(c == ',' ? sep : (c == '.' && comma) ? ',' : c);
  }
  return out;
}

TEST(Csv, SemicolonsAndDecimalCommasAreDetectedAndReadAsTheSameSamples) {
  const auto dir = bb::test::temp_dir("csv_semicolon");
  const std::string text = rows_125hz(3000);
  auto plain = open_record(write_text(dir, "p.csv", text));
  const auto expected = read_all_csv(*plain);
  const auto path =
      write_text(dir, "m.csv", dialect(text, ';', true, "Time [s];ART (mmHg);Paw [cmH2O]"));
  for (double seconds : {0.02, 20.0}) {  // row by row, and big chunks parsed in two halves
    auto src = open_record(path);
    ASSERT_EQ(src->channels().size(), 2u);
    EXPECT_EQ(src->channels()[0].name, "ART");
    EXPECT_EQ(src->channels()[0].unit, "mmHg");
    EXPECT_EQ(src->channels()[0].role, Role::arterial_pressure);
    EXPECT_EQ(src->channels()[1].role, Role::airway_pressure);
    EXPECT_DOUBLE_EQ(src->channels()[0].fs, 125.0);  // rows 0.008 s apart
    std::vector<std::vector<double>> got(2);
    Chunk chunk;
    while (src->next(chunk, seconds))
      for (std::size_t c = 0; c < 2; ++c)
        got[c].insert(got[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    EXPECT_EQ(got, expected) << seconds;
  }
}

TEST(Csv, TabsWithBlanksAndQuotedHeaderCells) {
  const auto dir = bb::test::temp_dir("csv_tab");
  const std::string text = rows_125hz(200);
  auto plain = open_record(write_text(dir, "p.csv", text));
  const auto expected = read_all_csv(*plain);
  std::string tabbed = dialect(text, '\t', false, "\"Time (s)\"\t\"ABP (mmHg)\"\t\"Paw (cmH2O)\"");
  auto src = open_record(write_text(dir, "t.csv", tabbed));
  EXPECT_EQ(src->channels()[0].name, "ABP");
  EXPECT_EQ(read_all_csv(*src), expected);
  // Blanks around a cell are not the separator.
  auto spaced = open_record(
      write_text(dir, "s.csv", "Time [s]\tART [mmHg]\n0\t 80 \n0.01\t81 \n0.02\t 82\n"));
  EXPECT_EQ(read_all_csv(*spaced)[0], (std::vector<double>{80, 81, 82}));
}

TEST(Csv, AColumnInAUnitOfTimeIsTheTimeColumnWhateverItsLabel) {
  // A header in another language ("Zeit" for time): no signal is measured in seconds, so a
  // column in s, ms or min is the time column (common practice, no source).
  const auto dir = bb::test::temp_dir("csv_time_unit");
  auto src = open_record(write_text(dir, "z.csv", "Zeit [s];ART (mmHg)\n0;80\n0,01;81\n0,02;82\n"));
  ASSERT_EQ(src->channels().size(), 1u);
  EXPECT_EQ(src->channels()[0].name, "ART");
  EXPECT_NEAR(src->channels()[0].fs, 100.0, 1e-9);
  auto ms = open_record(write_text(dir, "m.csv", "Zeit_ms,ART_mmHg\n0,80\n8,81\n16,82\n"));
  EXPECT_NEAR(ms->channels()[0].fs, 125.0, 1e-9);
  // Without one, the error lists the columns.
  const InputError e = error_of(write_text(dir, "n.csv", "Zeit;ART (mmHg)\n0;80\n1;81\n"));
  EXPECT_NE(std::string(e.what()).find("Zeit, ART (mmHg)"), std::string::npos) << e.what();
}

TEST(Csv, TrailingSeparatorOnEveryRowIsAnEmptyLastColumn) {
  const auto dir = bb::test::temp_dir("csv_trailing");
  auto src =
      open_record(write_text(dir, "t.csv", "Time [s];ART (mmHg);\n0;80,5;\n0,01;81;\n0,02;82; \n"));
  ASSERT_EQ(src->channels().size(), 1u);
  EXPECT_EQ(read_all_csv(*src)[0], (std::vector<double>{80.5, 81, 82}));
  // A value there is refused, at its place.
  const InputError e =
      error_of(write_text(dir, "v.csv", "Time [s];ART (mmHg);\n0;80;\n0,01;81;7\n"));
  ASSERT_TRUE(e.where());
  EXPECT_EQ(e.where()->line, 3);
  EXPECT_EQ(e.where()->column, 9);
  // An empty header cell anywhere else is a column without a name.
  const InputError m = error_of(write_text(dir, "m.csv", "Time [s];;ART (mmHg)\n0;1;80\n"));
  EXPECT_EQ(m.field(), "header");
  EXPECT_EQ(m.where()->column, 10);
}

TEST(Csv, DialectCanBeForced) {
  const auto dir = bb::test::temp_dir("csv_forced");
  // One column: no separator in the header to detect; decimal commas.
  const auto path = write_text(dir, "one.csv", "ART (mmHg)\n80,5\n81,25\n");
  OpenOptions o;
  o.csv_fs = 100.0;
  o.csv_delimiter = ';';
  o.csv_decimal = ',';
  auto src = open_record(path, o);
  EXPECT_EQ(read_all_csv(*src)[0], (std::vector<double>{80.5, 81.25}));
  // Semicolons with decimal points only after the first rows looked at: forced.
  o = OpenOptions{};
  o.csv_decimal = '.';
  auto points =
      open_record(write_text(dir, "p.csv", "Time [s];ART (mmHg)\n0;80\n0.5;81\n1;82\n"), o);
  EXPECT_EQ(read_all_csv(*points)[0], (std::vector<double>{80, 81, 82}));
}

TEST(Csv, StrayDecimalMarkIsAnErrorNotAThousandsSeparator) {
  const auto dir = bb::test::temp_dir("csv_stray");
  // Decimal commas detected from the first rows; "1.234" later is refused, not read as 1.234 or
  // 1234.
  std::string text = "Time [s];ART (mmHg)\n";
  for (int i = 0; i < 1500; ++i) text += std::to_string(i) + ",5;80,5\n";
  text += "1500,5;1.234\n";
  const InputError e = error_of(write_text(dir, "s.csv", text));
  ASSERT_TRUE(e.where());
  EXPECT_EQ(e.where()->line, 1502);
  EXPECT_EQ(e.value(), "1.234");  // as in the file
  EXPECT_NE(std::string(e.what()).find("--decimal point"), std::string::npos) << e.what();
}

TEST(Csv, CommaSeparatorWithDecimalCommasIsRefusedAsAmbiguous) {
  const auto dir = bb::test::temp_dir("csv_ambiguous");
  const InputError e =
      error_of(write_text(dir, "a.csv", "Time [s],ART (mmHg)\n0,000,80,5\n0,008,81,0\n"));
  EXPECT_EQ(e.field(), "--delimiter");
  ASSERT_TRUE(e.where());
  EXPECT_EQ(e.where()->line, 2);
  EXPECT_NE(std::string(e.what()).find("ambiguous"), std::string::npos) << e.what();
  EXPECT_NE(std::string(e.what()).find("--decimal comma"), std::string::npos) << e.what();
  OpenOptions o;
  o.csv_decimal = ',';  // asked for, with a comma separator detected
  try {
    open_record(write_text(dir, "b.csv", "Time [s],ART (mmHg)\n0,80\n0.008,81\n"), o);
    ADD_FAILURE();
  } catch (const InputError& b) {
    EXPECT_EQ(b.field(), "--decimal");
    EXPECT_NE(std::string(b.what()).find("--delimiter semicolon"), std::string::npos) << b.what();
  }
  // Tabs and semicolons both in the header.
  const InputError both = error_of(write_text(dir, "c.csv", "Time [s];ART\t(mmHg)\n0;80\n"));
  EXPECT_EQ(both.field(), "--delimiter");
}

// Rows of clock times from `start` (seconds after midnight), 125 Hz, written
// to the millisecond as monitors do.
std::string clock_rows(int n, double start, const std::string& header) {
  std::string text = header + "\n";
  for (int i = 0; i < n; ++i) {
    const long ms = std::lround((start + i / 125.0) * 1000.0) % 86400000L;
    char buf[96];
    std::snprintf(buf, sizeof buf, "%02ld:%02ld:%02ld.%03ld;%.4f\n", ms / 3600000, ms / 60000 % 60,
                  ms / 1000 % 60, ms % 1000, 80 + 20 * std::sin(i * 0.05));
    text += buf;
  }
  return text;
}

TEST(Csv, ClockTimeColumnGivesTheRateAndTimesFromTheFirstRow) {
  const auto dir = bb::test::temp_dir("csv_clock");
  auto src =
      open_record(write_text(dir, "c.csv", clock_rows(2000, 12 * 3600.0, "Time;ART (mmHg)")));
  ASSERT_EQ(src->channels().size(), 1u);
  EXPECT_DOUBLE_EQ(src->channels()[0].fs, 125.0);  // 8 ms steps
  Chunk chunk;
  ASSERT_TRUE(src->next(chunk, 1.0));
  EXPECT_DOUBLE_EQ(chunk.start_time, 0.0);  // the first row is time 0, not 12:00
  EXPECT_EQ(chunk.samples[0].size(), 125u);
  // `hh:mm:ss` as the unit says clock times too.
  auto unit =
      open_record(write_text(dir, "u.csv", clock_rows(10, 3600.0, "Clock [hh:mm:ss];ABP (mmHg)")));
  EXPECT_DOUBLE_EQ(unit->channels()[0].fs, 125.0);
}

TEST(Csv, ClockTimeCrossingMidnightInEitherHalfOfABigChunk) {
  const auto dir = bb::test::temp_dir("csv_midnight");
  // 20 s chunks are 2500 rows, parsed in halves of 1250: midnight in the first
  // half of the first chunk, in the second half, and on a chunk boundary.
  for (double before : {4.0, 15.0, 20.0}) {
    const std::string text = clock_rows(7000, 86400.0 - before, "Time;ART (mmHg)");
    const auto path = write_text(dir, "m.csv", text);
    for (double seconds : {0.02, 20.0}) {
      auto src = open_record(path);
      EXPECT_DOUBLE_EQ(src->channels()[0].fs, 125.0) << before;
      std::size_t n = 0;
      Chunk chunk;
      while (src->next(chunk, seconds)) n += chunk.samples[0].size();
      EXPECT_EQ(n, 7000u) << before << " s before midnight, chunks of " << seconds;
    }
  }
  // A clock that goes back a little is not a midnight: time does not increase.
  std::string back = clock_rows(50, 3600.0, "Time;ART (mmHg)");
  back += "01:00:00.100;80\n";
  const InputError e = error_of(write_text(dir, "b.csv", back));
  EXPECT_EQ(e.where()->line, 52);
  EXPECT_NE(std::string(e.what()).find("does not increase"), std::string::npos) << e.what();
}

TEST(Csv, TimeInMillisecondsAndNumbersInAClockColumnAreReadOrRefused) {
  const auto dir = bb::test::temp_dir("csv_ms");
  auto ms = open_record(write_text(dir, "ms.csv", "Time [ms];ART (mmHg)\n0;80\n8;81\n16;82\n"));
  EXPECT_DOUBLE_EQ(ms->channels()[0].fs, 125.0);
  // A time column without a unit holds clock times; seconds there need the unit.
  const InputError e = error_of(write_text(dir, "n.csv", "Time;ART (mmHg)\n0;80\n0.008;81\n"));
  EXPECT_EQ(e.field(), "Time");
  EXPECT_NE(std::string(e.what()).find("Time [s]"), std::string::npos) << e.what();
  // "T (degC)" is not a time column: a unit not of time makes it a channel.
  auto t =
      open_record(write_text(dir, "t.csv", "Time [s];T (degC);ART (mmHg)\n0;37;80\n0.01;37;81\n"));
  EXPECT_EQ(t->channels().size(), 2u);
}

}  // namespace
}  // namespace bb::wave
