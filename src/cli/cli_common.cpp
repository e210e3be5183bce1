#include "cli_common.hpp"

#include <iostream>

#include "breathbeat/present/json.hpp"
#include "breathbeat/present/text.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb::cli {

namespace {

std::string help_of(const FieldSpec& f, const std::string& help) {
  std::string text = help.empty() ? std::string(f.help) : help;
  if (f.kind == FieldKind::choice) text += " (" + std::string(f.choices) + ")";
  if (!f.default_unit.empty() && f.kind != FieldKind::flag)
    text += " [default unit " + std::string(f.default_unit) + "]";
  return text;
}

void say_deprecated(const std::string& spelling, const AliasHit& hit) {
  std::cerr << "breathbeat: " << deprecation_note(spelling, hit, FieldContext::command_line)
            << "\n";
}

}  // namespace

CLI::Option* FieldOptions::add(std::string_view id) {
  return add(id, "");
}

CLI::Option* FieldOptions::add(std::string_view id, const std::string& help) {
  const FieldSpec& f = field_spec(id);
  auto e = std::make_unique<Entry>();
  e->spec = &f;
  e->shown_name = option_name(f);
  if (f.kind == FieldKind::flag) {
    CLI::Option* y = app_->add_flag(std::string(f.yes), e->yes, help_of(f, help));
    CLI::Option* n =
        app_->add_flag(std::string(f.no), e->no, "the opposite of " + std::string(f.yes));
    y->excludes(n);
    e->option = y;
  } else {
    e->option = app_->add_option(option_name(f), e->text, help_of(f, help));
  }
  for (std::string_view a : split_view(f.aliases, ',')) {
    if (a.find('=') != std::string_view::npos) continue;  // an old choice word
    const bool inverted = !a.empty() && a.front() == '!';
    if (inverted) a.remove_prefix(1);
    if (a.rfind("--", 0) != 0) continue;  // a file key
    const std::string name(a);
    if (f.kind == FieldKind::flag) {
      auto value = std::make_unique<bool>(false);
      app_->add_flag(name, *value, "")->group("");
      e->alias_flags.emplace_back((inverted ? "!" : "") + name, std::move(value));
    } else {
      auto value = std::make_unique<std::string>();
      app_->add_option(name, *value, "")->group("");
      e->alias_texts.emplace_back(name, std::move(value));
    }
  }
  CLI::Option* opt = e->option;
  entries_[std::string(id)] = std::move(e);
  return opt;
}

CLI::Option* FieldOptions::add_repeated(std::string_view id) {
  const FieldSpec& f = field_spec(id);
  auto e = std::make_unique<Entry>();
  e->spec = &f;
  e->shown_name = option_name(f);
  e->option = app_->add_option(option_name(f), e->texts, help_of(f, ""));
  CLI::Option* opt = e->option;
  entries_[std::string(id)] = std::move(e);
  return opt;
}

CLI::Option* FieldOptions::add_parameter(std::string_view name, Dimension dimension,
                                         std::string_view default_unit, const std::string& help) {
  auto e = std::make_unique<Entry>();
  e->own_id = std::string(name);
  e->own_unit = std::string(default_unit);
  e->own_spec = std::make_unique<FieldSpec>();
  e->own_spec->id = e->own_id;
  e->own_spec->kind = dimension == Dimension::number ? FieldKind::number : FieldKind::quantity;
  e->own_spec->dimension = dimension;
  e->own_spec->default_unit = e->own_unit;
  e->spec = e->own_spec.get();
  e->shown_name = option_name(*e->spec);
  e->option = app_->add_option(e->shown_name, e->text, help_of(*e->spec, help));
  CLI::Option* opt = e->option;
  entries_[std::string(name)] = std::move(e);
  return opt;
}

const FieldOptions::Entry& FieldOptions::entry(std::string_view id) const {
  auto it = entries_.find(id);
  if (it == entries_.end())
    throw std::logic_error("no option registered for field " + std::string(id));
  return *it->second;
}

std::optional<std::string> FieldOptions::raw(std::string_view id) const {
  const Entry& e = entry(id);
  std::optional<std::string> out;
  if (e.option->count()) out = e.text;
  for (const auto& [name, value] : e.alias_texts) {
    if (!app_->get_option(name)->count()) continue;
    if (out) {
      throw InputError(e.shown_name, *value, "was given twice (also as " + name + ")",
                       "one value for " + option_name(*e.spec));
    }
    say_deprecated(name, AliasHit{e.spec, false});
    e.shown_name = name;
    out = *value;
  }
  return out;
}

