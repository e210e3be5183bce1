// The report as JSON (schema: docs/report.schema.json) and as CSV.
#include "breathbeat/present/json.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/version.hpp"
#include "report_view.hpp"

namespace bb {

namespace {

using Json = nlohmann::ordered_json;
using report::Cell;

// A cell: {value, unit[, low, high][, note]} for numbers, {text[, note]} for words.
Json cell_json(const Cell& c) {
  Json j = c.shown ? to_json(*c.shown) : Json{{"text", c.text}};
  if (!c.note.empty()) j["note"] = c.note;
  return j;
}

Json cells_json(const std::vector<Cell>& cells) {
  Json j = Json::object();
  for (const Cell& c : cells) j[c.key] = cell_json(c);
  return j;
}

Json flags_json(const std::vector<Flag>& flags) {
  Json j = Json::array();
  for (const Flag& f : flags)
    j.push_back({{"key", f.key}, {"message", f.message}, {"source", f.source}});
  return j;
}

Json index_json(const report::Index& r) {
  Json gates = Json::array();
  for (const Gate& g : r.reading->gates) gates.push_back(to_json(g));
  return {{"key", r.key},
          {"label", r.label},
          {"values", cells_json(r.values)},
          {"gates", gates},
          {"reading", to_json(r.reading->reading)},
          {"direction", to_string(r.reading->direction)},
          {"conditional", r.reading->conditional}};
}

Json statement_json(const report::Statement& s) {
  Json open = Json::array();
  for (const OpenCondition& o : s.open_conditions) {
    open.push_back(
        {{"index", o.index}, {"gate", o.gate}, {"label", gate_label(o.condition)}, {"state", to_string(o.state)}});
  }
  Json measurements = Json::array();
  for (const MeasurementSupport& m : s.measurements)
    measurements.push_back({{"measurement", to_string(m.measurement)}, {"indices", m.indices}});
  return {{"category", s.category},       {"text", s.text},
          {"conditional", s.conditional}, {"open_conditions", open},
          {"measurements", measurements}, {"supporting", s.supporting},
          {"grey_zone", s.grey_zone},     {"failed_gates", s.failed_gates}};
}

Json step_json(const report::Step& s) {
  Json indices = Json::array();
  for (const auto& r : s.preload) indices.push_back(index_json(r));
  return {{"label", s.label},
          {"time", s.time},
          {"settings", cells_json(s.settings)},
          {"mechanics", cells_json(s.mechanics)},
          {"gas_exchange", cells_json(s.gas_exchange)},
          {"circulation", cells_json(s.circulation)},
          {"flags", flags_json(s.flags)},
          {"preload", {{"indices", indices}, {"statement", statement_json(s.statement)}}},
          {"notes", s.notes}};
}

Json heart_lung_json(const report::HeartLung& h) {
  Json j{{"step", h.step}, {"reference", h.reference}};
  j["ecw_ers_origin"] = h.origin ? Json(to_string(*h.origin)) : Json(nullptr);
  j["estimated"] = cells_json(h.estimated);
  j["observed"] = cells_json(h.observed);
  j["notes"] = h.notes;
  return j;
}

Json finding_json(const report::Finding& f) {
  return {{"key", f.key},         {"text", f.text},
          {"steps", f.steps},     {"values", cells_json(f.values)},
          {"flagged", f.flagged}, {"source", f.source}};
}

}  // namespace

nlohmann::ordered_json report_json(const TrialAnalysis& analysis) {
  const report::View a = report::view_of(analysis, DisplayUnits{});
  Json j;
  j["tool"] = kToolName;
  j["version"] = kVersion;
  j["command"] = "report";
  j["file"] = a.file;
  j["date"] = a.date;
  j["trials"] = a.trials;
  j["patient"] = {{"label", a.patient_label}, {"values", cells_json(a.patient)}};
  j["reference"] = a.reference;
  j["steps"] = Json::array();
  for (const auto& s : a.steps) j["steps"].push_back(step_json(s));
  j["heart_lung"] = Json::array();
  for (const auto& h : a.heart_lung) j["heart_lung"].push_back(heart_lung_json(h));
  j["comparison"] = Json::array();
  for (const auto& f : a.comparison) j["comparison"].push_back(finding_json(f));
  j["thresholds"] = Json::object();
  for (const auto& [k, v] : a.thresholds_used) j["thresholds"][k] = v;
  j["notes"] = a.notes;
  j["voided"] = Json::array();
  for (const report::Voided& x : a.voided) {
    j["voided"].push_back(
        {{"step", x.step}, {"reason", x.reason}, {"at", x.at}, {"place", x.place}});
  }
  j["cautions"] = a.cautions;
  return j;
}

// ---- CSV ---------------------------------------------------------------------------

namespace {

std::string csv_field(const std::string& s) {
  if (s.find_first_of(",\"\n") == std::string::npos) return s;
  std::string out = "\"";
  for (char c : s) out += c == '"' ? std::string("\"\"") : std::string(1, c);
  return out + "\"";
}

struct Columns {
  std::vector<std::string> headers;
  std::vector<std::vector<std::string>> rows;  // one per step

