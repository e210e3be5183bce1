// Round trips: a synthetic record written as CSV, EDF+ (EDFlib) and WFDB and
// read back. Tolerances are each format's quantum, from the writer's range:
// CSV exact (shortest round-trip decimal); WFDB 16: range / 65534 and 212:
// range / 4094 (header(5): physical = (adc - baseline) / gain, so the error
// is at most half a quantum); EDF: range / 65535 (Kemp et al. 1992: 16-bit
// samples scaled linearly between physical and digital extremes).
#include <gtest/gtest.h>

#include <cmath>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/synth.hpp"
#include "breathbeat/waveform/writers.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

using Samples = std::vector<std::vector<double>>;

Samples read_all_roundtrip(SignalSource& src, double seconds = 4.0) {
  Samples all(src.channels().size());
  Chunk chunk;
  while (src.next(chunk, seconds)) {
    for (std::size_t c = 0; c < all.size(); ++c) {
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    }
  }
  return all;
}

SynthParams record_params(bool with_gaps) {
  SynthParams p;
  p.duration = seconds(60);
  p.fs = 125;
  p.noise = fraction(0.02);
  p.drift = mmHg(3);
  p.ectopy = fraction(0.05);
  p.gaps = with_gaps ? 2 : 0;
  p.volume_channel = true;
  return p;
}

Samples synth_samples(const SynthParams& p) {
  SyntheticRecord rec(p);
  return read_all_roundtrip(rec);
}

// Same NaNs, and finite samples within `quantum(c) / 2` (+ rounding).
void expect_close(const Samples& got, const Samples& want, const std::vector<double>& quantum) {
  ASSERT_EQ(got.size(), want.size());
  for (std::size_t c = 0; c < want.size(); ++c) {
    ASSERT_EQ(got[c].size(), want[c].size()) << "channel " << c;
    for (std::size_t i = 0; i < want[c].size(); ++i) {
      if (std::isnan(want[c][i])) {
        ASSERT_TRUE(std::isnan(got[c][i])) << c << " " << i;
        continue;
      }
      ASSERT_NEAR(got[c][i], want[c][i], quantum[c] / 2 * (1 + 1e-9) + 1e-12) << c << " " << i;
    }
  }
}

std::vector<double> quanta(const SignalSource& src, double levels) {
  std::vector<double> out;
  for (const auto& c : src.channels()) {
    const ChannelRange r = default_range(c);
    out.push_back((r.max - r.min) / levels);
  }
  return out;
}

bool only(const std::filesystem::path& dir, std::vector<std::string> names) {
  std::vector<std::string> found;
  for (const auto& e : std::filesystem::directory_iterator(dir))
    found.push_back(e.path().filename().string());
  std::sort(found.begin(), found.end());
  std::sort(names.begin(), names.end());
  return found == names;
}

TEST(RoundTrip, CsvIsExact) {
  const SynthParams p = record_params(true);
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_csv"));
  SyntheticRecord rec(p);
  const WriteSummary s = write_csv(rec, dir / "r.csv");
  EXPECT_EQ(s.frames, 7500);  // 60 s x 125 Hz (synthetic truth)
  EXPECT_TRUE(only(dir, {"r.csv"}));
  auto back = open_record(dir / "r.csv");
  EXPECT_DOUBLE_EQ(back->channels()[0].fs, 125.0);
  EXPECT_EQ(back->channels()[2].unit, "L/min");
  expect_close(read_all_roundtrip(*back), synth_samples(p), std::vector<double>(4, 0.0));  // exact
}

TEST(RoundTrip, WfdbFormat16WithinHalfAQuantum) {
  const SynthParams p = record_params(true);
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_wfdb16"));
  SyntheticRecord rec(p);
  write_wfdb(rec, dir / "r.hea");
  EXPECT_TRUE(only(dir, {"r.hea", "r.dat"}));
  auto back = open_record(dir / "r.hea");
  EXPECT_EQ(back->channels()[1].name, "Paw");
  EXPECT_EQ(back->channels()[1].unit, "cmH2O");
  expect_close(read_all_roundtrip(*back, 3.3), synth_samples(p), quanta(*back, 65534));
}

TEST(RoundTrip, WfdbFormat212WithinHalfAQuantum) {
  const SynthParams p = record_params(true);
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_wfdb212"));
  SyntheticRecord rec(p);
  WriteOptions options;
  options.wfdb_format = 212;
  write_wfdb(rec, dir / "r.hea", options);
  auto back = open_record(dir / "r.hea");
  expect_close(read_all_roundtrip(*back, 0.5), synth_samples(p), quanta(*back, 4094));
}