bool FieldOptions::given(std::string_view id) const {
  const Entry& e = entry(id);
  if (e.spec->kind == FieldKind::flag) return flag(id).has_value();
  return raw(id).has_value();
}

std::optional<double> FieldOptions::number(std::string_view id) const {
  const auto t = raw(id);
  if (!t) return std::nullopt;
  return parse_number(*t, Field{entry(id).shown_name, ""});
}

std::optional<std::string> FieldOptions::text(std::string_view id) const {
  return raw(id);
}

std::optional<std::string> FieldOptions::choice(std::string_view id) const {
  const auto t = raw(id);
  if (!t) return std::nullopt;
  const Entry& e = entry(id);
  if (auto word = match_choice(*e.spec, *t)) return word;
  if (const auto meant = unclear_choice(*e.spec, *t); !meant.empty())
    throw InputError(e.shown_name, *t, unclear_choice_problem(meant), std::string(e.spec->help));
  std::string expected;
  for (const auto& w : choice_words(*e.spec)) expected += (expected.empty() ? "" : " or ") + w;
  if (auto near = closest_match(ascii_lower(*t), choice_words(*e.spec)))
    expected += " (did you mean '" + *near + "'?)";
  throw InputError(e.shown_name, *t, "is not a recognised choice", expected);
}

std::optional<bool> FieldOptions::flag(std::string_view id) const {
  const Entry& e = entry(id);
  std::optional<bool> out;
  std::string said;
  auto take = [&](bool value, const std::string& name) {
    if (out && *out != value) {
      throw InputError(said + "/" + name, "both", "were both given", "one of them");
    }
    out = value;
    said = name;
  };
  if (e.yes) take(true, std::string(e.spec->yes));
  if (e.no) take(false, std::string(e.spec->no));
  for (const auto& [name, value] : e.alias_flags) {
    if (!*value) continue;
    const bool inverted = name.front() == '!';
    const std::string spelled = inverted ? name.substr(1) : name;
    say_deprecated(spelled, AliasHit{e.spec, inverted});
    take(!inverted, spelled);
  }
  return out;
}

void add_common_options(CLI::App* app, CommonOptions& common) {
  app->add_flag("--json", common.json, "Print one JSON object instead of text");
  app->add_option("--thresholds", common.thresholds_file,
                  "Site thresholds file (TOML) overriding the built-in presets");
  app->add_flag("--allow-implausible", common.allow_implausible,
                "Accept values outside the plausible adult ranges (the value is real)");
}

void load_site_thresholds(Thresholds& t, const std::string& file) {
  try {
    t.load_overrides(file);
  } catch (const InputError& e) {
    // A file that cannot be opened is the option's problem; errors inside it carry their place.
    if (e.where()) throw;
    throw InputError("--thresholds", e.value(), e.problem(), e.expected());
  }
}

Thresholds load_thresholds(const CommonOptions& common) {
  Thresholds t = Thresholds::built_in();
  if (!common.thresholds_file.empty()) load_site_thresholds(t, common.thresholds_file);
  t.allow_implausible(common.allow_implausible);
  return t;
}

void print_answer(const Answer& answer, const CommonOptions& common) {
  // Text in the site's display units (presets/thresholds/display.toml); JSON in stored units.
  const std::string out = common.json
                              ? to_json(answer).dump(2) + "\n"
                              : to_text(answer, DisplayUnits::from(load_thresholds(common)));
  std::cout << out << std::flush;
}

TrialAnalysis analyse_with_reference(const LoadedTrial& loaded, const std::string& reference) {
  std::optional<std::string> label;
  if (!reference.empty()) label = reference;
  for (const TrialVoid& v : loaded.trial.voided) {
    if (v.step != reference) continue;
    throw InputError("--reference", reference,
                     "is a voided step (at " + v.place.file + ":" + std::to_string(v.place.line) +
                         ": " + v.reason + ")",
                     "the label of a step in force");
  }
  try {
    return analyse_trial(loaded.trial, loaded.limits, label);
  } catch (const InputError& e) {
    if (e.field() != "reference") throw;
    throw InputError("--reference", e.value(), e.problem(), e.expected());
  }
}

}  // namespace bb::cli
