// WFDB storage formats decoded from hand-made bytes laid out as the signal(5)
// page of the WFDB Programmer's Guide (PhysioNet) describes them, and bad
// WFDB input: each a clear InputError, no crash.
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/wfdb.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

void write_bytes(const std::filesystem::path& path, const std::vector<unsigned char>& bytes) {
  std::ofstream os(path, std::ios::binary);
  os.write(reinterpret_cast<const char*>(bytes.data()), static_cast<std::streamsize>(bytes.size()));
}

void write_text(const std::filesystem::path& path, const std::string& text) {
  std::ofstream(path, std::ios::binary) << text;
}

// One-signal record "r" in `format` with gain 1, baseline 0: samples are ADC values.
std::vector<double> decode(const std::string& name, const std::string& format_field,
                           const std::vector<unsigned char>& bytes, int frames) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_" + name);
  write_bytes(dir / "r.dat", bytes);
  write_text(dir / "r.hea",
             "r 1 100 " + std::to_string(frames) + "\nr.dat " + format_field + " 1(0)/mV\n");
  auto src = open_record(dir / "r.hea");
  std::vector<double> out;
  Chunk chunk;
  while (src->next(chunk, 0.02))
    out.insert(out.end(), chunk.samples[0].begin(), chunk.samples[0].end());
  return out;
}

bool same(const std::vector<double>& got, const std::vector<double>& want) {
  if (got.size() != want.size()) return false;
  for (std::size_t i = 0; i < got.size(); ++i) {
    if (std::isnan(want[i]) ? !std::isnan(got[i]) : got[i] != want[i]) return false;
  }
  return true;
}

const double kNaN = std::nan("");

TEST(WfdbFormats, Format16LittleEndianWithInvalidSample) {
  // signal(5): 16-bit two's complement, least significant byte first; -32768 invalid
  EXPECT_TRUE(
      same(decode("f16", "16", {0xE8, 0x03, 0x18, 0xFC, 0x00, 0x80}, 3), {1000, -1000, kNaN}));
}

TEST(WfdbFormats, Format61BigEndian) {
  // signal(5): as format 16 with the most significant byte first
  EXPECT_TRUE(same(decode("f61", "61", {0x03, 0xE8, 0xFC, 0x18}, 2), {1000, -1000}));
}

TEST(WfdbFormats, Format80OffsetBinary) {
  // signal(5): 8-bit offset binary (stored byte - 128); -128 (byte 0) invalid
  EXPECT_TRUE(same(decode("f80", "80", {0x8A, 0x76, 0x00}, 3), {10, -10, kNaN}));
}

TEST(WfdbFormats, Format212PairsAndAnOddLastSample) {
  // signal(5): two 12-bit samples in 3 bytes; the first sample's high nibble is
  // the low nibble of byte 1, the second's its high nibble. 1000 = 0x3E8,
  // -1000 = 0xC18, 5 = 0x005, -2048 = 0x800 (invalid).
  const std::vector<unsigned char> bytes = {0xE8, 0xC3, 0x18, 0x05, 0x80, 0x00, 0x07, 0x00};
  EXPECT_TRUE(same(decode("f212", "212", bytes, 5), {1000, -1000, 5, kNaN, 7}));
}

TEST(WfdbFormats, Format311ThreeTenBitSamplesInAWord) {
  // signal(5): bits 0-9, 10-19, 20-29 of a little-endian 32-bit word.
  // 100 = 0x064, -100 = 0x39C, 511 = 0x1FF -> word 0x1FFE7064.
  const std::uint32_t w = 0x064u | (0x39Cu << 10) | (0x1FFu << 20);
  EXPECT_TRUE(
      same(decode("f311", "311",
                  {static_cast<unsigned char>(w), static_cast<unsigned char>(w >> 8),
                   static_cast<unsigned char>(w >> 16), static_cast<unsigned char>(w >> 24)},
                  3),
           {100, -100, 511}));
}

TEST(WfdbFormats, Format310ThreeTenBitSamplesInTwoWords) {
  // signal(5): sample 1 in bits 1-10 of the first 16-bit word, sample 2 in
  // bits 1-10 of the second, sample 3 from bits 11-15 of each (low half first).
  const std::uint32_t a = 0x064, b = 0x39C, c = 0x1FF;
  const std::uint32_t w0 = (a << 1) | ((c & 0x1F) << 11);
  const std::uint32_t w1 = (b << 1) | ((c >> 5) << 11);
  EXPECT_TRUE(same(decode("f310", "310",
                          {static_cast<unsigned char>(w0), static_cast<unsigned char>(w0 >> 8),
                           static_cast<unsigned char>(w1), static_cast<unsigned char>(w1 >> 8)},
                          3),
                   {100, -100, 511}));
}

