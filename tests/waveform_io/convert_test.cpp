// `breathbeat wave convert`: a stretch of a record written in another format,
// through the command line, checked against the original record read by the
// library. CSV is exact (shortest round-trip decimal); WFDB 16 is within half
// its quantum, range / 65534 (header(5), signal(5) of the WFDB Programmer's
// Guide: physical = (adc - baseline) / gain); EDF within half of range / 65535
// (Kemp et al., Electroencephalogr Clin Neurophysiol 1992;82:391). Lower-rate
// channels in CSV are held for each sample of the fastest one, as WFDB's
// high-resolution reading repeats them (WFDB Programmer's Guide, setgvmode:
// common practice, no source for the exact wording).
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>

#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/writers.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

namespace fs = std::filesystem;
using Samples = std::vector<std::vector<double>>;

Samples read_all(SignalSource& src) {
  Samples all(src.channels().size());
  Chunk chunk;
  while (src.next(chunk, 4.0)) {
    for (std::size_t c = 0; c < all.size(); ++c)
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
  }
  return all;
}

Samples read_file(const fs::path& p) {
  auto src = open_record(p);
  return read_all(*src);
}

// Samples [first, first + count) of each channel.
Samples slice(const Samples& s, std::size_t first, std::size_t count) {
  Samples out;
  for (const auto& ch : s) out.emplace_back(ch.begin() + first, ch.begin() + first + count);
  return out;
}

std::string synth_record(const std::string& dir) {
  const std::string rec = dir + "/rec.hea";
  const auto r = test::run_cli({"wave", "synth", "-o", rec, "--duration", "60s", "--gaps", "1",
                                "--noise", "2%", "--seed", "11"});
  EXPECT_EQ(r.exit_code, 0) << r.err;
  return rec;
}

