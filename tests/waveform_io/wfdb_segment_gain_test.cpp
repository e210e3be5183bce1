// A multi-segment WFDB record whose layout calibrates a pressure channel but
// one of whose segments gives it no gain (header(5): gain 0 = uncalibrated):
// reading that segment is refused, located at the segment's header line.
#include <gtest/gtest.h>

#include <fstream>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/source.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

void write_gain_text(const std::filesystem::path& path, const std::string& text) {
  std::ofstream(path, std::ios::binary) << text;
}

TEST(WfdbSegmentGain, AnUncalibratedPressureInASegmentIsRefusedAtItsLine) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_segment_gain");
  {
    std::ofstream dat(dir / "seg1.dat", std::ios::binary);
    const unsigned char bytes[] = {0x64, 0x00, 0xC8, 0x00};  // 100, 200 (format 16)
    dat.write(reinterpret_cast<const char*>(bytes), 4);
  }
  write_gain_text(dir / "seg1.hea", "seg1 1 100 2\nseg1.dat 16 0/cmH2O 16 0 0 0 0 Paw\n");
  write_gain_text(dir / "layout.hea", "layout 1 100 0\n~ 0 200/cmH2O 16 0 0 0 0 Paw\n");
  write_gain_text(dir / "rec.hea", "rec/2 1 100 2\nlayout 0\nseg1 2\n");
  auto src = open_record(dir / "rec.hea");
  EXPECT_FALSE(src->channels()[0].uncalibrated);  // the layout gives a gain
  Chunk chunk;
  try {
    src->next(chunk, 1.0);
    FAIL() << "read";
  } catch (const InputError& e) {
    EXPECT_NE(e.problem().find("Paw"), std::string::npos) << e.problem();
    EXPECT_NE(e.problem().find("uncalibrated"), std::string::npos);
    ASSERT_TRUE(e.where());
    EXPECT_EQ(e.where()->file, (dir / "seg1.hea").string());
    EXPECT_EQ(e.where()->line, 2);
    EXPECT_EQ(e.where()->column, 13);  // "seg1.dat 16 " is 12 characters
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace bb::wave
