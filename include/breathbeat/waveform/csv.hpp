// CSV records: a header row naming each column `<name>_<unit>` (abp_mmHg,
// paw_cmH2O, flow_L/min), then one row per sample instant. A time column
// `time_s` or `t_s` gives the sampling rate, or the caller gives it (--fs).
// All channels share one rate. See docs/waveform-formats.md.
#pragma once

#include <filesystem>
#include <memory>
#include <optional>
#include <string>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

// A header cell split into its channel name and unit ("flow_L/min" -> flow, L/min).
struct CsvColumn {
  std::string name;
  std::string unit;
};
// Splits at the last underscore; throws InputError if there is none.
CsvColumn parse_csv_column(const std::string& cell, const std::string& file, int column);

// Opens a CSV record, streaming it with a fixed buffer. Rows are checked as
// they are read: a ragged row, a non-numeric cell, a NaN or infinite sample,
// time that does not increase or steps irregularly is an InputError with
// file:line:column. An empty cell is a missing sample (NaN, a gap).
// `fs` is required when there is no time column, refused when there is one.
std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       std::optional<double> fs = std::nullopt);

}  // namespace bb::wave
