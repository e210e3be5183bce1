// The window trend spooled to a temporary file prints exactly what the whole
// object would: checked against nlohmann::json's own printing (a general-purpose
// library) and against the row formatters called directly.
#include <gtest/gtest.h>

#include <sstream>

#include "breathbeat/present/wave.hpp"

namespace bb::wave {
namespace {

std::vector<WindowResult> some_windows(int n) {
  std::vector<WindowResult> out;
  for (int i = 0; i < n; ++i) {
    WindowResult w;  // invented values: only the printing is under test
    w.start = seconds(30.0 * i);
    w.end = seconds(30.0 * (i + 1));
    w.beats = 45 + i;
    w.breaths = 9;
    w.heart_rate = per_min(90 + i);
    w.respiratory_rate = per_min(18);
    if (i % 2 == 0) w.ppv = PpvSpread{fraction(0.12), fraction(0.10), fraction(0.15), 9};
    w.mean_airway_pressure = cmH2O(11.5);
    out.push_back(w);
  }
  return out;
}

TEST(TrendSpool, JsonEqualsTheWholeObjectPrintedByNlohmann) {
  for (int n : {0, 1, 3}) {
    nlohmann::ordered_json summary;
    summary["duration"] = {{"value", 90.0}, {"unit", "s"}};
    summary["beats"] = 135;
    TrendSpool spool(TrendFormat::json);
    nlohmann::ordered_json whole = summary;
    whole["windows"] = nlohmann::ordered_json::array();
    for (const WindowResult& w : some_windows(n)) {
      spool.add(w);
      whole["windows"].push_back(to_json(w));
    }
    std::ostringstream out;
    write_json_with_windows(out, summary, spool);
    EXPECT_EQ(out.str(), whole.dump(2)) << n << " windows";
    EXPECT_EQ(spool.windows(), n);
  }
}

TEST(TrendSpool, TextAndCsvRowsInOrder) {
  TrendSpool text(TrendFormat::text), csv(TrendFormat::csv);
  std::string want_text;
  std::ostringstream want_csv;
  for (const WindowResult& w : some_windows(4)) {
    text.add(w);
    csv.add(w);
    want_text += window_text_row(w) + "\n";
    write_window_csv_row(want_csv, w);
  }
  std::ostringstream got_text, got_csv;
  text.copy_to(got_text);
  csv.copy_to(got_csv);
  EXPECT_EQ(got_text.str(), want_text);
  EXPECT_EQ(got_csv.str(), want_csv.str());
  std::ostringstream again;  // copying twice gives the same rows
  text.copy_to(again);
  EXPECT_EQ(again.str(), want_text);
}

TEST(TrendRows, AReadingOnUnconfirmedConditionsSaysSo) {
  // A high PPV rests on rhythm and effort (either way) but not on a closed chest, which could
  // only have made it falsely low (docs/methods.md, "Directional validity conditions").
  WindowResult w = some_windows(1).front();
  w.reading = Reading{"ppv", "above_grey_zone", {}};
  w.reading->conditional = true;
  w.reading->open_conditions = {"regular_rhythm", "passive_ventilation"};
  w.gates = {Gate{"regular_rhythm", GateState::not_contradicted, ""},
             Gate{"passive_ventilation", GateState::not_contradicted, ""},
             Gate{"closed_chest", GateState::unknown, ""}};
  // In people's words, not the category key (the key stays in CSV and JSON).
  EXPECT_EQ(window_text_row(w).find("above_grey_zone"), std::string::npos) << window_text_row(w);
  EXPECT_NE(window_text_row(w).find("above the grey zone, conditional on 2 unconfirmed conditions"),
            std::string::npos)
      << window_text_row(w);
  EXPECT_EQ(to_json(w)["gates_unknown"], nlohmann::ordered_json({"closed_chest"}));
  EXPECT_EQ(to_json(w)["gates_not_contradicted"],
            nlohmann::ordered_json({"regular_rhythm", "passive_ventilation"}));
  EXPECT_EQ(to_json(w)["conditional"], true);
  std::ostringstream csv;
  write_window_csv_row(csv, w);
  EXPECT_NE(csv.str().find(",above_grey_zone,2,breaths\n"), std::string::npos) << csv.str();
  // Not interpretable needs no such note; a reading with nothing open needs none either.
  w.reading->category = "not_interpretable";
  EXPECT_EQ(window_text_row(w).find("conditional"), std::string::npos);
  w.reading->category = "above_grey_zone";
  w.reading->open_conditions.clear();
  EXPECT_EQ(window_text_row(w).find("conditional"), std::string::npos);
}

}  // namespace
}  // namespace bb::wave
