// Writing trial files: a new file and one appended step (as text, earlier
// bytes unchanged), every key as the field registry names it.
#include <algorithm>
#include <cstdio>
#include <iterator>
#include <stdexcept>

#include "breathbeat/fields/registry.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb {

namespace {

// A TOML basic string holding `text` exactly.
std::string toml_string(std::string_view text) {
  std::string out = "\"";
  for (char c : text) {
    switch (c) {
      case '"':
        out += "\\\"";
        break;
      case '\\':
        out += "\\\\";
        break;
      case '\n':
        out += "\\n";
        break;
      case '\t':
        out += "\\t";
        break;
      case '\r':
        out += "\\r";
        break;
      default:
        if (static_cast<unsigned char>(c) < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out += buf;
        } else {
          out += c;
        }
    }
  }
  return out + "\"";
}

int count_lines(std::string_view text) {
  int n = 0;
  for (char c : text) n += c == '\n';
  return n;
}

// The tables of a step `trial add-step` writes whole, in file order; then the
// infusions and the preload test, then these.
constexpr const char* kStepTables[] = {"ventilator",  "hold",       "gases",
                                       "circulation", "ultrasound", "challenge"};
constexpr const char* kLaterTables[] = {"peep_release", "waveform"};

// `key = value` for one field: flags as TOML booleans, everything else as text.
std::string assignment(const FieldValue& v) {
  const FieldSpec& f = field_spec(v.id);
  return std::string(file_key(f)) + " = " +
         (f.kind == FieldKind::flag ? v.text : toml_string(v.text));
}

// The text appended and, per line (0-based), the option that wrote it.
struct StepLines {
  std::string text;
  std::vector<std::string> option_of_line;
  void line(const std::string& s, const std::string& option) {
    text += s + "\n";
    option_of_line.push_back(option);
  }
  // A table header and its assignments (nothing when `values` is empty).
  void table(const std::string& header, const std::vector<FieldValue>& values) {
    if (values.empty()) return;
    line("", "");
    line(header, values.front().option);
    for (const FieldValue& v : values) line(assignment(v), v.option);
  }
};

void require_table(const FieldValue& v, std::string_view table) {
  if (field_spec(v.id).table != table)
    throw std::logic_error("field " + v.id + " is not a field of [" + std::string(table) + "]");
}

StepLines step_lines(const StepRecord& step) {
  for (const FieldValue& v : step.values) {
    const std::string_view table = field_spec(v.id).table;
    if (v.id == "manoeuvre") continue;  // a key of the step itself, written after its time
    if (std::find(std::begin(kStepTables), std::end(kStepTables), table) == std::end(kStepTables) &&
        std::find(std::begin(kLaterTables), std::end(kLaterTables), table) ==
            std::end(kLaterTables))
      throw std::logic_error("field " + v.id + " is not written by trial add-step");
  }
  const FieldSpec& label_field = field_spec("label");
  const FieldSpec& time_field = field_spec("time");
  StepLines out;
  out.line("", "");
  out.line("[[step]]", option_name(label_field));
  out.line(std::string(file_key(label_field)) + " = " + toml_string(step.label),
           option_name(label_field));
  if (step.time)
    out.line(std::string(file_key(time_field)) + " = " + toml_string(*step.time),
             option_name(time_field));
  for (const FieldValue& v : step.values) {
    if (v.id == "manoeuvre") out.line(assignment(v), v.option);
  }
  const auto of_table = [&](std::string_view table) {
    std::vector<FieldValue> in;
    for (const FieldValue& v : step.values) {
      if (field_spec(v.id).table == table) in.push_back(v);
    }
    return in;
  };
  for (const char* table : kStepTables)
    out.table(std::string("[step.") + table + "]", of_table(table));
  for (const auto& infusion : step.infusions) {
    for (const FieldValue& v : infusion) require_table(v, "infusion");
    out.table("[[step.infusion]]", infusion);
  }
  if (!step.preload_test.empty()) {
    for (const FieldValue& v : step.preload) require_table(v, "preload.*");
    out.table("[step.preload." + step.preload_test + "]", step.preload);
  }
  for (const char* table : kLaterTables)
    out.table(std::string("[step.") + table + "]", of_table(table));
  return out;
}

// An error in the written text, renamed after the option that gave the value.
InputError as_option_error(const InputError& e, const std::string& option) {
  std::string problem = e.problem();
  if (!e.field().empty()) problem = e.problem() + " (" + e.field() + ")";
  return InputError(option, e.value(), problem, e.expected());
}

}  // namespace

std::string step_text(const StepRecord& step) {
  return step_lines(step).text;
}

