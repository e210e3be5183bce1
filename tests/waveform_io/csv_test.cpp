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

std::vector<std::vector<double>> read_all(SignalSource& src) {
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
  const auto all = read_all(*src);
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
  EXPECT_EQ(read_all(*src)[0], (std::vector<double>{80, 81, 82}));
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
  const auto expected = read_all(*small);  // 0.02 s chunks: parsed row by row in one thread
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

TEST(Csv, HeaderCellWithoutUnitIsAnError) {
  const auto dir = bb::test::temp_dir("csv_header");
  const InputError e = error_of(write_text(dir, "h.csv", "time_s,abp\n0,80\n"));
  EXPECT_EQ(e.field(), "header");
  EXPECT_EQ(e.where()->column, 8);
}

}  // namespace
}  // namespace bb::wave
