// Fuzz target: the trial-file loader (load_trial_text): TOML parsing, the
// field registry, units, plausibility and contradiction checks.
#include <string>
#include <string_view>

#include "breathbeat/trial/trial_file.hpp"
#include "fuzz_support.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  bb::TrialReadOptions options;
  bb::fuzz::expect_input_errors_only(
      [&] { (void)bb::load_trial_text(text, "fuzz.toml", options); });
  options.require_steps = false;
  options.allow_implausible = true;
  bb::fuzz::expect_input_errors_only(
      [&] { (void)bb::load_trial_text(text, "fuzz.toml", options); });
  return 0;
}