std::string file_bytes(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

TEST(WaveConvert, CsvStretchIsExactlyTheRecordsSamples) {
  const std::string dir = test::temp_dir("convert_csv");
  const std::string rec = synth_record(dir);
  const auto r = test::run_cli(
      {"wave", "convert", rec, "-o", dir + "/part.csv", "--from", "10s", "--to", "20s"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const Samples want = slice(read_file(rec), 10 * 125, 10 * 125);  // 125 samples/s (synth default)
  const Samples got = read_file(dir + "/part.csv");
  ASSERT_EQ(got.size(), want.size());
  for (std::size_t c = 0; c < want.size(); ++c) {
    ASSERT_EQ(got[c].size(), want[c].size());
    for (std::size_t i = 0; i < want[c].size(); ++i) {
      if (std::isnan(want[c][i]))
        EXPECT_TRUE(std::isnan(got[c][i]));
      else
        ASSERT_EQ(got[c][i], want[c][i]) << c << " " << i;
    }
  }
  std::ifstream csv(dir + "/part.csv");
  std::string header, first;
  std::getline(csv, header);
  std::getline(csv, first);
  EXPECT_EQ(header.rfind("time_s,", 0), 0u) << header;  // the time column first
  EXPECT_EQ(first.rfind("0,", 0), 0u) << "time 0 is the stretch's start: " << first;
}

TEST(WaveConvert, ChannelsAreKeptInRecordOrder) {
  const std::string dir = test::temp_dir("convert_channels");
  const std::string rec = synth_record(dir);
  const auto r = test::run_cli(
      {"wave", "convert", rec, "-o", dir + "/two.csv", "--channels", "Flow,ABP", "--to", "5s"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  auto src = open_record(dir + "/two.csv");
  ASSERT_EQ(src->channels().size(), 2u);
  EXPECT_EQ(src->channels()[0].name, "ABP");
  EXPECT_EQ(src->channels()[1].name, "Flow");
}

TEST(WaveConvert, WfdbAndEdfStretchesWithinTheirQuantum) {
  const std::string dir = test::temp_dir("convert_formats");
  const std::string rec = synth_record(dir);
  const Samples want = slice(read_file(rec), 30 * 125, 20 * 125);
  for (const std::string out : {"part.hea", "part.edf"}) {
    const auto r = test::run_cli(
        {"wave", "convert", rec, "-o", dir + "/" + out, "--from", "30s", "--to", "50s"});
    ASSERT_EQ(r.exit_code, 0) << out << ": " << r.err;
    auto src = open_record(dir + "/" + out);
    const Samples got = read_all(*src);
    ASSERT_EQ(got.size(), want.size());
    const bool edf = out.ends_with(".edf");
    for (std::size_t c = 0; c < want.size(); ++c) {
      const ChannelRange range = default_range(src->channels()[c]);
      const double quantum = (range.max - range.min) / (edf ? 65535.0 : 65534.0);
      ASSERT_EQ(got[c].size(), want[c].size()) << out;
      for (std::size_t i = 0; i < want[c].size(); ++i) {
        if (std::isnan(want[c][i])) continue;  // EDF has no missing-sample code
        // Twice half a quantum: the record itself was quantised once by its own writer.
        ASSERT_NEAR(got[c][i], want[c][i], quantum * (1 + 1e-9)) << out << " " << c << " " << i;
      }
    }
  }
}

TEST(WaveConvert, SharedRecordLowerRatesRepeatedInCsv) {
  const fs::path rec = fs::path(test::shared_data_dir()) / "mimicdb" / "03700181.hea";
  if (!fs::exists(rec)) GTEST_SKIP() << "shared records not found at " << rec;
  const std::string dir = test::temp_dir("convert_shared");
  const auto r = test::run_cli(
      {"wave", "convert", rec.string(), "-o", dir + "/real.csv", "--from", "100s", "--to", "104s"});
  ASSERT_EQ(r.exit_code, 0) << r.err;
  // Moody & Mark, Computers in Cardiology 1996 (MIMIC): MCL1 at 500 Hz, ABP and RESP at 125 Hz.
  auto original = open_record(rec);
  ASSERT_EQ(original->channels()[0].fs, 500.0);
  ASSERT_EQ(original->channels()[1].fs, 125.0);
  original->seek(100.0);
  Samples want(3);
  Chunk chunk;
  while (want[1].size() < 4 * 125 && original->next(chunk, 1.0)) {
    for (std::size_t c = 0; c < 3; ++c)
      want[c].insert(want[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
  }
  const Samples got = read_file(dir + "/real.csv");
  ASSERT_EQ(got.size(), 3u);
  ASSERT_EQ(got[0].size(), 4u * 500);
  for (std::size_t i = 0; i < got[0].size(); ++i) {
    ASSERT_EQ(got[0][i], want[0][i]) << "ECG sample " << i;
    ASSERT_EQ(got[1][i], want[1][i / 4]) << "ABP held for 4 ECG samples, at " << i;
    ASSERT_EQ(got[2][i], want[2][i / 4]) << "RESP held for 4 ECG samples, at " << i;
  }
}

TEST(WaveConvert, BadStretchOrChannelIsRefusedAndNothingWritten) {
  const std::string dir = test::temp_dir("convert_bad");
  const std::string rec = synth_record(dir);
  const std::string hea = file_bytes(rec);
  struct Case {
    std::vector<std::string> args;
    std::string words;
  };
  const std::vector<Case> cases = {
      {{"--from", "2min"}, "--from"},
      {{"--to", "70s"}, "--to"},
      {{"--from", "20s", "--to", "10s"}, "--to"},
      {{"--channels", "ABP,Pleth"}, "ABP, Paw, Flow"},  // lists the record's channels
      {{"--format", "mp3"}, "--format"},
  };
  for (const Case& c : cases) {
    std::vector<std::string> args = {"wave", "convert", rec, "-o", dir + "/out.csv"};
    args.insert(args.end(), c.args.begin(), c.args.end());
    const auto r = test::run_cli(args);
    EXPECT_EQ(r.exit_code, 2) << c.words;
    EXPECT_TRUE(r.out.empty()) << r.out;
    EXPECT_NE(r.err.find(c.words), std::string::npos) << r.err;
    EXPECT_FALSE(fs::exists(dir + "/out.csv")) << c.words;
  }
  // Onto its own input: refused, the record untouched.
  const auto self = test::run_cli({"wave", "convert", rec, "-o", rec, "--force"});
  EXPECT_EQ(self.exit_code, 2);
  EXPECT_EQ(file_bytes(rec), hea);
}

}  // namespace
}  // namespace bb::wave
