#include "cli_suggest.hpp"

#include "breathbeat/fields/registry.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/thresholds.hpp"
#include "cli_common.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb::cli {

namespace {

std::string joined(const std::vector<std::string>& words, const std::string& separator) {
  std::string out;
  for (const std::string& w : words) out += (out.empty() ? "" : separator) + w;
  return out;
}

// "breathbeat calc mechanics".
std::string command_path(const CLI::App& leaf) {
  std::string out;
  for (const CLI::App* a = &leaf; a != nullptr; a = a->get_parent()) {
    out = a->get_name() + (out.empty() ? "" : " " + out);
  }
  return out;
}

// The options of a command; `hidden` selects the old spellings (group "").
std::vector<std::string> option_names(const CLI::App& command, bool hidden) {
  std::vector<std::string> out;
  for (const CLI::Option* o : command.get_options()) {
    if (o->get_group().empty() != hidden) continue;
    for (const std::string& l : o->get_lnames()) out.push_back("--" + l);
  }
  return out;
}

// The text typed for the option `name` of `command`, if it was given.
std::optional<std::string> typed_value(const CLI::App& command, const std::string& name) {
  const CLI::Option* o = command.get_option_no_throw(name);
  if (o == nullptr || o->count() == 0 || o->results().empty()) return std::nullopt;
  return o->results().back();
}

// The registry field an error names (by id, plausibility range or option),
// with the text typed for it on the command line.
struct TypedField {
  const FieldSpec* spec = nullptr;
  std::string option;
  std::string text;
};

std::optional<TypedField> typed_field(const InputError& e, const CLI::App& command) {
  for (const FieldSpec& f : all_fields()) {
    if (f.kind != FieldKind::quantity || f.plausibility.empty()) continue;
    std::vector<std::string> names{option_name(f)};
    for (std::string_view a : split_view(f.aliases, ','))
      if (a.rfind("--", 0) == 0) names.emplace_back(a);
    const bool named = e.field() == f.id || e.field() == f.plausibility ||
                       std::find(names.begin(), names.end(), e.field()) != names.end();
    if (!named) continue;
    for (const std::string& name : names) {
      if (auto text = typed_value(command, name)) return TypedField{&f, name, *text};
    }
  }
  return std::nullopt;
}

// The plausibility ranges the command used: built in, with its --thresholds file.
Thresholds command_thresholds(const CLI::App& command) {
  Thresholds t = Thresholds::built_in();
  if (auto file = typed_value(command, "--thresholds"); file && !file->empty())
    load_site_thresholds(t, *file);
  return t;
}

}  // namespace

CLI::Validator one_of(std::vector<std::string> words) {
  const std::string description = "{" + joined(words, ",") + "}";
  return CLI::Validator(
      [words](std::string& input) -> std::string {
        const std::string_view typed = trim_view(input);
        for (const std::string& w : words) {
          if (equals_ci(w, typed)) {
            input = w;
            return {};
          }
        }
        std::string message = "'" + input + "' is not one of " + joined(words, ", ");
        if (auto near = closest_match(ascii_lower(typed), words))
          message += " (did you mean '" + *near + "'?)";
        return message;
      },
      description);
}

const CLI::App& chosen_command(const CLI::App& app) {
  const CLI::App* a = &app;
  while (!a->get_subcommands().empty()) a = a->get_subcommands().front();
  return *a;
}

InputError unexpected_arguments(const CLI::App& app) {
  const CLI::App& command = chosen_command(app);
  const std::string path = command_path(command);
  const std::string help = path + " --help lists them";
  const std::vector<std::string> extra = app.remaining(true);
  for (const std::string& arg : extra) {
    if (arg.size() < 2 || arg[0] != '-' || (arg[1] >= '0' && arg[1] <= '9') || arg[1] == '.')
      continue;  // a value (also a negative number), not an option
    const std::string name = arg.substr(0, arg.find('='));
    std::optional<std::string> near = closest_match(name, option_names(command, false));
    if (!near) near = closest_match(name, option_names(command, true));
    return InputError(name, "", "is not an option of " + path,
                      near ? "one of its options: did you mean '" + *near + "'? (" + help + ")"
                           : "one of its options (" + help + ")");
  }
  std::vector<std::string> subcommands;
  for (const CLI::App* s : command.get_subcommands({})) subcommands.push_back(s->get_name());
  if (!subcommands.empty() && !extra.empty()) {
    std::string expected = "one of " + joined(subcommands, ", ");
    if (auto near = closest_match(ascii_lower(extra.front()), subcommands))
      expected += " (did you mean '" + *near + "'?)";
    return InputError(path, extra.front(), "is not a command of " + path, expected);
  }
  return InputError(
      "", joined(extra, " "), "was not expected by " + path,
      "each value after its option, e.g. --pplat 25 (" + path + " --help lists the options)");
}

InputError with_unit_suggestion(const InputError& e, const CLI::App& app) {
  if (e.where() || e.problem().rfind("is outside the plausible range", 0) != 0) return e;
  // The trial reader already suggested a unit (trial add-step).
  if (e.problem().find("for a bare number") != std::string::npos) return e;
  try {
    const CLI::App& command = chosen_command(app);
    const std::optional<TypedField> typed = typed_field(e, command);
    if (!typed) return e;
    const FieldSpec& f = *typed->spec;
    std::vector<std::string> meant;
    for (const std::string& unit : command_thresholds(command).units_meant(
             f.plausibility, typed->text, f.dimension, f.default_unit)) {
      meant.push_back(std::string(trim_view(typed->text)) + unit);
    }
    if (meant.empty()) return e;
    return InputError(
        typed->option, e.value(),
        e.problem() + " for a bare number, which is read as " + std::string(f.default_unit),
        e.expected() + "; did you mean " + joined(meant, " or ") + "?");
  } catch (const std::exception&) {
    return e;  // no suggestion rather than a second error
  }
}

std::vector<InputError> implausible_beside(const InputError& first, const CLI::App& app) {
  if (first.where() || first.problem().rfind("is outside the plausible range", 0) != 0) return {};
  std::vector<InputError> out;
  try {
    const CLI::App& command = chosen_command(app);
    const std::optional<TypedField> named = typed_field(first, command);
    if (!named) return {};
    const Thresholds limits = command_thresholds(command);
    for (const FieldSpec& f : all_fields()) {
      if (f.kind != FieldKind::quantity || f.plausibility.empty() || &f == named->spec) continue;
      // PPV and SVV are read as percentage points by their commands, not as fractions.
      if (f.plausibility == "ppv" || f.plausibility == "svv") continue;
      const std::string name = option_name(f);
      const std::optional<std::string> text = typed_value(command, name);
      if (!text) continue;
      try {
        const double si = parse_in_si(*text, f.dimension, Field{name, f.default_unit});
        limits.check_plausible_si(f.plausibility, si, f.dimension);
      } catch (const InputError& e) {
        if (e.problem().rfind("is outside the plausible range", 0) == 0)
          out.emplace_back(name, e.value(), e.problem(), e.expected());
      }
    }
  } catch (const std::exception&) {
    return {};  // the first error alone rather than a second failure
  }
  return out;
}

}  // namespace bb::cli
