// Variable-layout multi-segment WFDB records (header(5), PhysioNet): a layout
// segment with 0 samples naming the record's signals, data segments holding a
// subset of them in any order, and a null segment `~` (a gap). Segments are
// written here with this project's WFDB writer; expected values are synthetic
// truth (the samples written) and the header(5) rules.
#include <gtest/gtest.h>

#include <cmath>
#include <fstream>

#include "breathbeat/errors.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/waveform/source.hpp"
#include "breathbeat/waveform/synth.hpp"
#include "breathbeat/waveform/writers.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

void write_segment_text(const std::filesystem::path& path, const std::string& text) {
  std::ofstream(path, std::ios::binary) << text;
}

std::vector<std::vector<double>> read_all_segments(SignalSource& src, double seconds) {
  std::vector<std::vector<double>> all(src.channels().size());
  Chunk chunk;
  while (src.next(chunk, seconds)) {
    for (std::size_t c = 0; c < all.size(); ++c) {
      all[c].insert(all[c].end(), chunk.samples[c].begin(), chunk.samples[c].end());
    }
  }
  return all;
}

TEST(WfdbMultiSegment, LayoutSegmentNullSegmentAndSignalsByName) {
  const std::filesystem::path dir = bb::test::temp_dir("wfdb_layout");
  SynthParams p;
  p.duration = seconds(4);
  p.fs = 100;
  SyntheticRecord a(p);
  write_wfdb(a, dir / "seg1.hea");  // ABP, Paw, Flow: 400 frames
  // Segment 3 holds only Paw, given by hand (format 16, gain 10): 2 frames.
  {
    std::ofstream dat(dir / "seg3.dat", std::ios::binary);
    const unsigned char bytes[] = {0x64, 0x00, 0xC8, 0x00};  // 100, 200
    dat.write(reinterpret_cast<const char*>(bytes), 4);
  }
  write_segment_text(dir / "seg3.hea", "seg3 1 100 2\nseg3.dat 16 10/cmH2O 16 0 100 0 0 Paw\n");
  write_segment_text(dir / "layout.hea",
                     "layout 3 100 0\n~ 0 200/mmHg 16 0 0 0 0 ABP\n~ 0 200/cmH2O 16 0 0 0 0 Paw\n"
                     "~ 0 200/L/min 16 0 0 0 0 Flow\n");
  write_segment_text(dir / "rec.hea", "rec/4 3 100 652\nlayout 0\nseg1 400\n~ 250\nseg3 2\n");

  auto src = open_record(dir / "rec.hea");
  ASSERT_EQ(src->channels().size(), 3u);
  EXPECT_EQ(src->channels()[2].unit, "L/min");  // from the layout segment
  EXPECT_DOUBLE_EQ(*src->duration(), 6.52);     // 652 frames at 100 Hz (record line)
  const auto all = read_all_segments(*src, 0.7);
  ASSERT_EQ(all[1].size(), 652u);
  SyntheticRecord again(p);
  const auto truth = read_all_segments(again, 10.0);
  for (std::size_t i = 0; i < 400; ++i) {
    ASSERT_NEAR(all[1][i], truth[1][i], 200.0 / 65534);  // one WFDB 16 quantum of -50..150 cmH2O
  }
  for (std::size_t i = 400; i < 650; ++i) ASSERT_TRUE(std::isnan(all[0][i]));  // null segment
  EXPECT_DOUBLE_EQ(all[1][650], 10.0);  // (100 - 0) / 10, header(5)
  EXPECT_DOUBLE_EQ(all[1][651], 20.0);
  EXPECT_TRUE(std::isnan(all[0][650]));  // ABP absent from segment 3
  EXPECT_TRUE(std::isnan(all[2][651]));  // Flow absent from segment 3

  src->seek(6.5);  // into the last segment
  Chunk chunk;
  ASSERT_TRUE(src->next(chunk, 1.0));
  EXPECT_DOUBLE_EQ(chunk.start_time, 6.5);
  ASSERT_EQ(chunk.samples[1].size(), 2u);
  EXPECT_DOUBLE_EQ(chunk.samples[1][0], 10.0);
}

TEST(RoleFromLabel, CommonLabels) {
  // Labels on monitors and in open databases (common practice, no source).
  EXPECT_EQ(role_from_label("ABP"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("ART"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("abp_mmHg"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("PAP"), Role::other);  // pulmonary artery
  EXPECT_EQ(role_from_label("Paw"), Role::airway_pressure);
  EXPECT_EQ(role_from_label("Flow"), Role::flow);
  EXPECT_EQ(role_from_label("Volume"), Role::volume);
  EXPECT_EQ(role_from_label("CVP"), Role::central_venous_pressure);
  EXPECT_EQ(role_from_label("Pes"), Role::oesophageal_pressure);
  EXPECT_EQ(role_from_label("RESP"), Role::respiration);
  EXPECT_EQ(role_from_label("MCL1"), Role::ecg);
  EXPECT_EQ(role_from_label("V"), Role::ecg);
  EXPECT_EQ(role_from_label("PLETH"), Role::other);
}

TEST(RoleFromLabel, TableInPresetsMatchesWithoutCaseOrPunctuation) {
  // presets/channel_labels.toml (common practice, no source).
  EXPECT_EQ(role_from_label("art 1"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("Art-2"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("AoP"), Role::arterial_pressure);
  EXPECT_EQ(role_from_label("Pressure airway"), Role::airway_pressure);
  EXPECT_EQ(role_from_label("PRESSURE"), Role::airway_pressure);             // exact word
  EXPECT_EQ(role_from_label("Pressure arterial"), Role::arterial_pressure);  // longer prefix
  EXPECT_EQ(role_from_label("Airflow"), Role::flow);
  EXPECT_EQ(role_from_label("VT"), Role::volume);  // prefix, where "V" alone is ECG
  EXPECT_EQ(role_from_label("Pressure central venous"), Role::central_venous_pressure);
  EXPECT_EQ(role_from_label("Temp"), Role::other);
  // Every entry of the table names a known role and matches its own words.
  const auto role_word = [](const std::string& label) {
    std::string w = to_string(role_from_label(label));
    for (char& c : w) c = c == ' ' ? '_' : static_cast<char>(std::tolower(c));
    return w;
  };
  for (const auto& entry : presets::channel_labels().channels) {
    for (const auto& w : entry.exact) EXPECT_EQ(role_word(w), entry.role) << w;
    for (const auto& w : entry.prefixes) EXPECT_EQ(role_word(w + "2"), entry.role) << w;
  }
  EXPECT_FALSE(presets::channel_labels().time.empty());
}

}  // namespace
}  // namespace bb::wave
