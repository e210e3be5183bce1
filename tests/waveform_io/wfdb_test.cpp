// WFDB reader on the real MIMIC records (Moody GB, Mark RG. Computers in
// Cardiology 1996;23:657-660), read in place from ../shared/data/mimicdb/.
// Expected layout values come from the records' own headers, whose fields are
// defined by the WFDB header(5) specification (PhysioNet): per-signal initial
// value (first sample) and 16-bit checksum (sum of all samples).
#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <filesystem>
#include <fstream>

#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/wfdb.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

std::filesystem::path mimic_dir() {
  return std::filesystem::path(bb::test::shared_data_dir()) / "mimicdb";
}

#define REQUIRE_MIMIC()                                                                       \
  if (!std::filesystem::exists(mimic_dir() / "03700181.hea")) {                               \
    GTEST_SKIP() << "MIMIC records not found in " << mimic_dir() << " (shared data missing)"; \
  }

// Every sample of every channel, read through chunks of `seconds`.
std::vector<std::vector<double>> read_all_wfdb(SignalSource& src, double seconds) {
  std::vector<std::vector<double>> all(src.channels().size());
  Chunk chunk;
  double expected_start = 0.0;
  while (src.next(chunk, seconds)) {
    EXPECT_NEAR(chunk.start_time, expected_start, 1e-9);
    expected_start += chunk.duration;
    for (std::size_t c = 0; c < all.size(); ++c) {
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    }
  }
  return all;
}

// The ADC values back from physical ones: adc = x * gain + baseline (header(5));
// NaN was the invalid sample, -2048 in format 212 (signal(5)).
std::int64_t adc_of(double x, const WfdbSignalSpec& s) {
  if (std::isnan(x)) return wfdb_invalid_sample(s.format);
  return std::llround(x * s.gain + s.baseline);
}

// header(5): the checksum is the 16-bit (two's complement) sum of all samples.
int checksum16(const std::vector<double>& xs, const WfdbSignalSpec& s) {
  std::int64_t sum = 0;
  for (double x : xs) sum += adc_of(x, s);
  return static_cast<std::int16_t>(static_cast<std::uint16_t>(sum & 0xFFFF));
}

TEST(Wfdb, HeaderOf03700181) {
  REQUIRE_MIMIC();
  const WfdbHeader h = read_wfdb_header(mimic_dir() / "03700181.hea");
  EXPECT_EQ(h.signal_count, 3);              // MIMIC README / header record line
  EXPECT_DOUBLE_EQ(h.frame_frequency, 125);  // header record line
  ASSERT_TRUE(h.frames.has_value());
  EXPECT_EQ(*h.frames, 75000);  // header record line: 600 s at 125 Hz (MIMIC README)
  EXPECT_EQ(h.base_time, "17:27:45");
  EXPECT_EQ(h.base_date, "15/08/1994");
  ASSERT_EQ(h.signals.size(), 3u);
  EXPECT_EQ(h.signals[0].samples_per_frame, 4);  // "212x4" (header(5) xN notation)
  EXPECT_DOUBLE_EQ(h.signals[0].gain, 2963.77);  // "2963.77/mV"
  EXPECT_EQ(h.signals[0].units, "mV");
  EXPECT_EQ(h.signals[1].baseline, -1605);  // "12.84(-1605)/mmHg"
  EXPECT_DOUBLE_EQ(h.signals[1].gain, 12.84);
  EXPECT_EQ(h.signals[1].units, "mmHg");
  EXPECT_EQ(h.signals[2].skew, 4);            // "212:4" (header(5) :skew notation)
  EXPECT_DOUBLE_EQ(h.signals[2].gain, 2000);  // "2000", no units: mV (header(5) default)
  EXPECT_EQ(h.signals[2].units, "mV");
  EXPECT_EQ(h.signals[2].baseline, 0);  // no baseline: ADC zero, 0 (header(5) default)
  EXPECT_EQ(h.signals[1].adc_resolution, 12);
  EXPECT_EQ(h.signals[1].initial_value, -943);
  EXPECT_EQ(h.signals[1].checksum, -23651);
  EXPECT_EQ(h.signals[1].description, "ABP");
}

