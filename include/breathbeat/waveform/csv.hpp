// CSV records as monitors export them: a header row naming each column
// `name (unit)`, `name [unit]` or `name_unit` (ART (mmHg), Paw [cmH2O],
// flow_L/min), then one row per sample instant; separators `,` `;` or tab and
// decimal points or commas, detected or given. A time column (seconds, or
// clock times such as 12:00:00.004) gives the sampling rate, or the caller
// gives it (--fs). All channels share one rate. See docs/waveform-formats.md.
#pragma once

#include <filesystem>
#include <memory>
#include <optional>
#include <string>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

// A header cell split into its channel name and unit ("ART (mmHg)" -> ART,
// mmHg; "flow_L/min" -> flow, L/min; "Time" -> Time, no unit).
struct CsvColumn {
  std::string name;
  std::string unit;  // empty when the header gives none
};
// `name (unit)` and `name [unit]` take the bracketed unit; otherwise the cell is
// split at its last underscore when the part after it has a letter. Throws
// InputError (at file:line:column) for an empty name or unit, or an unclosed bracket.
CsvColumn parse_csv_column(const std::string& cell, const std::string& file, int column,
                           int line = 1);

// Opens a CSV record, streaming it with a fixed buffer. Rows are checked as
// they are read: a ragged row, a non-numeric cell, a NaN or infinite sample,
// time that does not increase or steps irregularly is an InputError with
// file:line:column. An empty cell is a missing sample (NaN, a gap).
// `options.csv_fs` is required when there is no time column, refused when
// there is one; `csv_delimiter` and `csv_decimal` force the dialect.
std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       const OpenOptions& options);
std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       std::optional<double> fs = std::nullopt);

}  // namespace bb::wave
