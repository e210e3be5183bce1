// The field registry: the one declaration of every input breathbeat reads.
//
// Each entry gives a fact one name (`id`) and everything said about it: where
// it sits in a trial file, its command-line option, its dimension and default
// unit, its plausibility range, its label and its help text. The calculators'
// options, the trial-file reader, `trial add-step`, the input echo of every
// output and the field tables of docs/trial-file.md all come from here.
//
// Naming rule, checked by tests/fields: the option is "--" + id with '_' as
// '-'; the trial-file key is the id (or `key` inside a sub-record); the JSON
// input key is the id. A true/false fact has one polarity: `yes`/`no` are the
// two options that state it (e.g. --passive / --effort). Old spellings are
// `aliases`: they keep working and print a one-line deprecation note.
//
// Physiology never includes this header; it names fields by id only (see
// Need in breathbeat/answer.hpp and InputError::field()).
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/units_parse.hpp"

namespace bb {

enum class FieldKind {
  quantity,  // a number with a unit (parse_quantity)
  number,    // a plain number (age in years, RQ)
  choice,    // one word of `choices`
  flag,      // a true/false fact, stated by `yes` or `no`
  text,      // free text (CO method, drug name, labels)
  list,      // structured text read by its area's parser (pp_cycles, beats, I:E)
};

// Where a value is written: on the command line, in a trial file, or printed.
enum class FieldContext { command_line, trial_file };

struct FieldSpec {
  std::string_view id = {};  // the one name: JSON key, file key, option stem
  FieldKind kind = FieldKind::quantity;
  std::string_view table = {};  // trial-file table of a step ("hold"), "patient", a
                                // sub-record ("preload.*", "infusion", "peep_release",
                                // "waveform"), or "" when the field is not in trial files
  std::string_view key = {};    // file key inside `table` when it differs from id ("" = id)
  Dimension dimension = Dimension::number;  // quantity fields
  std::string_view default_unit = {};       // unit of a bare number ("" = none)
  std::string_view plausibility = {};       // presets/plausibility.toml key ("" = none)
  std::string_view label = {};              // people's name, without unit: "Plateau pressure"
  std::string_view help = {};               // one line for --help and docs
  std::string_view choices = {};            // choice fields: "vc,pc"
  std::string_view yes = {};                // flag fields: option stating true ("--passive")
  std::string_view no = {};                 // flag fields: option stating false ("--effort")
  // Old spellings, comma-separated: options ("--peep") or file keys
  // ("spontaneous_effort"). A leading '!' marks an alias of the opposite
  // polarity ("!spontaneous_effort" = true means passive is false).
  std::string_view aliases = {};
  // Choice fields: old words that no longer say enough, each with the words it
  // may stand for ("spontaneous=assisted|unassisted"); refused, asking which.
  std::string_view unclear = {};
};

// Every field, in the order of docs/trial-file.md.
std::span<const FieldSpec> all_fields();

// The entry of `id`; throws std::logic_error for an id not in the registry
// (a programming error, caught by tests).
const FieldSpec& field_spec(std::string_view id);
const FieldSpec* find_field(std::string_view id);

// The option of a field ("--pes-ee"); for flags the `yes` option.
std::string option_name(const FieldSpec& f);
// The file key inside its table ("peep_total", "vt" for peep_release_vt).
std::string_view file_key(const FieldSpec& f);
// "hold.pplat"; "" for fields not in trial files.
std::string file_path(const FieldSpec& f);

// How a field is named to the user in a context: "--pplat" or "hold.pplat";
// falls back to the id for a field with no name in that context.
std::string field_name(std::string_view id, FieldContext context);

// What an old spelling now is: the field, and whether it states the opposite
// polarity. `spelling` is an option ("--peep") or a file key ("rhythm_regular").
struct AliasHit {
  const FieldSpec* field = nullptr;
  bool inverted = false;
};
std::optional<AliasHit> resolve_alias(std::string_view spelling, std::string_view table = {});

// The one-line note printed on stderr when an old spelling is used.
std::string deprecation_note(std::string_view spelling, const AliasHit& hit, FieldContext context);
// The same note for any old spelling `spelling` of the name `now` (an option that is no field).
std::string old_spelling_note(std::string_view spelling, std::string_view now,
                              std::string_view polarity = {});

// The fields of one trial-file table, in registry order.
std::vector<const FieldSpec*> fields_of_table(std::string_view table);

// The accepted words of a choice field.
std::vector<std::string> choice_words(const FieldSpec& f);

// A choice word as the user typed it, matched without regard to case or to
// '-' versus '_' ("VT-Challenge" is vt_challenge); nullopt when none matches.
std::optional<std::string> match_choice(const FieldSpec& f, std::string_view typed);

// The choice words an unclear old word may stand for (FieldSpec::unclear,
// matched like match_choice); empty when `typed` is not one.
std::vector<std::string> unclear_choice(const FieldSpec& f, std::string_view typed);
// The problem with an unclear word, for InputError (the field's help is what
// is expected): "may mean 'assisted' or 'unassisted'; say which is meant".
std::string unclear_choice_problem(const std::vector<std::string>& meant);

}  // namespace bb
