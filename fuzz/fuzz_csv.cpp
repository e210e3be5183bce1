// Fuzz target: the CSV reader (open_csv), with a time column, with --fs, and
// with the dialect forced (semicolons, decimal commas).
#include <string_view>

#include "breathbeat/waveform/csv.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const auto path =
      bb::fuzz::write_scratch("r.csv", std::string_view(reinterpret_cast<const char*>(data), size));
  bb::fuzz::expect_input_errors_only([&] {
    auto source = bb::wave::open_csv(path);
    bb::fuzz::drain(*source);
  });
  bb::fuzz::expect_input_errors_only([&] {
    auto source = bb::wave::open_csv(path, 125.0);
    bb::fuzz::drain(*source);
  });
  bb::fuzz::expect_input_errors_only([&] {
    bb::wave::OpenOptions options;
    options.csv_delimiter = ';';
    options.csv_decimal = ',';
    auto source = bb::wave::open_csv(path, options);
    bb::fuzz::drain(*source);
  });
  return 0;
}
