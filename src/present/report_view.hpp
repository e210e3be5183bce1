// The report in words, built once from the typed trial analysis and printed by
// report_text.cpp and report_json.cpp (internal to the presenters).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "breathbeat/answer.hpp"
#include "breathbeat/trial/analysis.hpp"

namespace bb::report {

// One row of a report section at one step: a number with its unit, or a word.
struct Cell {
  std::string key;    // machine name, also the CSV/JSON column ("driving_pressure")
  std::string label;  // people's name, without the unit ("Driving pressure (Pplat - PEEP)")
  std::optional<Shown> shown;
  std::string text;  // when the value is a word ("vc", "regular")
  std::string note;  // method or assumption
};

// One preload index at one step.
struct Index {
  std::string key;
  std::string label;  // "Pulse pressure variation (per breath)"
  std::vector<Cell> values;
  const PreloadIndexReading* reading = nullptr;
};

struct Statement {
  std::string category;
  std::string text;
  bool conditional = false;  // marked in the text table
  std::vector<OpenCondition> open_conditions;
  std::vector<MeasurementSupport> measurements;
  std::vector<std::string> supporting;
  std::vector<std::string> grey_zone;
  std::vector<std::string> failed_gates;  // "ppv: vt_per_kg_pbw"
};

struct Step {
  std::string label;
  std::string time;
  std::vector<Cell> settings;
  std::vector<Cell> mechanics;
  std::vector<Cell> gas_exchange;  // gases and O2 transport
  std::vector<Cell> circulation;   // pressures, CO, PPV value, IVC indices, infusions
  std::vector<Flag> flags;         // limits breached at this step
  std::vector<Index> preload;
  Statement statement;
  std::vector<std::string> notes;
};

struct HeartLung {
  std::string step;
  std::string reference;
  std::optional<ElastanceRatioOrigin> origin;
  std::vector<Cell> estimated;  // ranges (Shown low/high)
  std::vector<Cell> observed;   // change in CO, MAP, PPV beside the estimate
  std::vector<std::string> notes;
  // Per note: true when it says the same at every step (the text shows it once).
  std::vector<bool> once_only;
};

struct Finding {
  std::string key;
  std::string text;
  std::vector<std::string> steps;
  std::vector<Cell> values;
  bool flagged = false;
  std::string source;
};

struct View {
  std::string file;
  std::string patient_label;
  std::vector<Cell> patient;
  std::string reference;
  std::vector<Step> steps;
  std::vector<HeartLung> heart_lung;
  std::vector<Finding> comparison;
  std::vector<std::string> notes;  // what the analysis could not do
  std::vector<std::string> cautions;
  std::vector<std::pair<std::string, std::string>> thresholds_used;  // key, "value unit (source)"
};

// The whole report in words; fields are named as trial-file keys.
View view_of(const TrialAnalysis& analysis);

}  // namespace bb::report
