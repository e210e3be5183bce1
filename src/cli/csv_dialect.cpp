#include "csv_dialect.hpp"

#include "cli_suggest.hpp"

namespace bb::cli {

void add_csv_dialect_options(CLI::App* sub, CsvDialectWords& words) {
  sub->add_option("--delimiter", words.delimiter,
                  "CSV separator: comma, semicolon or tab (default: detected from the header)")
      ->transform(one_of({"comma", "semicolon", "tab"}));
  sub->add_option("--decimal", words.decimal,
                  "CSV decimal mark: point or comma (default: detected from the first rows)")
      ->transform(one_of({"point", "comma"}));
}

void apply_csv_dialect(const CsvDialectWords& words, wave::OpenOptions& open) {
  if (words.delimiter == "comma") open.csv_delimiter = ',';
  if (words.delimiter == "semicolon") open.csv_delimiter = ';';
  if (words.delimiter == "tab") open.csv_delimiter = '\t';
  if (words.decimal == "point") open.csv_decimal = '.';
  if (words.decimal == "comma") open.csv_decimal = ',';
}

}  // namespace bb::cli
