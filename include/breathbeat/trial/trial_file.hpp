// Trial files (TOML): reading with every problem located at file:line:column,
// writing a new file, appending a step as text, and atomic file writes.
// The schema is documented in docs/trial-file.md.
#pragma once

#include "breathbeat/io/atomic_file.hpp"

#include <filesystem>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb {

// How thresholds are chosen: built-in presets, then the site file the trial
// names (`thresholds = "site.toml"`, relative to the trial file), then the file
// given on the command line (--thresholds), then the plausibility override.
struct TrialReadOptions {
  std::string thresholds_file;     // --thresholds; "" for none
  bool allow_implausible = false;  // --allow-implausible
  bool require_steps = true;       // false while recording (trial add-step)
};

struct LoadedTrial {
  Trial trial;
  Thresholds limits;
  // One deprecation note per old key used ("FILE:LINE:COLUMN: note: 'chest_open'
  // is an old spelling of ..."), for stderr; never part of a report.
  std::vector<std::string> notes;
};

// Reads and validates a trial. Every field is read as the field registry
// (breathbeat/fields/registry.hpp) declares it; old keys (registry aliases)
// still work and leave a note. Collects every problem (unknown keys with a
// did-you-mean, wrong units, implausible values, contradictions, an old and a
// new key for one fact) and throws InputErrors listing them all, each located
// at file:line:column and named by its file path ("step[2].hold.pplat").
LoadedTrial load_trial_file(const std::filesystem::path& file, const TrialReadOptions& options);
LoadedTrial load_trial_text(std::string_view text, const std::string& name,
                            const TrialReadOptions& options);

// The whole file as bytes; InputError naming the file if it cannot be read.
std::string read_text_file(const std::filesystem::path& file);

// ---- recording at the bedside ------------------------------------------------

// One value typed at the bedside: the registry field it states, the text to
// write and the option it came from (for error messages).
struct FieldValue {
  std::string id;      // registry id, e.g. "peep_total"
  std::string text;    // exactly as typed ("28", "2.8 kPa"); "true"/"false" for flags
  std::string option;  // as typed, e.g. "--peep-total" (or an old spelling)
};

// The text of a new trial file: a commented [patient] table with these fields
// of the registry's "patient" table, no steps yet. Throws InputError(s) naming
// the option if a value is bad.
std::string new_trial_text(const std::vector<FieldValue>& patient, const TrialReadOptions& options);

// Everything one step recorded at the bedside holds, as typed.
struct StepRecord {
  std::string label;
  std::optional<std::string> time;
  // Fields of the tables ventilator, hold, gases, circulation, ultrasound,
  // peep_release and waveform, written under their file keys.
  std::vector<FieldValue> values;
  // One [[step.infusion]] each: its drug, rate, concentration and dose.
  std::vector<std::vector<FieldValue>> infusions;
  // [step.preload.<preload_test>] ("plr", "eeo", ...; "" for none) and its fields.
  std::string preload_test;
  std::vector<FieldValue> preload;
};

// The TOML text of one [[step]] with its tables.
std::string step_text(const StepRecord& step);

// `existing` with the new step appended as text (earlier bytes unchanged). Both
// the existing text and the resulting file are validated; problems in the new
// values name their option. Throws InputError / InputErrors. The existing
// file's deprecation notes go to `notes` when given.
std::string append_step_text(std::string_view existing, const std::string& name,
                             const StepRecord& step, const TrialReadOptions& options,
                             std::vector<std::string>* notes = nullptr);

// `existing` with a [[voided]] record appended (earlier bytes unchanged): the
// step labelled `step.text` is voided for `reason`, at `at` (a TOML date-time,
// "2026-12-03T11:40:12Z"). Validated as append_step_text is: an unknown label
// or a step voided already is an error naming the option of `step`.
std::string append_void_text(std::string_view existing, const std::string& name,
                             const FieldValue& step, const FieldValue& reason,
                             const std::string& at, const TrialReadOptions& options,
                             std::vector<std::string>* notes = nullptr);

}  // namespace bb
