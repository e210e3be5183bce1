// breathbeat wave synth end to end: writes a record the readers open, and
// refuses bad options with exit code 2, nothing on stdout and no file.
#include <gtest/gtest.h>

#include <filesystem>

#include "breathbeat/waveform/source.hpp"
#include "cli_runner.hpp"

namespace bb::wave {
namespace {

std::size_t samples_in(const std::filesystem::path& path, std::size_t channel) {
  auto src = open_record(path);
  std::size_t n = 0;
  Chunk chunk;
  while (src->next(chunk, 5.0)) n += chunk.samples[channel].size();
  return n;
}

TEST(WaveSynthCli, WritesEachFormat) {
  const std::filesystem::path dir = bb::test::temp_dir("synth_cli");
  for (const std::string ext : {"csv", "edf", "hea"}) {
    SCOPED_TRACE(ext);
    const auto out = dir / ("r." + ext);
    const auto r = bb::test::run_cli({"wave", "synth", "-o", out.string(), "--duration", "0.5min",
                                      "--fs", "100", "--hr", "80", "--rr", "15", "--ppv", "12"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
    EXPECT_NE(r.out.find("PPV 12 %"), std::string::npos) << r.out;
    EXPECT_EQ(samples_in(out, 0), 3000u);  // 30 s x 100 Hz (synthetic truth)
  }
  EXPECT_TRUE(std::filesystem::exists(dir / "r.dat"));
}

TEST(WaveSynthCli, BadOptionExitsTwoAndWritesNothing) {
  const std::filesystem::path dir = bb::test::temp_dir("synth_cli_bad");
  const auto out = dir / "r.csv";
  const auto r = bb::test::run_cli({"wave", "synth", "-o", out.string(), "--ppv", "95%"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("--ppv"), std::string::npos) << r.err;
  EXPECT_FALSE(std::filesystem::exists(out));
  const auto d = bb::test::run_cli({"wave", "synth", "-o", out.string(), "--duration", "10 kg"});
  EXPECT_EQ(d.exit_code, 2);
  EXPECT_TRUE(std::filesystem::is_empty(dir));
}

}  // namespace
}  // namespace bb::wave