std::string new_trial_text(const std::vector<FieldValue>& patient,
                           const TrialReadOptions& options) {
  std::string text =
      "# breathbeat trial file (docs/trial-file.md). Add steps with\n"
      "#   breathbeat trial add-step FILE " +
      option_name(field_spec("label")) + " \"PEEP 10\" " + option_name(field_spec("peep_total")) +
      " 10 " + option_name(field_spec("pplat")) +
      " 26 ...\n"
      "# or by hand. Comments are kept when steps are added.\n\n";
  std::vector<std::pair<int, std::string>> option_lines;
  // [trial] (when a field of it is given), then [patient].
  for (const std::string_view table : {"trial", "patient"}) {
    bool opened = false;
    for (const FieldValue& v : patient) {
      const std::string_view t = field_spec(v.id).table;
      if (t != "trial" && t != "patient")
        throw std::logic_error("field " + v.id + " is not a field of [trial] or [patient]");
      if (t != table) continue;
      if (!opened) text += "[" + std::string(table) + "]\n";
      opened = true;
      text += std::string(file_key(field_spec(v.id))) + " = " + toml_string(v.text) + "\n";
      option_lines.emplace_back(count_lines(text), v.option);
    }
    if (table == "trial" && opened) text += "\n";
    if (table == "patient" && !opened) text += "[patient]\n";
  }
  try {
    load_trial_text(text, "(new trial)", options);
  } catch (const InputErrors& errors) {
    std::vector<InputError> out;
    for (const InputError& e : errors.errors()) {
      // A missing field is named by its option; anything else by the line it is on.
      std::string option;
      const std::string key = e.field().substr(e.field().rfind('.') + 1);
      for (const FieldSpec* f : fields_of_table("patient")) {
        if (file_key(*f) == key) option = option_name(*f);
      }
      for (const auto& [line, opt] : option_lines) {
        if (e.where() && e.where()->line == line) option = opt;
      }
      out.push_back(option.empty() ? e : as_option_error(e, option));
    }
    throw InputErrors(std::move(out));
  }
  return text;
}

namespace {

// The option of a required field the file does not give ("step[3].peep_release.peep_low is
// missing" -> --peep-low); "" for any other problem.
std::string missing_option(const InputError& e) {
  if (e.problem() != "is missing") return "";
  const std::string& path = e.field();
  for (const FieldSpec& f : all_fields()) {
    if (f.table.empty() || f.table == "patient" || f.table == "step") continue;
    const std::string tail = "." + std::string(file_key(f));
    if (path.size() < tail.size() || path.compare(path.size() - tail.size(), tail.size(), tail))
      continue;
    const std::string table =
        f.table == "preload.*" ? ".preload." : "." + std::string(f.table) + ".";
    if (path.find(table) != std::string::npos) return option_name(f);
  }
  return "";
}

// `existing` with `added` appended, both checked: the file as it is first, then
// the whole result, with problems on the added lines named by their option.
std::string append_checked(std::string_view existing, const std::string& name,
                           const StepLines& added, const TrialReadOptions& options,
                           std::vector<std::string>* notes) {
  const LoadedTrial before = load_trial_text(existing, name, options);
  if (notes) *notes = before.notes;
  std::string updated(existing);
  if (!updated.empty() && updated.back() != '\n') updated += "\n";
  const int offset = count_lines(updated);
  updated += added.text;
  try {
    load_trial_text(updated, name, options);
  } catch (const InputErrors& errors) {
    std::vector<InputError> out;
    for (const InputError& e : errors.errors()) {
      const int line = e.where() ? e.where()->line - 1 - offset : -1;
      if (line >= 0 && line < static_cast<int>(added.option_of_line.size()) &&
          !added.option_of_line[line].empty()) {
        // A required value left out is named by its own option, not the table's first.
        const std::string missing = missing_option(e);
        out.push_back(as_option_error(e, missing.empty() ? added.option_of_line[line] : missing));
      } else {
        out.push_back(e);
      }
    }
    throw InputErrors(std::move(out));
  }
  return updated;
}

}  // namespace

std::string append_step_text(std::string_view existing, const std::string& name,
                             const StepRecord& step, const TrialReadOptions& options,
                             std::vector<std::string>* notes) {
  return append_checked(existing, name, step_lines(step), options, notes);
}

std::string append_void_text(std::string_view existing, const std::string& name,
                             const FieldValue& step, const FieldValue& reason,
                             const std::string& at, const TrialReadOptions& options,
                             std::vector<std::string>* notes) {
  require_table(step, "voided");
  require_table(reason, "voided");
  const FieldSpec& at_field = field_spec("voided_at");
  StepLines out;
  out.line("", "");
  out.line("[[voided]]", step.option);
  out.line(assignment(step), step.option);
  out.line(assignment(reason), reason.option);
  // A TOML offset date-time, not text: the reader keeps it as written.
  out.line(std::string(file_key(at_field)) + " = " + at, "");
  return append_checked(existing, name, out, options, notes);
}

}  // namespace bb
