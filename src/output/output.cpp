#include "breathbeat/output.hpp"

#include <cmath>
#include <cstdio>
#include <sstream>

#include "breathbeat/version.hpp"

namespace bb {

namespace {
Shown make(double v, const char* ucum, const char* unit, int decimals) {
  return Shown{v, ucum, unit, decimals, std::nullopt, std::nullopt};
}

double rounded(double v, int decimals) {
  const double scale = std::pow(10.0, decimals);
  return std::round(v * scale) / scale;
}

nlohmann::ordered_json input_json(const InputItem& in) {
  if (const auto* s = std::get_if<Shown>(&in.value)) return to_json(*s);
  return std::get<std::string>(in.value);
}

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
}  // namespace

Shown as_cmH2O(Pressure p, int d) { return make(in_cmH2O(p), "cm[H2O]", "cmH2O", d); }
Shown as_mmHg(Pressure p, int d) { return make(in_mmHg(p), "mm[Hg]", "mmHg", d); }
Shown as_kPa(Pressure p, int d) { return make(in_kPa(p), "kPa", "kPa", d); }
Shown as_mL(Volume v, int d) { return make(in_mL(v), "mL", "mL", d); }
Shown as_L(Volume v, int d) { return make(in_litre(v), "L", "L", d); }
Shown as_L_per_min(Flow f, int d) { return make(in_L_per_min(f), "L/min", "L/min", d); }
Shown as_mL_per_min(Flow f, int d) { return make(in_mL_per_min(f), "mL/min", "mL/min", d); }
Shown as_L_per_s(Flow f, int d) { return make(in_L_per_s(f), "L/s", "L/s", d); }
Shown as_seconds(Time t, int d) { return make(in_seconds(t), "s", "s", d); }
Shown as_cm(Length l, int d) { return make(in_cm(l), "cm", "cm", d); }
Shown as_mm(Length l, int d) { return make(in_mm(l), "mm", "mm", d); }
Shown as_m2(Area a, int d) { return make(in_square_metre(a), "m2", "m2", d); }
Shown as_cm2(Area a, int d) { return make(in_square_cm(a), "cm2", "cm2", d); }
Shown as_kg(Mass m, int d) { return make(in_kg(m), "kg", "kg", d); }
Shown as_per_min(Frequency f, int d) { return make(in_per_min(f), "/min", "/min", d); }
Shown as_J_per_min(Power p, int d) { return make(in_J_per_min(p), "J/min", "J/min", d); }
Shown as_g_per_dL(MassConcentration c, int d) { return make(in_g_per_dL(c), "g/dL", "g/dL", d); }
Shown as_mmol_per_L(AmountConcentration c, int d) {
  return make(in_mmol_per_L(c), "mmol/L", "mmol/L", d);
}
Shown as_mL_per_cmH2O(Compliance c, int d) {
  return make(in_mL_per_cmH2O(c), "mL/cm[H2O]", "mL/cmH2O", d);
}
Shown as_cmH2O_per_L(Elastance e, int d) { return make(in_cmH2O_per_L(e), "cm[H2O]/L", "cmH2O/L", d); }
Shown as_cmH2O_per_L_per_s(Resistance r, int d) {
  return make(in_cmH2O_per_L_per_s(r), "cm[H2O]/L/s", "cmH2O/L/s", d);
}
Shown as_mL_per_kg(VolumePerMass v, int d) { return make(in_mL_per_kg(v), "mL/kg", "mL/kg", d); }
Shown as_percent(Ratio r, int d) { return make(in_percent(r), "%", "%", d); }
Shown as_fraction(Ratio r, int d) { return make(in_fraction(r), "1", "", d); }
Shown as_number(double v, int d) { return make(v, "1", "", d); }

const char* to_string(GateState s) {
  switch (s) {
    case GateState::met: return "met";
    case GateState::failed: return "failed";
    case GateState::unknown: return "unknown";
  }
  return "unknown";
}

std::string format_number(double v, int decimals) {
  char buf[64];
  const double r = rounded(v, decimals);
  std::snprintf(buf, sizeof buf, "%.*f", decimals < 0 ? 0 : decimals, r == 0.0 ? 0.0 : r);
  return buf;
}

std::string format_shown(const Shown& s) {
  std::string out = format_number(s.value, s.decimals);
  if (s.low && s.high) {
    out += " (" + format_number(*s.low, s.decimals) + " to " + format_number(*s.high, s.decimals) + ")";
  }
  if (!s.unit.empty()) out += " " + s.unit;
  return out;
}

nlohmann::ordered_json to_json(const Shown& s) {
  nlohmann::ordered_json j;
  j["value"] = rounded(s.value, s.decimals + 2);
  j["unit"] = s.ucum;
  if (s.low) j["low"] = rounded(*s.low, s.decimals + 2);
  if (s.high) j["high"] = rounded(*s.high, s.decimals + 2);
  return j;
}

nlohmann::ordered_json to_json(const Gate& g) {
  return {{"key", g.key}, {"label", g.label}, {"state", to_string(g.state)},
          {"detail", g.detail}, {"source", g.source}};
}

nlohmann::ordered_json to_json(const Reading& r) {
  return {{"key", r.key}, {"category", r.category}, {"text", r.text}, {"basis", r.basis}};
}

nlohmann::ordered_json to_json(const Answer& a) {
  nlohmann::ordered_json j;
  j["tool"] = kToolName;
  j["version"] = kVersion;
  j["command"] = a.command;
  j["inputs"] = nlohmann::ordered_json::object();
  for (const auto& in : a.inputs) j["inputs"][in.key] = input_json(in);
  j["results"] = nlohmann::ordered_json::object();
  for (const auto& r : a.results) j["results"][r.key] = to_json(r.shown);
  j["skipped"] = nlohmann::ordered_json::array();
  for (const auto& s : a.skipped) j["skipped"].push_back({{"key", s.key}, {"needs", s.needs}});
  j["flags"] = nlohmann::ordered_json::array();
  for (const auto& f : a.flags) {
    j["flags"].push_back({{"key", f.key}, {"message", f.message}, {"source", f.source}});
  }
  j["gates"] = nlohmann::ordered_json::array();
  for (const auto& g : a.gates) j["gates"].push_back(to_json(g));
  j["reading"] = a.reading ? to_json(*a.reading) : nlohmann::ordered_json(nullptr);
  j["notes"] = a.notes;
  j["cautions"] = a.cautions;
  return j;
}

std::string to_text(const Answer& a) {
  constexpr std::size_t kWidth = 100;
  constexpr std::size_t kLabel = 46;
  std::ostringstream out;
  out << kToolName << " " << kVersion << " - " << a.title << "\n";

  if (!a.inputs.empty()) {
    out << "\nInputs\n";
    for (const auto& in : a.inputs) {
      const std::string v = std::holds_alternative<Shown>(in.value) ? format_shown(std::get<Shown>(in.value))
                                                                   : std::get<std::string>(in.value);
      out << "  " << padded(in.key, kLabel - 2) << v << "\n";
    }
  }
  if (!a.results.empty()) {
    out << "\nResults\n";
    for (const auto& r : a.results) {
      std::string line = "  " + padded(r.label, kLabel - 2) + format_shown(r.shown);
      if (!r.note.empty()) line = padded(line, 66) + "[" + r.note + "]";
      out << wrap(line, kWidth, 68) << "\n";
    }
  }
  if (!a.gates.empty()) {
    out << "\nConditions for this index\n";
    for (const auto& g : a.gates) {
      const std::string state = std::string("[") + to_string(g.state) + "]";
      std::string line = "  " + padded(state, 10) + g.label;
      if (!g.detail.empty()) line += ": " + g.detail;
      out << wrap(line, kWidth, 12) << "\n";
    }
  }
  if (a.reading) {
    out << "\nReading\n  " << wrap(a.reading->text, kWidth, 2) << "\n";
  }
  if (!a.flags.empty()) {
    out << "\nLimits breached\n";
    for (const auto& f : a.flags) {
      out << wrap("  ! " + f.message + (f.source.empty() ? "" : " (" + f.source + ")"), kWidth, 4) << "\n";
    }
  }
  if (!a.skipped.empty()) {
    out << "\nNot computed\n";
    for (const auto& s : a.skipped) {
      std::string needs;
      for (const auto& n : s.needs) needs += (needs.empty() ? "" : ", ") + n;
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
