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
};

// Reads and validates a trial. Collects every problem (unknown keys with a
// did-you-mean, wrong units, implausible values, contradictions) and throws
// InputErrors listing them all, each located at file:line:column.
LoadedTrial load_trial_file(const std::filesystem::path& file, const TrialReadOptions& options);
LoadedTrial load_trial_text(std::string_view text, const std::string& name,
                            const TrialReadOptions& options);

// The whole file as bytes; InputError naming the file if it cannot be read.
std::string read_text_file(const std::filesystem::path& file);


// ---- recording at the bedside ------------------------------------------------

// One value typed at the bedside: where it goes in the file and the option it
// came from (for error messages).
struct StepValue {
  std::string table;     // "ventilator", "hold", "gases", "circulation", "ultrasound"
  std::string key;       // field name in that table, e.g. "pplat"
  std::string text;      // exactly as typed, e.g. "28" or "2.8 kPa"
  std::string option;    // e.g. "--pplat"
  bool is_bool = false;  // written as a TOML boolean ("yes"/"no"/"true"/"false")
};

struct NewTrialValues {
  std::string sex;
  std::string height;
  std::optional<std::string> weight;
  std::optional<std::string> age;
  std::optional<std::string> label;
};

// The text of a new trial file (a commented [patient] table, no steps yet).
// Throws InputError (naming the option) if a value is bad.
std::string new_trial_text(const NewTrialValues& values, const TrialReadOptions& options);

// The TOML text of one [[step]] with the given values (option order kept).
std::string step_text(const std::string& label, const std::optional<std::string>& time,
                      const std::vector<StepValue>& values);

// `existing` with the new step appended as text (earlier bytes unchanged). Both
// the existing text and the new values are validated first; problems in the new
// values name their option. Throws InputError / InputErrors.
std::string append_step_text(std::string_view existing, const std::string& name,
                             const std::string& label, const std::optional<std::string>& time,
                             const std::vector<StepValue>& values, const TrialReadOptions& options);

}  // namespace bb