TEST(WfdbFormats, ByteOffsetSkipsAPrologue) {
  // header(5): "+N" after the format: N bytes before the first sample
  EXPECT_TRUE(same(decode("offset", "16+4", {0xFF, 0xFF, 0xFF, 0xFF, 0x0A, 0x00}, 1), {10}));
}

TEST(WfdbFormats, GainBaselineAndUnits) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_gain");
  write_bytes(dir / "r.dat", {0x2C, 0x01});  // 300
  write_text(dir / "r.hea", "r 1 250 1\nr.dat 16 200(100)/cmH2O 16 0 300 0 0 airway pressure\n");
  auto src = open_record(dir / "r.hea");
  EXPECT_EQ(src->channels()[0].unit, "cmH2O");
  EXPECT_EQ(src->channels()[0].name, "airway pressure");  // description with a space (header(5))
  Chunk chunk;
  ASSERT_TRUE(src->next(chunk, 1.0));
  EXPECT_DOUBLE_EQ(chunk.samples[0][0], 1.0);  // (300 - 100) / 200, header(5)
}

InputError open_error(const std::filesystem::path& hea) {
  try {
    auto src = open_record(hea);
    Chunk chunk;
    while (src->next(chunk, 1.0)) {
    }
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "no InputError for " << hea;
  return InputError("", "", "", "");
}

TEST(WfdbBadInput, TruncatedSignalFile) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_truncated");
  write_bytes(dir / "r.dat", std::vector<unsigned char>(299, 0x01));  // 100 frames need 300 bytes
  write_text(dir / "r.hea", "r 2 125 100\nr.dat 212 200 12\nr.dat 212 200 12\n");
  const InputError e = open_error(dir / "r.hea");
  EXPECT_NE(std::string(e.what()).find("truncated"), std::string::npos) << e.what();
}

TEST(WfdbBadInput, HeaderNamesAMissingFile) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_missing");
  write_text(dir / "r.hea", "r 1 125 100\nnothere.dat 16 200\n");
  const InputError e = open_error(dir / "r.hea");
  EXPECT_EQ(e.field(), "signal file");
  EXPECT_EQ(e.where()->line, 2);
}

TEST(WfdbBadInput, MultiSegmentNamesAMissingSegment) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_missing_segment");
  write_text(dir / "m.hea", "m/2 1 125 200\nm01 100\nm02 100\n");
  const InputError e = open_error(dir / "m.hea");
  EXPECT_EQ(e.field(), "segment");
  EXPECT_EQ(e.where()->line, 2);
}

TEST(WfdbBadInput, UnsupportedFormatCode) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_format");
  write_bytes(dir / "r.dat", {0, 0});
  write_text(dir / "r.hea", "r 1 125 2\nr.dat 8 200\n");  // format 8 (differences): not read
  const InputError e = open_error(dir / "r.hea");
  EXPECT_EQ(e.field(), "format");
  EXPECT_EQ(e.where()->line, 2);
  EXPECT_EQ(e.where()->column, 7);
}

TEST(WfdbBadInput, MalformedRecordLineAndMissingSignalLines) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_record_line");
  write_text(dir / "a.hea", "a three 125\n");
  EXPECT_EQ(open_error(dir / "a.hea").field(), "number of signals");
  write_text(dir / "b.hea", "b 2 125 10\nb.dat 16 200\n");
  EXPECT_EQ(open_error(dir / "b.hea").field(), "signals");
  write_text(dir / "c.hea", "");
  EXPECT_EQ(open_error(dir / "c.hea").field(), "record line");
  write_text(dir / "d.hea", "d 1 -5 10\nd.dat 16 200\n");
  EXPECT_EQ(open_error(dir / "d.hea").field(), "sampling frequency");
}

TEST(BadInput, UnknownExtensionAndMissingFileAndNotEdf) {
  const std::filesystem::path dir = bb::test::temp_dir("bad_ext");
  write_text(dir / "x.txt", "hello");
  EXPECT_EQ(open_error(dir / "x.txt").field(), "record");
  EXPECT_EQ(open_error(dir / "none.hea").field(), "record");
  write_text(dir / "x.edf", "this is not an EDF header");
  EXPECT_EQ(open_error(dir / "x.edf").field(), "record");
}

}  // namespace
}  // namespace bb::wave