TEST(RoundTrip, EdfWithinHalfAQuantumAndRewritesIdentically) {
  const SynthParams p = record_params(false);  // EDF has no missing-sample code
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_edf"));
  SyntheticRecord rec(p);
  write_edf(rec, dir / "r.edf");
  EXPECT_TRUE(only(dir, {"r.edf"}));
  auto back = open_record(dir / "r.edf");
  ASSERT_EQ(back->channels().size(), 4u);
  EXPECT_EQ(back->channels()[0].name, "ABP");
  EXPECT_EQ(back->channels()[0].unit, "mmHg");
  EXPECT_DOUBLE_EQ(back->channels()[0].fs, 125.0);
  EXPECT_DOUBLE_EQ(*back->duration(), 60.0);
  const Samples first = read_all_roundtrip(*back);
  expect_close(first, synth_samples(p), quanta(*back, 65535));
  back.reset();  // EDFlib opens a file once at a time
  // Written again from what EDFlib read, the file reads back identically.
  auto again = open_record(dir / "r.edf");
  write_edf(*again, dir / "r2.edf");
  again.reset();
  auto second = open_record(dir / "r2.edf");
  EXPECT_EQ(read_all_roundtrip(*second), first);
}

TEST(RoundTrip, EdfAtARateThatIsNotWholePerSecond) {
  // 62.5 samples/s: EDF data records of 2 s hold 125 samples (Kemp et al. 1992: a data record's
  // duration is free; EDFlib's edf_set_datarecord_duration).
  SynthParams p = record_params(false);
  p.fs = 62.5;
  p.duration = seconds(61);  // 30.5 data records: the last one padded
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_edf_62_5"));
  SyntheticRecord rec(p);
  write_edf(rec, dir / "r.edf");
  auto back = open_record(dir / "r.edf");
  EXPECT_DOUBLE_EQ(back->channels()[0].fs, 62.5);
  EXPECT_DOUBLE_EQ(*back->duration(), 62.0);
  Samples got = read_all_roundtrip(*back);
  const Samples want = synth_samples(p);
  for (std::size_t c = 0; c < got.size(); ++c) {
    ASSERT_EQ(got[c].size(), 31u * 125u);  // 31 records of 2 s, the last one padded
    ASSERT_LE(want[c].size(), got[c].size());
    got[c].resize(want[c].size());
  }
  expect_close(got, want, quanta(*back, 65535));
}

TEST(RoundTrip, RealMultiRateRecordThroughWfdb16) {
  const auto mimic =
      std::filesystem::path(bb::test::shared_data_dir()) / "mimicdb" / "03700181.hea";
  if (!std::filesystem::exists(mimic)) GTEST_SKIP() << "MIMIC record not found: " << mimic;
  auto src = open_record(mimic);
  const Samples original = read_all_roundtrip(*src, 20.0);
  src->seek(0);
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_mimic"));
  write_wfdb(*src, dir / "copy.hea");
  auto back = open_record(dir / "copy.hea");
  ASSERT_EQ(back->channels().size(), 3u);
  EXPECT_DOUBLE_EQ(back->channels()[0].fs, 500.0);  // 4 samples per frame kept (MIMIC README)
  // The skewed RESP tail (NaN) survives as WFDB invalid samples.
  expect_close(read_all_roundtrip(*back, 20.0), original, quanta(*back, 65534));
}

TEST(Writers, NothingIsLeftWhenTheWriterFails) {
  const auto dir = std::filesystem::path(bb::test::temp_dir("rt_fail"));
  SynthParams p = record_params(false);
  p.fs = 100.003;  // no EDF data record of 1 to 60 s holds a whole number of samples
  SyntheticRecord rec(p);
  EXPECT_THROW(write_edf(rec, dir / "r.edf"), InputError);
  SyntheticRecord rec2(record_params(false));
  EXPECT_THROW(write_csv(rec2, dir / "no" / "such" / "dir.csv"), InputError);
  EXPECT_TRUE(only(dir, {}));
}

TEST(Writers, FormatNames) {
  EXPECT_EQ(record_format_from("EDF"), RecordFormat::edf);
  EXPECT_THROW(record_format_from("mat"), InputError);
  EXPECT_EQ(record_format_of("x.hea"), RecordFormat::wfdb);
  EXPECT_EQ(record_format_of("x.csv"), RecordFormat::csv);
  EXPECT_FALSE(record_format_of("x.mat").has_value());
}

}  // namespace
}  // namespace bb::wave