  std::size_t column(const std::string& header) {
    for (std::size_t i = 0; i < headers.size(); ++i) {
      if (headers[i] == header) return i;
    }
    headers.push_back(header);
    for (auto& r : rows) r.emplace_back();
    return headers.size() - 1;
  }
  void set(std::size_t step, const std::string& header, const std::string& value) {
    const std::size_t c = column(header);
    rows[step][c] = value;
  }
};

// The unit of a CSV header: the UCUM code, micrograms written "mcg" as in the text.
std::string csv_unit(const Shown& s) {
  if (s.ucum.rfind("ug", 0) == 0) return "mcg" + s.ucum.substr(2);
  return s.ucum;
}

void add_cells(Columns& t, std::size_t step, const std::string& section,
               const std::vector<Cell>& cells) {
  for (const Cell& c : cells) {
    std::string base = section + "." + c.key;
    if (!c.shown) {
      t.set(step, base, c.text);
      continue;
    }
    // Percentage points have no UCUM code: the column says "_points" beside "%".
    if (c.shown->ucum == "%" && c.shown->unit == "points") base += "_points";
    const std::string unit = " [" + csv_unit(*c.shown) + "]";
    t.set(step, base + unit, format_number(c.shown->value, c.shown->decimals + 2));
    if (c.shown->low)
      t.set(step, base + "_low" + unit, format_number(*c.shown->low, c.shown->decimals + 2));
    if (c.shown->high)
      t.set(step, base + "_high" + unit, format_number(*c.shown->high, c.shown->decimals + 2));
  }
}

}  // namespace

std::string report_csv(const TrialAnalysis& analysis) {
  const report::View a = report::view_of(analysis, DisplayUnits{});
  Columns t;
  t.rows.resize(a.steps.size());
  t.column("step");
  t.column("time");
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    const report::Step& s = a.steps[i];
    t.set(i, "step", s.label);
    t.set(i, "time", s.time);
    add_cells(t, i, "settings", s.settings);
    add_cells(t, i, "mechanics", s.mechanics);
    add_cells(t, i, "gas_exchange", s.gas_exchange);
    add_cells(t, i, "circulation", s.circulation);
  }
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    // The patient's values (PBW, BSA, ...) on every row, so that each row stands alone.
    add_cells(t, i, "patient", a.patient);
  }
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    for (const auto& idx : a.steps[i].preload) {
      t.set(i, "preload." + idx.key + ".reading", idx.reading->reading.category);
      t.set(i, "preload." + idx.key + ".direction", to_string(idx.reading->direction));
      // What a paired test compared (the other indices' values are in the circulation columns).
      const PreloadIndex kind = idx.reading->index;
      if (kind == PreloadIndex::preload_test || kind == PreloadIndex::vt_challenge ||
          kind == PreloadIndex::manoeuvre)
        add_cells(t, i, "preload." + idx.key, idx.values);
    }
  }
  for (std::size_t i = 0; i < a.steps.size(); ++i) {
    t.set(i, "preload.statement", a.steps[i].statement.category);
  }
  for (std::size_t i = 0; i < a.heart_lung.size(); ++i) {
    add_cells(t, i, "heart_lung", a.heart_lung[i].estimated);
    add_cells(t, i, "heart_lung", a.heart_lung[i].observed);
  }
  std::string out;
  for (std::size_t c = 0; c < t.headers.size(); ++c)
    out += (c ? "," : "") + csv_field(t.headers[c]);
  out += "\n";
  for (const auto& r : t.rows) {
    for (std::size_t c = 0; c < r.size(); ++c) out += (c ? "," : "") + csv_field(r[c]);
    out += "\n";
  }
  return out;
}

}  // namespace bb
