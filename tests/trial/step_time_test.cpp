// Step times (docs/trial-file.md, `time`): a time written as a clock time is read for the
// intervals between steps, so one that no clock shows is refused as bad input, in a trial file
// and in `trial add-step --time`; free text stays accepted and is only shown. The limits are
// those of RFC 3339, section 5.6 (Klyne & Newman, IETF 2002; the time format of TOML): hour
// 00-23, minute 00-59, second 00-59 (a leap second is not a bedside time: common practice, no
// source), day within its month in the Gregorian calendar.
#include <gtest/gtest.h>

#include <fstream>
#include <string>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

const char* kHead = "[patient]\nsex = \"male\"\nheight = \"175 cm\"\n\n[[step]]\nlabel = \"A\"\n";

std::string trial_with_time(const std::string& name, const std::string& time) {
  const std::string path = temp_dir("step_time_" + name) + "/t.toml";
  std::ofstream(path, std::ios::binary) << kHead << "time = \"" << time << "\"\n";
  return path;
}

TEST(StepTime, AnImpossibleClockTimeInAFileIsRefusedWithItsPlace) {
  for (const std::string bad :
       {"25:70", "24:00", "12:60", "14:5", "10:00:61", "2026-02-29T10:00", "2026-13-01T10:00"}) {
    SCOPED_TRACE(bad);
    const std::string path = trial_with_time("bad", bad);
    const std::string before = slurp(path);
    for (const char* command : {"check", "report"}) {
      const CliResult r = run_cli({command, path});
      EXPECT_EQ(r.exit_code, 2) << r.err;
      EXPECT_TRUE(r.out.empty()) << r.out;
      // Line 7, column 8: the value of `time = "..."` (the file above).
      EXPECT_NE(r.err.find("t.toml:7:8: field 'step[1].time'"), std::string::npos) << r.err;
      EXPECT_NE(r.err.find("'" + bad + "'"), std::string::npos) << r.err;
      EXPECT_NE(r.err.find("HH:MM"), std::string::npos) << r.err;
    }
    EXPECT_EQ(slurp(path), before);
  }
}

TEST(StepTime, PossibleClockTimesAndFreeTextAreAccepted) {
  // 2024 is a leap year (Gregorian calendar); 23:59:59 is the last second of a day (RFC 3339).
  for (const std::string good : {"00:00", "9:05", "23:59:59", "14:05:30.5", "2024-02-29T10:00",
                                 "2026-12-03T14:05:00Z", "after the leg raise", "morning round"}) {
    SCOPED_TRACE(good);
    const CliResult r = run_cli({"check", trial_with_time("good", good)});
    EXPECT_EQ(r.exit_code, 0) << r.err;
  }
}

TEST(StepTime, AddStepRefusesAnImpossibleTimeAndLeavesTheFile) {
  const std::string file = temp_dir("step_time_add") + "/t.toml";
  ASSERT_EQ(run_cli({"trial", "new", file, "--sex", "male", "--height", "175"}).exit_code, 0);
  ASSERT_EQ(run_cli({"trial", "add-step", file, "--label", "PEEP 10", "--time", "10:00"}).exit_code,
            0);
  const std::string before = slurp(file);
  const CliResult r = run_cli({"trial", "add-step", file, "--label", "PEEP 14", "--time", "25:70"});
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_TRUE(r.out.empty()) << r.out;
  EXPECT_NE(r.err.find("'--time'"), std::string::npos) << r.err;
  EXPECT_NE(r.err.find("not a possible clock time"), std::string::npos) << r.err;
  EXPECT_EQ(slurp(file), before);
  // A possible time is then taken as written.
  ASSERT_EQ(run_cli({"trial", "add-step", file, "--label", "PEEP 14", "--time", "10:12"}).exit_code,
            0);
  EXPECT_NE(slurp(file).find("time = \"10:12\""), std::string::npos);
}

}  // namespace
}  // namespace bb::test
