// The one set of string helpers (trim, split, case folding, did-you-mean).
// Every module uses these instead of re-typing its own.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace bb {

// ASCII only: bedside inputs are ASCII words; other bytes are left as they are.
constexpr char ascii_lower(char c) {
  return c >= 'A' && c <= 'Z' ? static_cast<char>(c - 'A' + 'a') : c;
}
std::string ascii_lower(std::string_view s);

// Without leading and trailing spaces, tabs, CR and LF.
std::string_view trim_view(std::string_view s);
std::string trim(std::string_view s);

// The pieces between separators (empty pieces kept; "" gives no pieces).
std::vector<std::string_view> split_view(std::string_view s, char separator);

bool starts_with_ci(std::string_view s, std::string_view prefix);
bool equals_ci(std::string_view a, std::string_view b);

// A number with a fixed count of decimals, rounded half away from zero, never
// "-0" ("15.0", "0.30"): every number breathbeat prints goes through this.
std::string format_number(double v, int decimals);
// `v` with `decimals`, or with up to three more when it would print the same as
// `cut` though it differs from it: "8.03 is above 8.0", never "8.0 is above 8.0".
std::string format_deciding(double v, double cut, int decimals);

// Did-you-mean: the closest of `candidates` to `word` by edit distance, letters
// compared without regard to case ("peep 12" finds "PEEP 12"), if close enough
// to be a likely typo; or the only candidate that begins with `word` (two letters
// or more, leading dashes not counted): "--vt" finds "--vt-per-kg".
std::optional<std::string> closest_match(std::string_view word,
                                         const std::vector<std::string>& candidates);

}  // namespace bb
