// Shared plumbing for the command line: options that take quantities with
// units, the common output flags, and printing an Answer. No physiology here.
#pragma once

#include <CLI/CLI.hpp>
#include <map>
#include <memory>
#include <optional>
#include <string>

#include "breathbeat/output.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb::cli {

// Options whose values are quantities typed by the user ("25", "2.45kPa").
// Each is registered as --<name> (underscores become dashes) and parsed only
// after CLI11 has read the command line, so a bad value names its field.
class FieldOptions {
 public:
  explicit FieldOptions(CLI::App* app) : app_(app) {}

  // `field` is the plausibility key too (e.g. "peep" for --peep).
  CLI::Option* add(const std::string& field, const std::string& default_unit,
                   const std::string& help, const std::string& flag = "");

  template <class Q>
  std::optional<Q> get(const std::string& field) const {
    const Entry& e = entry(field);
    if (e.text.empty() && !e.option->count()) return std::nullopt;
    return parse_quantity<Q>(e.text, Field{e.flag, e.default_unit});
  }
  std::optional<double> number(const std::string& field) const;
  bool given(const std::string& field) const { return entry(field).option->count() > 0; }

 private:
  struct Entry {
    std::string flag;
    std::string default_unit;
    std::string text;
    CLI::Option* option = nullptr;
  };
  const Entry& entry(const std::string& field) const;
  CLI::App* app_;
  std::map<std::string, std::unique_ptr<Entry>> entries_;
};

// --json, --thresholds FILE, --allow-implausible: on every calculator.
struct CommonOptions {
  bool json = false;
  std::string thresholds_file;
  bool allow_implausible = false;
};
void add_common_options(CLI::App* app, CommonOptions& common);

// Built-in thresholds, with the site file and plausibility override applied.
Thresholds load_thresholds(const CommonOptions& common);

// Prints the answer as text or JSON on stdout.
void print_answer(const Answer& answer, const CommonOptions& common);

// A condition stated with one of two opposite flags (--iah / --no-iah), or not
// at all: value() is then empty and the condition is reported as unknown.
struct FlagPair {
  bool yes = false;
  bool no = false;
  std::optional<bool> value() const {
    if (yes) return true;
    if (no) return false;
    return std::nullopt;
  }
};
// Registers the two flags; giving both is a usage error (exit 2).
void add_flag_pair(CLI::App* app, FlagPair& pair, const std::string& yes, const std::string& no,
                   const std::string& yes_help, const std::string& no_help);

// Sex from "male"/"female"/"m"/"f"; throws InputError.
enum class SexWord { male, female };
SexWord parse_sex_word(const std::string& text);

}  // namespace bb::cli
