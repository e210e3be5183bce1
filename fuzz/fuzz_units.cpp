// Fuzz target: the unit parser (src/units). The first byte picks a dimension
// and a target unit, the rest is the text a user types.
#include <cmath>
#include <cstdlib>
#include <string>
#include <string_view>

#include "breathbeat/units_parse.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size < 1) return 0;
  constexpr int kDimensions = static_cast<int>(bb::Dimension::number) + 1;
  const auto dimension = static_cast<bb::Dimension>(data[0] % kDimensions);
  const std::string_view text(reinterpret_cast<const char*>(data + 1), size - 1);
  const auto& units = bb::units_for(dimension);
  const std::string_view default_unit = units.empty() ? std::string_view{} : units[0].ucum;
  const bb::Field field{"fuzz", default_unit};

  bb::fuzz::expect_input_errors_only([&] {
    const double si = bb::parse_in_si(text, dimension, field);
    // A value that parses is a finite number (parse_in_si refuses NaN/inf).
    if (!std::isfinite(si)) std::abort();
  });
  bb::fuzz::expect_input_errors_only([&] { (void)bb::parse_number(text, field); });
  bb::fuzz::expect_input_errors_only([&] { (void)bb::find_unit(text, dimension); });
  if (!units.empty()) {
    const auto& target = units[data[0] / kDimensions % units.size()];
    bb::fuzz::expect_input_errors_only([&] {
      const double v = bb::parse_in_unit(text, dimension, target.ucum, field);
      if (!std::isfinite(v)) std::abort();
    });
    bb::fuzz::expect_input_errors_only([&] { (void)bb::unit_factor(text, dimension, field); });
  }
  return 0;
}