TEST(Wfdb, Record03700181ChannelsAndLength) {
  REQUIRE_MIMIC();
  auto src = open_record(mimic_dir() / "03700181.hea");
  const auto& ch = src->channels();
  ASSERT_EQ(ch.size(), 3u);  // MIMIC README: MCL1, ABP, RESP
  EXPECT_EQ(ch[0].name, "MCL1");
  EXPECT_DOUBLE_EQ(ch[0].fs, 500);  // MIMIC README: ECG 500 Hz (125 Hz x 4 samples/frame)
  EXPECT_EQ(ch[0].role, Role::ecg);
  EXPECT_EQ(ch[1].name, "ABP");
  EXPECT_EQ(ch[1].unit, "mmHg");
  EXPECT_DOUBLE_EQ(ch[1].fs, 125);  // MIMIC README: ABP 125 Hz
  EXPECT_EQ(ch[1].role, Role::arterial_pressure);
  EXPECT_EQ(ch[2].name, "RESP");
  EXPECT_DOUBLE_EQ(ch[2].fs, 125);  // MIMIC README
  EXPECT_EQ(ch[2].role, Role::respiration);
  ASSERT_TRUE(src->duration().has_value());
  EXPECT_DOUBLE_EQ(*src->duration(), 600.0);  // MIMIC README: 600 s

  const auto all = read_all_wfdb(*src, 7.3);
  EXPECT_EQ(all[0].size(), 300000u);  // 600 s x 500 Hz (MIMIC README)
  EXPECT_EQ(all[1].size(), 75000u);   // 600 s x 125 Hz (MIMIC README)
  EXPECT_EQ(all[2].size(), 75000u);
}

TEST(Wfdb, Record03700181SamplesMatchHeaderChecksums) {
  REQUIRE_MIMIC();
  const WfdbHeader h = read_wfdb_header(mimic_dir() / "03700181.hea");
  auto src = open_wfdb(mimic_dir() / "03700181.hea", WfdbOptions{.apply_skew = false});
  const auto all = read_all_wfdb(*src, 10.0);
  for (std::size_t s = 0; s < 3; ++s) {
    SCOPED_TRACE(h.signals[s].description);
    // header(5) initial value and checksum fields, as written in 03700181.hea
    EXPECT_EQ(adc_of(all[s].front(), h.signals[s]), h.signals[s].initial_value);
    EXPECT_EQ(checksum16(all[s], h.signals[s]), h.signals[s].checksum);
  }
  // First ABP sample: (-943 - (-1605)) / 12.84 mmHg (header(5) conversion rule)
  EXPECT_NEAR(all[1].front(), (-943.0 + 1605.0) / 12.84, 1e-12);
}

TEST(Wfdb, WholeRecordsAreCheckedAgainstTheHeaderChecksums) {
  // header(5): the checksum field is the 16-bit sum of the signal's samples. The real
  // record's checksums match (no note); one changed sample in a copy of its .dat is reported.
  REQUIRE_MIMIC();
  auto intact = open_record(mimic_dir() / "03700181.hea");
  read_all_wfdb(*intact, 10.0);
  EXPECT_TRUE(intact->notes().empty());

  const auto dir = std::filesystem::path(bb::test::temp_dir("wfdb_checksum"));
  std::filesystem::copy_file(mimic_dir() / "03700181.hea", dir / "03700181.hea");
  std::filesystem::copy_file(mimic_dir() / "03700181.dat", dir / "03700181.dat");
  {
    std::fstream dat(dir / "03700181.dat", std::ios::in | std::ios::out | std::ios::binary);
    dat.seekp(30000);  // a byte well inside the file
    char b = 0;
    dat.read(&b, 1);
    dat.seekp(30000);
    b = static_cast<char>(b ^ 0x01);
    dat.write(&b, 1);
  }
  auto damaged = open_record(dir / "03700181.hea");
  read_all_wfdb(*damaged, 10.0);
  ASSERT_EQ(damaged->notes().size(), 1u);
  EXPECT_NE(damaged->notes()[0].find("checksum"), std::string::npos) << damaged->notes()[0];
  EXPECT_NE(damaged->notes()[0].find("03700181.dat"), std::string::npos);

  // Read from the middle (seek) or only in part: nothing to check, nothing said.
  auto part = open_record(dir / "03700181.hea");
  part->seek(100);
  Chunk chunk;
  while (part->next(chunk, 10.0)) {
  }
  EXPECT_TRUE(part->notes().empty());
  auto start = open_record(dir / "03700181.hea");
  start->next(chunk, 10.0);
  EXPECT_TRUE(start->notes().empty());
}

TEST(Wfdb, SkewShiftsTheRespirationChannelByFourFrames) {
  REQUIRE_MIMIC();
  auto raw = open_wfdb(mimic_dir() / "03700181.hea", WfdbOptions{.apply_skew = false});
  auto skewed = open_record(mimic_dir() / "03700181.hea");
  const auto a = read_all_wfdb(*raw, 3.0);
  const auto b = read_all_wfdb(*skewed, 11.0);
  // header(5): skew 4 -> the signal's sample for frame k is stored in frame k + 4
  for (std::size_t k = 0; k + 4 < a[2].size(); ++k) ASSERT_EQ(b[2][k], a[2][k + 4]) << k;
  for (std::size_t k = a[2].size() - 4; k < a[2].size(); ++k) EXPECT_TRUE(std::isnan(b[2][k]));
  EXPECT_EQ(a[1], b[1]);  // unskewed signals unchanged
}

