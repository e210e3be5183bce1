// The CSV dialect options of the commands that read records (`wave`,
// `wave convert`): --delimiter comma|semicolon|tab and --decimal point|comma,
// words read without regard to case. Unset, the reader detects the dialect
// (docs/waveform-formats.md).
#pragma once

#include <CLI/CLI.hpp>
#include <string>

#include "breathbeat/waveform/source.hpp"

namespace bb::cli {

struct CsvDialectWords {
  std::string delimiter;  // "", "comma", "semicolon" or "tab"
  std::string decimal;    // "", "point" or "comma"
};

void add_csv_dialect_options(CLI::App* sub, CsvDialectWords& words);

// Sets open.csv_delimiter and open.csv_decimal from the words given.
void apply_csv_dialect(const CsvDialectWords& words, wave::OpenOptions& open);

}  // namespace bb::cli
