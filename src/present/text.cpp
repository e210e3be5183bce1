// Plain-text presenter of an Answer, at most 100 columns.
#include "breathbeat/present/text.hpp"

#include <sstream>

#include "breathbeat/fields/registry.hpp"
#include "breathbeat/version.hpp"

namespace bb {

// Wraps `text` at `width` columns, indenting continuation lines by `indent`.
// Spacing inside a line that fits is kept as it is (labels are padded).
std::string wrap(const std::string& text, std::size_t width, std::size_t indent) {
  std::string out;
  std::string rest = text;
  const std::string pad(indent, ' ');
  while (rest.size() > width) {
    std::size_t cut = rest.rfind(' ', width);
    if (cut == std::string::npos || cut <= indent) cut = rest.find(' ', width);
    if (cut == std::string::npos) break;
    out += rest.substr(0, cut) + "\n";
    const std::size_t next = rest.find_first_not_of(' ', cut);
    rest = next == std::string::npos ? std::string() : pad + rest.substr(next);
  }
  return out + rest;
}

std::string padded(const std::string& s, std::size_t width) {
  // Pad by displayed characters (UTF-8 continuation bytes do not count).
  std::size_t shown = 0;
  for (unsigned char c : s) shown += (c & 0xC0) != 0x80;
  return shown >= width ? s + " " : s + std::string(width - shown, ' ');
}

std::string to_text(const Answer& a) {
  return to_text(a, DisplayUnits{});
}

std::string to_text(const Answer& a, const DisplayUnits& display) {
  constexpr std::size_t kWidth = 100;
  constexpr std::size_t kLabel = 46;
  std::ostringstream out;
  out << kToolName << " " << kVersion << " - " << a.title << "\n";

  if (!a.inputs.empty()) {
    out << "\nInputs\n";
    for (const auto& in : a.inputs) {
      const std::string v =
          std::holds_alternative<Shown>(in.value)
              ? format_shown(displayed(in.key, std::get<Shown>(in.value), display))
              : std::get<std::string>(in.value);
      // People's name of the input (the registry's label), not its key.
      const FieldSpec* field = find_field(in.key);
      const std::string label = !in.label.empty()                ? in.label
                                : field && !field->label.empty() ? std::string(field->label)
                                                                 : in.key;
      out << "  " << padded(label, kLabel - 2) << v << "\n";
    }
  }
  if (!a.results.empty()) {
    out << "\nResults\n";
    for (const auto& r : a.results) {
      std::string line =
          "  " + padded(r.label, kLabel - 2) + format_shown(displayed(r.key, r.shown, display));
      if (!r.note.empty()) line = padded(line, 66) + "[" + r.note + "]";
      out << wrap(line, kWidth, 68) << "\n";
    }
  }
  if (!a.gates.empty()) {
    out << "\nConditions for this index\n";
    for (const auto& g : a.gates) {
      const std::string state = g.state == GateState::not_contradicted
                                    ? "[not contradicted by the signals, unproven]"
                                    : std::string("[") + to_string(g.state) + "]";
      std::string line = "  " + padded(state, 10) + g.label;
      if (!g.detail.empty()) line += ": " + g.detail;
      if (g.state == GateState::failed && g.bias != Bias::either) {
        line += g.bias == Bias::falsely_low ? " (can make the index falsely low)"
                                            : " (can make the index falsely high)";
      }
      out << wrap(line, kWidth, 12) << "\n";
    }
  }
  if (a.reading) {
    out << "\nReading\n  " << wrap(a.reading->text, kWidth, 2) << "\n";
  }
  if (!a.flags.empty()) {
    out << "\nLimits breached\n";
    for (const auto& f : a.flags) {
      out << wrap("  ! " + f.message + (f.source.empty() ? "" : " (" + f.source + ")"), kWidth, 4)
          << "\n";
    }
  }
  if (!a.skipped.empty()) {
    out << "\nNot computed\n";
    for (const auto& s : a.skipped) {
      std::string needs;
      for (const auto& n : need_texts(s, a.context)) needs += (needs.empty() ? "" : ", ") + n;
      out << wrap("  " + s.label + ": needs " + needs, kWidth, 4) << "\n";
    }
  }
  if (!a.notes.empty()) {
    out << "\nNotes\n";
    for (const auto& n : a.notes) out << wrap("  - " + n, kWidth, 4) << "\n";
  }
  out << "\nCautions\n";
  for (const auto& c : a.cautions) out << wrap("  * " + c, kWidth, 4) << "\n";
  return out.str();
}

}  // namespace bb
