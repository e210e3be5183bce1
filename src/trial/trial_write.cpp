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

// The step tables `trial add-step` writes, in file order.
constexpr const char* kStepTables[] = {"ventilator",  "hold",       "gases",
                                       "circulation", "ultrasound", "challenge"};

// `key = value` for one field: flags as TOML booleans, everything else as text.
std::string assignment(const FieldValue& v) {
  const FieldSpec& f = field_spec(v.id);
  return std::string(file_key(f)) + " = " +
         (f.kind == FieldKind::flag ? v.text : toml_string(v.text));
}

// The step's text and, per line (0-based), the option that wrote it.
struct StepLines {
  std::string text;
  std::vector<std::string> option_of_line;
  void line(const std::string& s, const std::string& option) {
    text += s + "\n";
    option_of_line.push_back(option);
  }
};

StepLines step_lines(const std::string& label, const std::optional<std::string>& time,
                     const std::vector<FieldValue>& values) {
  for (const FieldValue& v : values) {
    const std::string_view table = field_spec(v.id).table;
    if (v.id == "manoeuvre") continue;  // a key of the step itself, written after its time
    if (std::find(std::begin(kStepTables), std::end(kStepTables), table) == std::end(kStepTables))
      throw std::logic_error("field " + v.id + " is not written by trial add-step");
  }
  const FieldSpec& label_field = field_spec("label");
  const FieldSpec& time_field = field_spec("time");
  StepLines out;
  out.line("", "");
  out.line("[[step]]", option_name(label_field));
  out.line(std::string(file_key(label_field)) + " = " + toml_string(label),
           option_name(label_field));
  if (time)
    out.line(std::string(file_key(time_field)) + " = " + toml_string(*time),
             option_name(time_field));
  for (const FieldValue& v : values) {
    if (v.id == "manoeuvre") out.line(assignment(v), v.option);
  }
  for (const char* table : kStepTables) {
    bool opened = false;
    for (const FieldValue& v : values) {
      if (field_spec(v.id).table != table) continue;
      if (!opened) {
        out.line("", "");
        out.line(std::string("[step.") + table + "]", v.option);
        opened = true;
      }
      out.line(assignment(v), v.option);
    }
  }
  return out;
}

// An error in the written text, renamed after the option that gave the value.
InputError as_option_error(const InputError& e, const std::string& option) {
  std::string problem = e.problem();
  if (!e.field().empty()) problem = e.problem() + " (" + e.field() + ")";
  return InputError(option, e.value(), problem, e.expected());
}

}  // namespace

std::string step_text(const std::string& label, const std::optional<std::string>& time,
                      const std::vector<FieldValue>& values) {
  return step_lines(label, time, values).text;
}

std::string new_trial_text(const std::vector<FieldValue>& patient,
                           const TrialReadOptions& options) {
  std::string text =
      "# breathbeat trial file (docs/trial-file.md). Add steps with\n"
      "#   breathbeat trial add-step FILE " +
      option_name(field_spec("label")) + " \"PEEP 10\" " + option_name(field_spec("peep_total")) +
      " 10 " + option_name(field_spec("pplat")) +
      " 26 ...\n"
      "# or by hand. Comments are kept when steps are added.\n\n"
      "[patient]\n";
  std::vector<std::pair<int, std::string>> option_lines;
  for (const FieldValue& v : patient) {
    if (field_spec(v.id).table != "patient")
      throw std::logic_error("field " + v.id + " is not a field of [patient]");
    text += std::string(file_key(field_spec(v.id))) + " = " + toml_string(v.text) + "\n";
    option_lines.emplace_back(count_lines(text), v.option);
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

std::string append_step_text(std::string_view existing, const std::string& name,
                             const std::string& label, const std::optional<std::string>& time,
                             const std::vector<FieldValue>& values, const TrialReadOptions& options,
                             std::vector<std::string>* notes) {
  // The file as it is must be valid first.
  const LoadedTrial before = load_trial_text(existing, name, options);
  if (notes) *notes = before.notes;
  std::string updated(existing);
  if (!updated.empty() && updated.back() != '\n') updated += "\n";
  const int offset = count_lines(updated);
  const StepLines step = step_lines(label, time, values);
  updated += step.text;
  try {
    load_trial_text(updated, name, options);
  } catch (const InputErrors& errors) {
    std::vector<InputError> out;
    for (const InputError& e : errors.errors()) {
      const int line = e.where() ? e.where()->line - 1 - offset : -1;
      if (line >= 0 && line < static_cast<int>(step.option_of_line.size()) &&
          !step.option_of_line[line].empty()) {
        out.push_back(as_option_error(e, step.option_of_line[line]));
      } else {
        out.push_back(e);
      }
    }
    throw InputErrors(std::move(out));
  }
  return updated;
}

}  // namespace bb
