// The catalogue's wrong-dimension cases, generated from the field registry:
// every field with a unit that a trial file can hold is given a number in a
// unit of another dimension, and the trial reader must refuse it, naming the
// field by its path in the file and its place (file:line:column).
#include <gtest/gtest.h>

#include <string>

#include "breathbeat/errors.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb {
namespace {

bool has_unit(const FieldSpec& f) {
  return f.kind == FieldKind::quantity || (f.kind == FieldKind::text && !f.default_unit.empty());
}

// A unit of another dimension than the field's (mass for all but mass fields).
std::string wrong_unit(const FieldSpec& f) {
  return f.kind == FieldKind::quantity && f.dimension == Dimension::mass ? "cmH2O" : "kg";
}

// The [[step]] sub-table a preload-test field belongs to.
std::string preload_kind(std::string_view id) {
  if (id == "volume" || id == "duration") return "fluid_challenge";
  if (id == "hold") return "eeo";
  if (id == "vt_before" || id == "vt_after") return "vt_challenge";
  return "plr";
}

// A trial text with `f` (and what its table needs around it) set to `value`.
std::string trial_with(const FieldSpec& f, const std::string& value) {
  const std::string key(file_key(f));
  const std::string line = key + " = \"" + value + "\"\n";
  std::string text = "[patient]\nsex = \"male\"\n";
  if (f.table == "patient") {
    if (f.id != "height") text += "height = 175\n";
    return text + line + "\n[[step]]\nlabel = \"A\"\n";
  }
  text += "height = 175\n\n[[step]]\nlabel = \"A\"\n\n";
  const std::string table(f.table);
  if (table == "preload.*") return text + "[step.preload." + preload_kind(f.id) + "]\n" + line;
  if (table == "infusion") return text + "[[step.infusion]]\ndrug = \"norepinephrine\"\n" + line;
  return text + "[step." + table + "]\n" + line;
}

TEST(WrongDimension, EveryFieldWithAUnitIsRefusedWithItsPathAndPlace) {
  int tried = 0;
  for (const FieldSpec& f : all_fields()) {
    if (!has_unit(f) || f.table.empty() || f.table == "step") continue;
    ++tried;
    const std::string value = "3 " + wrong_unit(f);
    const std::string text = trial_with(f, value);
    SCOPED_TRACE(std::string(f.id) + ":\n" + text);
    try {
      (void)load_trial_text(text, "wrong-dimension.toml", TrialReadOptions{});
      ADD_FAILURE() << "accepted";
    } catch (const InputErrors& e) {
      bool found = false;
      const std::string key(file_key(f));
      for (const InputError& one : e.errors()) {
        const std::string& field = one.field();
        const bool names_field = field.find(key) != std::string::npos;
        const bool placed = one.where() && one.where()->file == "wrong-dimension.toml" &&
                            one.where()->line > 1 && one.where()->column > 0;
        if (names_field && placed && !one.expected().empty()) found = true;
      }
      EXPECT_TRUE(found) << "no located error naming " << key
                         << "; first: " << describe(e.errors().front());
    }
  }
  // The registry holds dozens of such fields (src/fields/registry.cpp); a
  // count this low would mean the filter above lost them.
  EXPECT_GT(tried, 40);
}

}  // namespace
}  // namespace bb
