// Writing trial files: a new file, one appended step (as text, earlier bytes
// unchanged) and atomic replacement (temporary file, then rename).
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

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
                     const std::vector<StepValue>& values) {
  StepLines out;
  out.line("", "");
  out.line("[[step]]", "--label");
  out.line("label = " + toml_string(label), "--label");
  if (time) out.line("time = " + toml_string(*time), "--time");
  for (const char* table : {"ventilator", "hold", "gases", "circulation", "ultrasound"}) {
    bool opened = false;
    for (const StepValue& v : values) {
      if (v.table != table) continue;
      if (!opened) {
        out.line("", "");
        out.line(std::string("[step.") + table + "]", v.option);
        opened = true;
      }
      out.line(v.key + " = " + (v.is_bool ? v.text : toml_string(v.text)), v.option);
    }
  }
  return out;
}

// An error in the appended step, renamed after the option that gave the value.
InputError as_option_error(const InputError& e, const std::string& option) {
  std::string problem = e.problem();
  if (!e.field().empty()) problem = e.problem() + " (" + e.field() + ")";
  return InputError(option, e.value(), problem, e.expected());
}

}  // namespace

std::string step_text(const std::string& label, const std::optional<std::string>& time,
                      const std::vector<StepValue>& values) {
  return step_lines(label, time, values).text;
}

std::string new_trial_text(const NewTrialValues& v, const TrialReadOptions& options) {
  std::string text =
      "# breathbeat trial file (docs/trial-file.md). Add steps with\n"
      "#   breathbeat trial add-step FILE --label \"PEEP 10\" --peep 10 --pplat 26 ...\n"
      "# or by hand. Comments are kept when steps are added.\n\n"
      "[patient]\n";
  std::vector<std::pair<int, std::string>> option_lines;
  auto add = [&](const std::string& key, const std::string& value, const std::string& option) {
    text += key + " = " + toml_string(value) + "\n";
    option_lines.emplace_back(count_lines(text), option);
  };
  if (v.label) add("label", *v.label, "--label");
  add("sex", v.sex, "--sex");
  add("height", v.height, "--height");
  if (v.weight) add("weight", *v.weight, "--weight");
  if (v.age) add("age", *v.age, "--age");
  try {
    load_trial_text(text, "(new trial)", options);
  } catch (const InputErrors& errors) {
    std::vector<InputError> out;
    for (const InputError& e : errors.errors()) {
      std::string option = "--" + e.field().substr(e.field().rfind('.') + 1);
      for (const auto& [line, opt] : option_lines) {
        if (e.where() && e.where()->line == line) option = opt;
      }
      out.push_back(as_option_error(e, option));
    }
    throw InputErrors(std::move(out));
  }
  return text;
}

std::string append_step_text(std::string_view existing, const std::string& name,
                             const std::string& label, const std::optional<std::string>& time,
                             const std::vector<StepValue>& values,
                             const TrialReadOptions& options) {
  load_trial_text(existing, name, options);  // the file as it is must be valid first
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
