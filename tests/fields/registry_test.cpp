// The field registry keeps its own rules (include/breathbeat/fields/registry.hpp):
// the naming rule, unique ids and option names, old spellings that resolve,
// plausibility keys that exist, default units that parse, and the field tables
// of docs/trial-file.md that match it. These expectations are the project's
// own conventions (common practice, no source), not published values.
#include <gtest/gtest.h>

#include <fstream>
#include <map>
#include <set>
#include <sstream>
#include <string>
#include <tuple>

#include "breathbeat/fields/registry.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {
namespace {

std::string dashed(std::string_view id) {
  std::string s = "--" + std::string(id);
  for (auto& c : s) {
    if (c == '_') c = '-';
  }
  return s;
}

std::vector<std::string> split(std::string_view s, char sep) {
  std::vector<std::string> out;
  if (s.empty()) return out;
  std::size_t start = 0;
  while (true) {
    const auto end = s.find(sep, start);
    out.emplace_back(s.substr(start, end == std::string_view::npos ? end : end - start));
    if (end == std::string_view::npos) return out;
    start = end + 1;
  }
}

// One old spelling of a field: as written, and whether it has the opposite polarity.
struct Alias {
  std::string spelling;
  bool inverted = false;
  bool choice_word = false;  // "fluid=fluid_challenge"
};
std::vector<Alias> aliases_of(const FieldSpec& f) {
  std::vector<Alias> out;
  for (std::string a : split(f.aliases, ',')) {
    Alias alias;
    if (!a.empty() && a.front() == '!') {
      alias.inverted = true;
      a.erase(a.begin());
    }
    alias.choice_word = a.find('=') != std::string::npos;
    alias.spelling = a;
    out.push_back(alias);
  }
  return out;
}

bool is_option(const std::string& s) {
  return s.rfind("--", 0) == 0;
}

TEST(Registry, OptionIsTheIdWithDashesAndFlagsHaveTwoOptions) {
  for (const FieldSpec& f : all_fields()) {
    SCOPED_TRACE(std::string(f.id));
    if (f.kind == FieldKind::flag) {
      EXPECT_TRUE(is_option(std::string(f.yes)));
      EXPECT_TRUE(is_option(std::string(f.no)));
      EXPECT_NE(f.yes, f.no);
      EXPECT_EQ(option_name(f), f.yes);
    } else {
      EXPECT_TRUE(f.yes.empty() && f.no.empty());
      EXPECT_EQ(option_name(f), dashed(f.id));
    }
    if (f.kind == FieldKind::choice) EXPECT_FALSE(f.choices.empty());
  }
}

TEST(Registry, IdsAndOptionNamesAreUnique) {
  std::set<std::string_view> ids;
  std::map<std::string, std::string> option_owner;
  auto claim = [&](const std::string& option, std::string_view id) {
    const auto [it, fresh] = option_owner.emplace(option, std::string(id));
    EXPECT_TRUE(fresh) << option << " is used by " << it->second << " and " << id;
  };
  for (const FieldSpec& f : all_fields()) {
    EXPECT_TRUE(ids.insert(f.id).second) << "id " << f.id << " is declared twice";
    if (f.kind == FieldKind::flag) {
      claim(std::string(f.yes), f.id);
      claim(std::string(f.no), f.id);
    } else {
      claim(option_name(f), f.id);
    }
    for (const Alias& a : aliases_of(f)) {
      if (is_option(a.spelling)) claim(a.spelling, f.id);
    }
  }
}

TEST(Registry, FileKeysAreUniqueWithinTheirTable) {
  std::map<std::pair<std::string, std::string>, std::string> owner;
  for (const FieldSpec& f : all_fields()) {
    if (f.table.empty()) continue;
    std::vector<std::string> keys = {std::string(file_key(f))};
    for (const Alias& a : aliases_of(f)) {
      if (!a.choice_word && !is_option(a.spelling)) keys.push_back(a.spelling);
    }
    for (const std::string& key : keys) {
      const auto [it, fresh] = owner.emplace(std::make_pair(std::string(f.table), key), f.id);
      EXPECT_TRUE(fresh) << "[" << f.table << "] " << key << " is used by " << it->second << " and "
                         << f.id;
    }
  }
}

TEST(Registry, EveryOldSpellingResolvesToItsField) {
  for (const FieldSpec& f : all_fields()) {
    for (const Alias& a : aliases_of(f)) {
      SCOPED_TRACE(std::string(f.id) + " alias " + a.spelling);
      if (a.choice_word) {
        const auto eq = a.spelling.find('=');
        const std::string old_word = a.spelling.substr(0, eq);
        const std::string now = a.spelling.substr(eq + 1);
        const auto words = choice_words(f);
        EXPECT_NE(std::find(words.begin(), words.end(), now), words.end());
        EXPECT_EQ(match_choice(f, old_word), now);
        continue;
      }
      const auto hit = resolve_alias(a.spelling, is_option(a.spelling) ? "" : f.table);
      ASSERT_TRUE(hit.has_value());
      EXPECT_EQ(hit->field, &f);
      EXPECT_EQ(hit->inverted, a.inverted);
      EXPECT_FALSE(deprecation_note(a.spelling, *hit, FieldContext::command_line).empty());
    }
  }
  // The renames of issue 6 ("each fact declared once"), spot-checked.
  EXPECT_EQ(resolve_alias("--peep")->field->id, "peep_total");
  EXPECT_EQ(resolve_alias("--cycles")->field->id, "pp_cycles");
  EXPECT_TRUE(resolve_alias("spontaneous_effort", "circulation")->inverted);
  EXPECT_TRUE(resolve_alias("chest_open", "circulation")->inverted);
  EXPECT_FALSE(resolve_alias("rhythm_regular", "circulation")->inverted);
  EXPECT_FALSE(resolve_alias("rhythm_regular", "hold").has_value());
}

TEST(Registry, ChoiceWordsMatchWithoutCaseOrDashes) {
  EXPECT_EQ(match_choice(field_spec("kind"), "VT-Challenge"), "vt_challenge");
  EXPECT_EQ(match_choice(field_spec("sex"), "Male"), "male");
  EXPECT_EQ(match_choice(field_spec("mode"), "PC"), "pc");
  EXPECT_FALSE(match_choice(field_spec("mode"), "pcv").has_value());
}

TEST(Registry, EveryPlausibilityKeyIsInThePresets) {
  const Thresholds t = Thresholds::built_in();
  for (const FieldSpec& f : all_fields()) {
    if (f.plausibility.empty()) continue;
    SCOPED_TRACE(std::string(f.id) + " plausibility " + std::string(f.plausibility));
    const auto range = t.plausible_range(f.plausibility);
    ASSERT_TRUE(range.has_value());
    // The range's unit must be one of the field's dimension (check_plausible converts it).
    if (f.kind == FieldKind::quantity && f.dimension != Dimension::number &&
        f.dimension != Dimension::fraction) {
      EXPECT_NO_THROW(unit_factor(range->unit, f.dimension, Field{f.id, ""})) << range->unit;
    }
  }
}

TEST(Registry, EveryDefaultUnitParsesForItsDimension) {
  for (const FieldSpec& f : all_fields()) {
    if (f.kind != FieldKind::quantity) continue;
    SCOPED_TRACE(std::string(f.id) + " default unit " + std::string(f.default_unit));
    if (f.dimension == Dimension::number) {
      EXPECT_TRUE(f.default_unit.empty()) << "a plain number has no unit";
      continue;
    }
    ASSERT_FALSE(f.default_unit.empty());
    EXPECT_NO_THROW(unit_factor(f.default_unit, f.dimension, Field{f.id, ""}));
    // A bare number is read in the default unit: "1" is one default unit.
    EXPECT_NO_THROW(parse_in_si("1", f.dimension, Field{f.id, f.default_unit}));
  }
}

TEST(Registry, FileNamesOfFields) {
  EXPECT_EQ(file_path(field_spec("peep_total")), "hold.peep_total");
  EXPECT_EQ(file_path(field_spec("release_vt")), "peep_release.vt");
  EXPECT_EQ(file_path(field_spec("label")), "label");
  EXPECT_EQ(field_name("pplat", FieldContext::trial_file), "hold.pplat");
  EXPECT_EQ(field_name("pplat", FieldContext::command_line), "--pplat");
}

// ---- docs/trial-file.md --------------------------------------------------------

std::string trim(std::string s) {
  const auto b = s.find_first_not_of(" \t");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t");
  return s.substr(b, e - b + 1);
}

// The registry table a caption such as "`[step.preload.<test>]`, where ..." names.
std::string table_of_caption(const std::string& line) {
  const auto open = line.find('`');
  const auto close = line.find('`', open + 1);
  std::string name = line.substr(open + 1, close - open - 1);
  while (!name.empty() && name.front() == '[') name.erase(name.begin());
  while (!name.empty() && name.back() == ']') name.pop_back();
  if (name.rfind("step.preload.", 0) == 0) return "preload.*";
  if (name.rfind("step.", 0) == 0) return name.substr(5);
  return name;  // "patient", "step"
}

using Row = std::tuple<std::string, std::string, std::string>;  // table, key, default unit

// Every row of every "| key | default unit | meaning |" table, with the table
// named by the caption line above it.
std::multiset<Row> documented_fields(const std::string& path) {
  std::ifstream in(path);
  EXPECT_TRUE(in) << "cannot read " << path;
  std::vector<std::string> lines;
  for (std::string line; std::getline(in, line);) lines.push_back(line);
  std::multiset<Row> rows;
  for (std::size_t i = 0; i < lines.size(); ++i) {
    if (lines[i].rfind("| key | default unit | meaning |", 0) != 0) continue;
    std::string caption;
    for (std::size_t j = i; j-- > 0;) {
      if (lines[j].rfind("`[", 0) == 0) {
        caption = lines[j];
        break;
      }
    }
    EXPECT_FALSE(caption.empty()) << "a field table without a `[table]` caption, line " << i + 1;
    const std::string table = table_of_caption(caption);
    for (std::size_t k = i + 2; k < lines.size() && lines[k].rfind("|", 0) == 0; ++k) {
      const auto cells = split(lines[k], '|');  // "", key, unit, meaning..., ""
      if (cells.size() < 4) {
        ADD_FAILURE() << "short row, line " << k + 1;
        continue;
      }
      std::string key = trim(cells[1]);
      if (key.size() >= 2 && key.front() == '`' && key.back() == '`')
        key = key.substr(1, key.size() - 2);
      rows.emplace(table, key, trim(cells[2]));
    }
  }
  return rows;
}

TEST(RegistryDocs, TrialFileTablesListExactlyTheRegistryFields) {
  const std::multiset<Row> documented =
      documented_fields(std::string(BREATHBEAT_SOURCE_DIR) + "/docs/trial-file.md");
  std::multiset<Row> registry;
  for (const FieldSpec& f : all_fields()) {
    if (f.table.empty()) continue;
    registry.emplace(std::string(f.table), std::string(file_key(f)), std::string(f.default_unit));
  }
  for (const Row& r : registry) {
    EXPECT_EQ(documented.count(r), 1u)
        << "docs/trial-file.md: [" << std::get<0>(r) << "] `" << std::get<1>(r) << "` | "
        << std::get<2>(r) << " should appear once";
  }
  for (const Row& r : documented) {
    EXPECT_EQ(registry.count(r), 1u)
        << "docs/trial-file.md lists [" << std::get<0>(r) << "] `" << std::get<1>(r) << "` | "
        << std::get<2>(r) << ", which is not a registry field with that key and default unit";
  }
}

}  // namespace
}  // namespace bb
