// The report in words, built once from the typed trial analysis and printed by
// report_text.cpp and report_json.cpp (internal to the presenters).
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/answer.hpp"
#include "breathbeat/present/display.hpp"
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

// ---- the answer first (the summary the text and HTML reports open with) ----------------

// One quantity across the steps: the same key, label and stored Shown as the detail cell it
// comes from (print it through displayed(), breathbeat/present/display.hpp).
struct SummaryRow {
  std::string key;    // "peep_total", "pplat", "driving_pressure", "compliance_static", ...
  std::string label;  // short people's name, without the unit ("Total PEEP")
  std::vector<std::optional<Cell>> cells;  // one per View::steps entry; nullopt = not recorded
};

// The preload statement of one step, short.
struct SummaryPreload {
  std::string category;      // "likely_responsive", "unlikely", "indeterminate", "not_assessable"
  std::string word;          // "likely", "unlikely", "indeterminate", "n/a"
  bool conditional = false;  // holds only if open conditions are met (the text adds "?")
  std::string text;          // the full statement (Step::statement.text)
};

// Where an index cannot be read: the paired tests that still apply (typed, from the analysis)
// and the sentence saying so; steps with the same fact are grouped.
struct NextStep {
  std::vector<std::string> steps;
  std::string index;                   // the unreadable index: "ppv", "ivc", "svv", ...
  std::string index_label;             // "PPV"
  std::vector<std::string> failed;     // the failed conditions' labels
  std::vector<PreloadTestKind> tests;  // tests whose own conditions do not fail there
  std::string text;  // "PPV cannot be read at this tidal volume: a tidal-volume challenge ..."
};

struct Summary {
  std::vector<SummaryRow> rows;         // rows with no value at any step are left out
  std::vector<SummaryPreload> preload;  // one per step
  std::vector<std::string> trade_offs;  // the trade-off findings' sentences
  // A fluid challenge that reached a safety limit: "stop: safety limit reached", first.
  std::vector<std::string> stops;
  std::vector<NextStep> next_steps;
};

// A step left out by a [[voided]] record: who it was, why and when.
struct Voided {
  std::string step;
  std::string reason;
  std::string at;     // as written in the record
  std::string place;  // "FILE:LINE:COLUMN" of the record
  std::string text;   // "'PEEP 12', voided 2026-12-03T11:40:12Z: <reason>"
};

struct View {
  std::string file;
  std::string date;                 // the trial's date ("" when not written)
  std::vector<std::string> trials;  // several trials side by side: their names, in order
  // The reference step of each trial (one for one trial), all marked in the tables.
  std::vector<std::string> references;
  bool is_reference(const std::string& label) const {
    for (const auto& r : references) {
      if (r == label) return true;
    }
    return false;
  }
  // "the reference step 'PEEP 8'" or "each trial's own first step ('A', 'B')".
  std::string references_text() const {
    if (references.size() <= 1) return "the reference step '" + reference + "'";
    std::string list;
    for (const auto& r : references) list += (list.empty() ? "'" : ", '") + r + "'";
    return "each trial's own reference step (" + list + ")";
  }
  std::string patient_label;
  std::vector<Cell> patient;
  std::string reference;
  std::vector<Step> steps;
  std::vector<HeartLung> heart_lung;
  std::vector<Finding> comparison;
  std::vector<std::string> notes;  // what the analysis could not do
  std::vector<Voided> voided;      // steps left out of every table
  std::vector<std::string> cautions;
  // The cautions in a few words, for the first screen (the full ones close the report).
  std::vector<std::string> cautions_short;
  DisplayUnits display;  // the site's display units (text and HTML)
  Summary summary;       // the answer first
  std::vector<std::pair<std::string, std::string>> thresholds_used;  // key, "value unit (source)"
};

// The whole report in words; fields are named as trial-file keys. Sentences give blood gases
// and haemoglobin in `display` (cells keep the stored unit: print them through displayed());
// without it, in the site's display units (DisplayUnits::from(analysis.limits)). JSON and CSV
// use DisplayUnits{} (the stored units), so they do not change with the site's choice.
View view_of(const TrialAnalysis& analysis);
View view_of(const TrialAnalysis& analysis, const DisplayUnits& display);

}  // namespace bb::report
