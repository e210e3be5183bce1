// A step recorded with `trial add-step --record` and values typed as well: the report says which
// values came from the record and which typed ones took precedence over it (docs/trial-file.md,
// "[step.waveform]"). The record is made by `breathbeat wave synth` with known values: heart rate
// 96 /min and PPV 14 % are its synthetic truth; the typed 80 /min and 9 % are fixture values.
#include <gtest/gtest.h>

#include <string>

#include "../support/cli_runner.hpp"

namespace bb::test {
namespace {

using nlohmann::json;

struct RecordedStep : ::testing::Test {
  std::string dir = temp_dir("record_provenance");
  std::string file = dir + "/t.toml";
  void SetUp() override {
    CliResult r = run_cli({"wave", "synth", "-o", dir + "/rec.hea", "--duration", "3min", "--hr",
                           "96", "--rr", "16", "--ppv", "14%"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
    r = run_cli({"trial", "new", file, "--sex", "male", "--height", "178"});
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }
  void add(const std::string& label, const std::vector<std::string>& typed) {
    std::vector<std::string> args = {
        "trial", "add-step", file,   "--label", label,      "--set-peep",     "8",
        "--vt",  "600",      "--rr", "16",      "--record", dir + "/rec.hea", "--from",
        "20s",   "--to",     "140s"};
    args.insert(args.end(), typed.begin(), typed.end());
    const CliResult r = run_cli(args);
    ASSERT_EQ(r.exit_code, 0) << r.err;
  }
  json report() {
    const CliResult r = run_cli({"report", file, "--format", "json"});
    EXPECT_EQ(r.exit_code, 0) << r.err;
    return parse_json(r);
  }
};

std::string note_with(const json& step, const std::string& words) {
  for (const json& n : step["notes"]) {
    const std::string t = n;
    if (t.find(words) != std::string::npos) return t;
  }
  return "";
}

TEST_F(RecordedStep, TypedValuesTakingPrecedenceAreNamedWithTheRecordsValues) {
  add("PEEP 8", {"--ppv", "9", "--hr", "80", "--regular"});
  const json j = report();
  const json& step = j["steps"][0];
  // The typed values are the ones read ...
  EXPECT_NEAR(step["circulation"]["hr"]["value"].get<double>(), 80.0, 1e-9);
  EXPECT_NEAR(step["circulation"]["ppv"]["value"].get<double>(), 9.0, 1e-9);
  // ... and the step says so, with what the record gave: 96 /min (synthetic truth, within 1).
  const std::string note = note_with(step, "Record rec.hea (20 s to 140 s)");
  ASSERT_FALSE(note.empty()) << step["notes"].dump(1);
  EXPECT_NE(note.find("typed, taking precedence over the record: PPV 9.0 % (the record's 1"),
            std::string::npos)
      << note;
  EXPECT_NE(note.find("heart rate 80 /min (the record's 9"), std::string::npos) << note;
  const std::string hr_note = step["circulation"]["hr"]["note"];
  EXPECT_EQ(hr_note.rfind("typed (the record's ", 0), 0u) << hr_note;
  // The record's heart rate in that note: 96 /min synthetic truth, within 1 beat.
  const double record_hr = std::stod(hr_note.substr(std::string("typed (the record's ").size()));
  EXPECT_NEAR(record_hr, 96.0, 1.0);
  EXPECT_NE(step["circulation"]["ppv"]["note"].get<std::string>().find("typed"), std::string::npos);
}

TEST_F(RecordedStep, ValuesFromTheRecordAreNamedAsSuch) {
  add("PEEP 8", {});
  const json j = report();
  const json& step = j["steps"][0];
  // PPV 14 % and heart rate 96 /min, synthetic truth, within 1 point and 1 beat.
  EXPECT_NEAR(step["circulation"]["ppv"]["value"].get<double>(), 14.0, 1.0);
  EXPECT_NEAR(step["circulation"]["hr"]["value"].get<double>(), 96.0, 1.0);
  const std::string note = note_with(step, "Record rec.hea");
  EXPECT_NE(note.find("from the record: PPV "), std::string::npos) << note;
  EXPECT_NE(note.find("heart rate "), std::string::npos) << note;
  EXPECT_EQ(note.find("typed"), std::string::npos) << note;
  EXPECT_EQ(step["circulation"]["hr"]["note"], "recorded waveform");
}

TEST_F(RecordedStep, OnlyTheHeartRateTypedSaysEachSource) {
  add("PEEP 8", {"--hr", "80"});
  const json j = report();
  const json& step = j["steps"][0];
  const std::string note = note_with(step, "Record rec.hea");
  EXPECT_NE(note.find("from the record: PPV "), std::string::npos) << note;
  EXPECT_NE(note.find("typed, taking precedence over the record: heart rate 80 /min"),
            std::string::npos)
      << note;
  // The record's PPV note no longer claims the heart rate came from the signals.
  const std::string origin = note_with(step, "PPV from the recorded signals");
  EXPECT_EQ(origin.find("heart rate"), std::string::npos) << origin;
}

}  // namespace
}  // namespace bb::test
