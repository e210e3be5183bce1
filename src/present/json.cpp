// JSON presenters for Shown values, gates, readings and answers.
#include "breathbeat/present/json.hpp"

#include <cmath>

#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/version.hpp"

namespace bb {

namespace {
double rounded(double v, int decimals) {
  const double scale = std::pow(10.0, decimals);
  return std::round(v * scale) / scale;
}

nlohmann::ordered_json input_json(const InputItem& in);
}  // namespace

nlohmann::ordered_json to_json(const Shown& s) {
  nlohmann::ordered_json j;
  j["value"] = rounded(s.value, s.decimals + 2);
  j["unit"] = s.ucum;
  // Percentage points have no UCUM code: "%" with the label "points" (as_percentage_points).
  if (s.ucum == "%" && s.unit == "points") j["unit_label"] = s.unit;
  if (s.low) j["low"] = rounded(*s.low, s.decimals + 2);
  if (s.high) j["high"] = rounded(*s.high, s.decimals + 2);
  return j;
}

nlohmann::ordered_json to_json(const ShownGate& g) {
  return {{"key", g.key},
          {"label", g.label},
          {"state", to_string(g.state)},
          {"detail", g.detail},
          {"source", g.source},
          {"bias", to_string(g.bias)},
          {"bias_source", g.bias_source}};
}

nlohmann::ordered_json to_json(const Gate& g) {
  return to_json(shown_gate(g));
}

nlohmann::ordered_json to_json(const ShownReading& r) {
  return {{"key", r.key},
          {"category", r.category},
          {"text", r.text},
          {"basis", r.basis},
          {"conditional", r.conditional},
          {"open_conditions", r.open_conditions},
          {"one_sided", r.one_sided}};
}

nlohmann::ordered_json to_json(const Reading& r) {
  return to_json(shown_reading(r));
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
  for (const auto& s : a.skipped)
    j["skipped"].push_back({{"key", s.key}, {"needs", need_texts(s, a.context)}});
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

namespace {
nlohmann::ordered_json input_json(const InputItem& in) {
  if (const auto* s = std::get_if<Shown>(&in.value)) return to_json(*s);
  return std::get<std::string>(in.value);
}
}  // namespace

}  // namespace bb