TEST(Wfdb, Record03700181AbpIsPhysiologicallyPlausible) {
  REQUIRE_MIMIC();
  auto src = open_record(mimic_dir() / "03700181.hea");
  const auto all = read_all_wfdb(*src, 30.0);
  double lo = 1e9, hi = -1e9, sum = 0.0;
  for (double x : all[1]) {
    ASSERT_FALSE(std::isnan(x));
    lo = std::min(lo, x);
    hi = std::max(hi, x);
    sum += x;
  }
  const double mean = sum / static_cast<double>(all[1].size());
  // MIMIC README: ABP roughly 28/45 mmHg on this record; bounds 10-300 mmHg are
  // common practice, no source (a pressure a monitor can show).
  EXPECT_GT(lo, 10.0);
  EXPECT_LT(hi, 300.0);
  EXPECT_GT(mean, 25.0);  // MIMIC README: diastolic about 28 mmHg
  EXPECT_LT(mean, 50.0);  // MIMIC README: systolic about 45 mmHg
}

TEST(Wfdb, SeekLandsOnTheRightFrame) {
  REQUIRE_MIMIC();
  auto whole = open_record(mimic_dir() / "03700181.hea");
  const auto all = read_all_wfdb(*whole, 60.0);
  auto src = open_record(mimic_dir() / "03700181.hea");
  src->seek(123.0);
  Chunk chunk;
  ASSERT_TRUE(src->next(chunk, 1.0));
  EXPECT_DOUBLE_EQ(chunk.start_time, 123.0);
  ASSERT_EQ(chunk.samples[0].size(), 500u);  // 1 s at 500 Hz
  for (std::size_t c = 0; c < 3; ++c) {
    const std::size_t per_second = c == 0 ? 500 : 125;
    for (std::size_t k = 0; k < chunk.samples[c].size(); ++k) {
      const double want = all[c][123 * per_second + k];
      if (std::isnan(want)) {
        EXPECT_TRUE(std::isnan(chunk.samples[c][k]));
      } else {
        ASSERT_EQ(chunk.samples[c][k], want);
      }
    }
  }
}

TEST(Wfdb, MultiSegment041sReadsAsTwoTimesThousandFrames) {
  REQUIRE_MIMIC();
  auto src = open_record(mimic_dir() / "041s.hea");
  const auto& ch = src->channels();
  ASSERT_EQ(ch.size(), 7u);  // MIMIC README: III, I, V, ABP, PAP, PLETH, RESP
  EXPECT_EQ(ch[3].name, "ABP");
  EXPECT_EQ(ch[4].name, "PAP");
  EXPECT_EQ(ch[4].role, Role::other);        // pulmonary artery pressure is not arterial
  EXPECT_DOUBLE_EQ(ch[0].fs, 500);           // MIMIC README: ECG 500 Hz
  EXPECT_DOUBLE_EQ(ch[3].fs, 125);           // MIMIC README: ABP 125 Hz
  EXPECT_DOUBLE_EQ(*src->duration(), 16.0);  // MIMIC README: 2 x 8 s
  const auto all = read_all_wfdb(*src, 3.0);
  EXPECT_EQ(all[3].size(), 2000u);  // 2 x 1000 frames (041s.hea segment lines)
  EXPECT_EQ(all[0].size(), 8000u);  // 2000 frames x 4 samples per frame

  // Each segment's samples against its own header's initial values and checksums.
  for (int seg = 0; seg < 2; ++seg) {
    const WfdbHeader h = read_wfdb_header(mimic_dir() / (seg == 0 ? "041s01.hea" : "041s02.hea"));
    for (std::size_t s = 0; s < 7; ++s) {
      SCOPED_TRACE(h.signals[s].description + " segment " + std::to_string(seg + 1));
      const std::size_t n = all[s].size() / 2;
      const std::vector<double> part(all[s].begin() + static_cast<long>(seg * n),
                                     all[s].begin() + static_cast<long>((seg + 1) * n));
      EXPECT_EQ(adc_of(part.front(), h.signals[s]), h.signals[s].initial_value);  // header(5)
      EXPECT_EQ(checksum16(part, h.signals[s]), h.signals[s].checksum);           // header(5)
    }
  }
}

}  // namespace
}  // namespace bb::wave
