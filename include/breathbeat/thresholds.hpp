// Thresholds are data: every cut-off and plausibility range the library uses
// lives in presets/thresholds/*.toml and presets/plausibility.toml with its
// published source. A site file given with --thresholds (or named in a trial
// file) overrides any of them without recompiling.
//
// An entry is a TOML table with `value`, `unit` and `source`:
//   [ppv.responsive_above]
//   value = 13
//   unit = "%"
//   source = "Michard et al., Am J Respir Crit Care Med 2000;162:134"
// and is read by its dotted key, "ppv.responsive_above".
// A plausibility range is [plausibility.<field>] with `min`, `max`, `unit`.
#pragma once

#include <filesystem>
#include <map>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {

struct ThresholdEntry {
  double value = 0.0;  // as written, in `unit`
  std::string unit;    // as written ("" for plain numbers)
  std::string source;
  std::string origin;  // "built-in presets/thresholds/ppv.toml" or the site file
};

// Which way a failed validity condition biases an index: [bias.<index>.<gate>]
// with `bias` ("falsely_low", "falsely_high" or "either") and `source`.
struct BiasEntry {
  std::string direction;
  std::string source;
  std::string origin;
};

struct PlausibleRange {
  double min = 0.0;
  double max = 0.0;
  std::string unit;
  std::string source;
};

class Thresholds {
 public:
  // The built-in presets.
  static Thresholds built_in();

  // Overrides from a site file; every key must already exist and keep its
  // dimension. Throws InputError located at file:line:column.
  void load_overrides(const std::filesystem::path& file);
  void load_overrides_text(std::string_view text, const std::string& name);

  // The threshold `key` as a quantity; throws std::logic_error if the key is
  // not defined (a programming error, covered by tests).
  template <class Q>
  Q get(std::string_view key) const {
    const ThresholdEntry& e = entry(key);
    return Q::from_value(to_si(e, DimensionOf<Q>::value, key));
  }
  double number(std::string_view key) const;
  const ThresholdEntry& entry(std::string_view key) const;
  const std::string& source(std::string_view key) const { return entry(key).source; }
  bool has(std::string_view key) const;
  const std::map<std::string, ThresholdEntry, std::less<>>& entries() const { return entries_; }
  // The bias entry "bias.<index>.<gate>", or nullptr.
  const BiasEntry* bias(std::string_view key) const;

  // Plausibility: when allowed, out-of-range values pass (the user says the
  // value is real); otherwise check_plausible throws an InputError naming the
  // field, the value, its unit and the accepted range.
  void allow_implausible(bool allow) { allow_implausible_ = allow; }
  bool implausible_allowed() const { return allow_implausible_; }
  std::optional<PlausibleRange> plausible_range(std::string_view field) const;

  template <class Q>
  void check_plausible(std::string_view field, Q value) const {
    check_plausible_si(field, value.value(), DimensionOf<Q>::value);
  }
  void check_plausible_si(std::string_view field, double value_in_si, Dimension dimension) const;
  // For a bare number `text` refused as implausible for `field` in `default_unit`:
  // each unit that would place it in the range ("kPa" for 9.1 as a PaO2); empty
  // when a unit was typed or no unit fits.
  std::vector<std::string> units_meant(std::string_view field, std::string_view text,
                                       Dimension dimension, std::string_view default_unit) const;

 private:
  static double to_si(const ThresholdEntry& e, Dimension dimension, std::string_view key);
  void load_text(std::string_view text, const std::string& name, bool overriding);
  void load_bias(const std::string& key, const std::string& word, std::string source,
                 const SourcePlace& place, const std::string& name, bool overriding);

  std::map<std::string, ThresholdEntry, std::less<>> entries_;
  std::map<std::string, PlausibleRange, std::less<>> ranges_;
  std::map<std::string, BiasEntry, std::less<>> biases_;
  bool allow_implausible_ = false;
};

}  // namespace bb
