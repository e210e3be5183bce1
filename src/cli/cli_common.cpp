#include "cli_common.hpp"

#include <iostream>

namespace bb::cli {

CLI::Option* FieldOptions::add(const std::string& field, const std::string& default_unit,
                               const std::string& help, const std::string& flag) {
  auto e = std::make_unique<Entry>();
  e->flag = flag.empty() ? "--" + field : flag;
  for (auto& c : e->flag) {
    if (c == '_') c = '-';
  }
  e->default_unit = default_unit;
  std::string text = help;
  if (!default_unit.empty()) text += " [default unit " + default_unit + "]";
  e->option = app_->add_option(e->flag, e->text, text);
  auto* opt = e->option;
  entries_[field] = std::move(e);
  return opt;
}

const FieldOptions::Entry& FieldOptions::entry(const std::string& field) const {
  auto it = entries_.find(field);
  if (it == entries_.end()) throw std::logic_error("no option registered for field " + field);
  return *it->second;
}

std::optional<double> FieldOptions::number(const std::string& field) const {
  const Entry& e = entry(field);
  if (!e.option->count()) return std::nullopt;
  return parse_number(e.text, Field{e.flag, ""});
}

void add_common_options(CLI::App* app, CommonOptions& common) {
  app->add_flag("--json", common.json, "Print one JSON object instead of text");
  app->add_option("--thresholds", common.thresholds_file,
                  "Site thresholds file (TOML) overriding the built-in presets");
  app->add_flag("--allow-implausible", common.allow_implausible,
                "Accept values outside the plausible adult ranges (the value is real)");
}

Thresholds load_thresholds(const CommonOptions& common) {
  Thresholds t = Thresholds::built_in();
  if (!common.thresholds_file.empty()) t.load_overrides(common.thresholds_file);
  t.allow_implausible(common.allow_implausible);
  return t;
}

void print_answer(const Answer& answer, const CommonOptions& common) {
  const std::string out = common.json ? to_json(answer).dump(2) + "\n" : to_text(answer);
  std::cout << out << std::flush;
}

void add_flag_pair(CLI::App* app, FlagPair& pair, const std::string& yes, const std::string& no,
                   const std::string& yes_help, const std::string& no_help) {
  CLI::Option* y = app->add_flag(yes, pair.yes, yes_help);
  CLI::Option* n = app->add_flag(no, pair.no, no_help);
  y->excludes(n);
}

SexWord parse_sex_word(const std::string& text) {
  if (text == "male" || text == "m" || text == "M") return SexWord::male;
  if (text == "female" || text == "f" || text == "F") return SexWord::female;
  throw InputError("--sex", text, "is not a recognised sex for the PBW formula", "male or female");
}

}  // namespace bb::cli
