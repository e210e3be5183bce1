// Shared plumbing for the command line: options that take quantities with
// units, the common output flags, and printing an Answer. No physiology here.
#pragma once

#include <CLI/CLI.hpp>
#include <map>
#include <memory>
#include <optional>
#include <string>

#include "breathbeat/answer.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb::cli {

// The options of one command, declared by the field registry
// (breathbeat/fields/registry.hpp): `add("pes_ee")` registers --pes-ee with the
// registry's help and default unit, plus its old spellings as hidden aliases
// (a deprecation note on stderr when one is used). Values are parsed only after
// CLI11 has read the command line, so a bad value names its option.
class FieldOptions {
 public:
  explicit FieldOptions(CLI::App* app) : app_(app) {}

  // Registers the field's option(s); for a flag field both of its options.
  CLI::Option* add(std::string_view id);
  // The same, with a help text more specific to this command than the registry's.
  CLI::Option* add(std::string_view id, const std::string& help);
  // A field that may be given several times (--infusion); read with texts().
  CLI::Option* add_repeated(std::string_view id);
  // A parameter of a tool that is not a fact about the patient (the settings of
  // `wave synth`): never in a trial file, a report or the registry.
  CLI::Option* add_parameter(std::string_view name, Dimension dimension,
                             std::string_view default_unit, const std::string& help);

  template <class Q>
  std::optional<Q> get(std::string_view id) const {
    const std::optional<std::string> t = raw(id);
    if (!t) return std::nullopt;
    const Entry& e = entry(id);
    return parse_quantity<Q>(*t, Field{e.shown_name, e.spec->default_unit});
  }
  // A plain number (age, RQ).
  std::optional<double> number(std::string_view id) const;
  // A choice word, matched without case and '-' vs '_'; an unknown word is an
  // InputError listing the choices (with a did-you-mean).
  std::optional<std::string> choice(std::string_view id) const;
  // A true/false fact: true for the `yes` option, false for `no`, nullopt if neither.
  std::optional<bool> flag(std::string_view id) const;
  // Free or structured text as typed.
  std::optional<std::string> text(std::string_view id) const;
  // Every value of a field added with add_repeated, in the order typed.
  const std::vector<std::string>& texts(std::string_view id) const { return entry(id).texts; }
  bool given(std::string_view id) const;
  // The option name the user typed (an alias if they used one).
  const std::string& shown_name(std::string_view id) const { return entry(id).shown_name; }

 private:
  struct Entry {
    const FieldSpec* spec = nullptr;
    std::unique_ptr<FieldSpec> own_spec;  // add_parameter
    std::string own_id, own_unit;
    std::string text;
    std::vector<std::string> texts;  // add_repeated
    CLI::Option* option = nullptr;
    bool yes = false, no = false;  // flag fields
    std::vector<std::pair<std::string, std::unique_ptr<std::string>>> alias_texts;
    std::vector<std::pair<std::string, std::unique_ptr<bool>>> alias_flags;  // "!" = inverted
    mutable std::string shown_name;
  };
  const Entry& entry(std::string_view id) const;
  std::optional<std::string> raw(std::string_view id) const;
  CLI::App* app_;
  std::map<std::string, std::unique_ptr<Entry>, std::less<>> entries_;
};

// --json, --thresholds FILE, --allow-implausible: on every calculator.
struct CommonOptions {
  bool json = false;
  std::string thresholds_file;
  bool allow_implausible = false;
};
void add_common_options(CLI::App* app, CommonOptions& common);

// Reads a site thresholds file (--thresholds) onto `t`; a file that cannot be
// opened is reported against the option.
void load_site_thresholds(Thresholds& t, const std::string& file);

// Built-in thresholds, with the site file and plausibility override applied.
Thresholds load_thresholds(const CommonOptions& common);

// Prints the answer as text or JSON on stdout.
void print_answer(const Answer& answer, const CommonOptions& common);

// The trial's analysis against the step labelled `reference` (the first step
// when empty); an unknown label is an error naming --reference.
TrialAnalysis analyse_with_reference(const LoadedTrial& loaded, const std::string& reference);

// A field the command cannot do without: refused, with the field's help, when absent.
template <class T>
void require_field(const std::optional<T>& value, const char* id) {
  if (value) return;
  throw InputError(id, "", "is required", std::string(field_spec(id).help));
}

}  // namespace bb::cli
