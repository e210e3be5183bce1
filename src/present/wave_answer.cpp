// The waveform record summary as an Answer and as JSON, and the JSON of one
// window (breathbeat/present/wave.hpp).
#include <cmath>

#include "breathbeat/cautions.hpp"
#include "breathbeat/present/json.hpp"
#include "breathbeat/present/wave.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb::wave {

namespace {

Shown count_shown(std::int64_t n, const char* ucum, const char* unit) {
  return Shown{static_cast<double>(n), ucum, unit, 0, std::nullopt, std::nullopt};
}

Shown ppv_shown(const PpvSpread& p) {
  Shown s = as_percent(p.median, 1);
  s.low = in_percent(p.p10);
  s.high = in_percent(p.p90);
  return s;
}

nlohmann::ordered_json ppv_json(const PpvSpread& p) {
  nlohmann::ordered_json j = to_json(as_percent(p.median, 1));
  j["p10"] = to_json(as_percent(p.p10, 1))["value"];
  j["p90"] = to_json(as_percent(p.p90, 1))["value"];
  j["breaths"] = p.breaths;
  return j;
}

template <class T, class F>
nlohmann::ordered_json optional_json(const std::optional<T>& v, F shown) {
  return v ? to_json(shown(*v)) : nlohmann::ordered_json(nullptr);
}

void add(Answer& a, const std::string& key, const std::string& label, Shown shown,
         std::string note = "") {
  a.results.push_back(Item{key, label, std::move(shown), std::move(note)});
}

// A value taken from the signals meets the same plausible range as a typed
// one (presets/plausibility.toml); outside it, the value is still shown (it
// was measured) with a note, where a typed value would be refused.
template <class Q>
void note_if_implausible(std::vector<std::string>& notes, const Thresholds& t,
                         std::string_view range_key, const std::string& what,
                         const std::optional<Q>& value) {
  if (!value) return;
  const auto range = t.plausible_range(range_key);
  if (!range) return;
  constexpr Dimension dimension = DimensionOf<Q>::value;
  double factor = 1.0;
  if (dimension == Dimension::fraction) {
    factor = range->unit == "%" ? 0.01 : 1.0;
  } else if (dimension != Dimension::number) {
    factor = unit_factor(range->unit, dimension, Field{range_key, ""});
  }
  const double v = value->value() / factor;
  if (v >= range->min && v <= range->max) return;
  const std::string unit = range->unit.empty() ? "" : " " + range->unit;
  auto bound = [](double x) { return format_number(x, x == std::round(x) ? 0 : 1); };
  const double cut = v < range->min ? range->min : range->max;
  notes.push_back(what + " from the signals, " + format_deciding(v, cut, 1) + unit +
                  ", is outside the plausible range " + bound(range->min) + " to " +
                  bound(range->max) + unit + " (" + range->source +
                  ") that a typed value must meet: check the transducer (zero, level, "
                  "damping) and that the channel is what its label says; shown as measured");
}

// A pressure from the signals below a check level of the presets
// ([waveform.check_*_below]): shown as measured, with a note asking for a check.
void note_if_below_check(std::vector<std::string>& notes, const Thresholds& t, std::string_view key,
                         const std::string& what, const std::optional<Pressure>& value) {
  if (!value || !t.has(key)) return;
  const Pressure check = t.get<Pressure>(key);
  if (!(*value < check)) return;
  notes.push_back(what + " from the signals, " +
                  format_deciding(in_mmHg(*value), in_mmHg(check), 0) + " mmHg, is below " +
                  format_number(in_mmHg(check), 0) +
                  " mmHg: before relying on it, check the transducer (zero, level, damping, "
                  "flush test) and compare with a cuff pressure [" +
                  t.source(key) + "]");
}

}  // namespace

nlohmann::ordered_json to_json(const BeatCounts& c) {
  nlohmann::ordered_json j = to_json(count_shown(c.rejected(), "{beats}", "beats"));
  nlohmann::ordered_json reasons = nlohmann::ordered_json::object();
  for (int v = 1; v < kBeatVerdictCount; ++v)
    reasons[to_string(static_cast<BeatVerdict>(v))] = c.by_verdict[v];
  j["by_reason"] = reasons;
  return j;
}

Answer describe_record(const RecordSummary& s, const Thresholds& t) {
  Answer a;
  a.command = "wave";
  a.title = "Waveform analysis";
  a.inputs.push_back({"arterial_pressure_channel", s.abp_channel, "Arterial pressure channel"});
  a.inputs.push_back({"breath_channel", s.breath_channel + " (" + to_string(s.breath_signal) + ")",
                      "Breath channel"});
  a.inputs.push_back({"start", as_seconds(s.start, 1), "Start of the stretch analysed"});
  add(a, "duration", "Duration analysed", as_seconds(s.duration, 1));
  add(a, "beats", "Beats", count_shown(s.beats.total(), "{beats}", "beats"));
  std::string reasons;
  for (int v = 1; v < kBeatVerdictCount; ++v) {
    if (s.beats.by_verdict[v] == 0) continue;
    reasons += (reasons.empty() ? "" : ", ") + std::string(to_string(static_cast<BeatVerdict>(v))) +
               " " + std::to_string(s.beats.by_verdict[v]);
  }
  add(a, "beats_rejected", "Beats set aside", count_shown(s.beats.rejected(), "{beats}", "beats"),
      reasons);
  add(a, "breaths", "Breaths", count_shown(s.breaths, "{breaths}", "breaths"));
  if (s.heart_rate)
    add(a, "heart_rate", "Heart rate (accepted beats)", as_per_min(*s.heart_rate, 0));
  if (s.respiratory_rate)
    add(a, "respiratory_rate", "Respiratory rate", as_per_min(*s.respiratory_rate, 1));
  if (s.hr_rr_ratio) add(a, "hr_rr_ratio", "HR/RR", as_number(in_fraction(*s.hr_rr_ratio), 1));
  if (s.map) add(a, "map", "Mean arterial pressure, median", as_mmHg(*s.map, 0), "accepted beats");
  if (s.pulse_pressure) {
    add(a, "pulse_pressure", "Pulse pressure, median", as_mmHg(*s.pulse_pressure, 0),
        "accepted beats");
  }
  if (s.ppv) {
    add(a, "ppv", "PPV, median (p10-p90) over breaths", ppv_shown(*s.ppv),
        std::to_string(s.ppv->breaths) + " breaths; Michard 2000");
  } else if (s.breaths_with_ppv > 0) {
    // As for a typed PPV (ppv.min_breaths): too few breaths give no PPV.
    const std::string need =
        "at least " + std::to_string(s.min_breaths) + " breaths with a PPV (the record has " +
        std::to_string(s.breaths_with_ppv) + "; " + t.source("ppv.min_breaths") + ")";
    a.skipped.push_back(Skipped{"ppv", "PPV", {Need{need}}});
  } else {
    // Not a field: the record itself lacks such breaths (the need is printed as it is).
    const std::string need = "breaths with at least " +
                             format_number(t.number("waveform.min_beats_per_breath"), 0) +
                             " accepted beats";
    a.skipped.push_back(Skipped{"ppv", "PPV", {Need{need}}});
  }
  if (s.spv) add(a, "spv", "SPV, median over breaths", as_mmHg(*s.spv, 1), "Perel 1987");
  if (s.mean_airway_pressure) {
    add(a, "mean_airway_pressure", "Mean airway pressure", as_cmH2O(*s.mean_airway_pressure, 1),
        "time average over whole breaths");
  }
  if (s.ppeak) add(a, "ppeak", "Peak airway pressure, median", as_cmH2O(*s.ppeak, 1));
  if (s.peep) add(a, "peep", "PEEP (end-expiratory), median", as_cmH2O(*s.peep, 1));
  if (s.vt)
    add(a, "vt", "Tidal volume, median", as_mL(*s.vt, 0), "flow integrated, drift corrected");
  if (s.resistance) {
    const std::string fit = std::to_string(s.fits) + " breaths; Bates 2009";
    add(a, "resistance", "Resistance (equation of motion)", as_cmH2O_per_L_per_s(*s.resistance, 1),
        fit);
  }
  if (s.elastance)
    add(a, "elastance", "Elastance (equation of motion)", as_cmH2O_per_L(*s.elastance, 1));
  if (s.compliance)
    add(a, "compliance", "Compliance (1/elastance)", as_mL_per_cmH2O(*s.compliance, 1));
  if (s.total_peep) add(a, "total_peep", "Total PEEP (P0 of the fit)", as_cmH2O(*s.total_peep, 1));
  if (s.fit_r_squared)
    add(a, "fit_r_squared", "Goodness of fit (R2), median", as_number(*s.fit_r_squared, 3));
  if (s.stress_index) {
    add(a, "stress_index", "Stress index, median", as_number(*s.stress_index, 2), "Ranieri 2000");
  }
  add(a, "windows", "Windows in the trend", count_shown(s.windows, "1", ""));
  a.gates = s.gates;
  a.reading = s.reading;
  a.notes = s.notes;
  note_if_implausible(a.notes, t, "sbp", "Systolic pressure (median)", s.sbp);
  note_if_implausible(a.notes, t, "dbp", "Diastolic pressure (median)", s.dbp);
  note_if_implausible(a.notes, t, "map", "Mean arterial pressure (median)", s.map);
  note_if_implausible(a.notes, t, "pulse_pressure", "Pulse pressure (median)", s.pulse_pressure);
  note_if_below_check(a.notes, t, "waveform.check_map_below", "Mean arterial pressure (median)",
                      s.map);
  note_if_below_check(a.notes, t, "waveform.check_pulse_pressure_below", "Pulse pressure (median)",
                      s.pulse_pressure);
  note_if_implausible(a.notes, t, "hr", "Heart rate", s.heart_rate);
  note_if_implausible(a.notes, t, "rr", "Respiratory rate", s.respiratory_rate);
  if (s.ppv) {
    note_if_implausible(a.notes, t, "ppv", "PPV (median)", std::optional<Ratio>(s.ppv->median));
  }
  note_if_implausible(a.notes, t, "ppeak", "Peak airway pressure (median)", s.ppeak);
  note_if_implausible(a.notes, t, "peep", "PEEP (median)", s.peep);
  note_if_implausible(a.notes, t, "vt", "Tidal volume (median)", s.vt);
  note_if_implausible(a.notes, t, "crs", "Compliance", s.compliance);
  a.notes.push_back(
      "Pulse onsets by the slope-sum function (Zong et al., Computers in Cardiology 2003;30:259).");
  a.cautions = standard_cautions();
  return a;
}

nlohmann::ordered_json to_json(const WindowResult& w) {
  nlohmann::ordered_json j;
  j["start"] = to_json(as_seconds(w.start, 1));
  j["end"] = to_json(as_seconds(w.end, 1));
  j["beats"] = w.beats;
  j["beats_rejected"] = w.beats_rejected;
  j["breaths"] = w.breaths;
  j["heart_rate"] = optional_json(w.heart_rate, [](Frequency f) { return as_per_min(f, 0); });
  j["respiratory_rate"] =
      optional_json(w.respiratory_rate, [](Frequency f) { return as_per_min(f, 1); });
  j["hr_rr_ratio"] =
      optional_json(w.hr_rr_ratio, [](Ratio r) { return as_number(in_fraction(r), 1); });
  j["ppv"] = w.ppv ? ppv_json(*w.ppv) : nlohmann::ordered_json(nullptr);
  j["spv"] = optional_json(w.spv, [](Pressure p) { return as_mmHg(p, 1); });
  j["mean_airway_pressure"] =
      optional_json(w.mean_airway_pressure, [](Pressure p) { return as_cmH2O(p, 1); });
  j["vt"] = optional_json(w.vt, [](Volume v) { return as_mL(v, 0); });
  j["reading"] =
      w.reading ? nlohmann::ordered_json(w.reading->category) : nlohmann::ordered_json(nullptr);
  nlohmann::ordered_json failed = nlohmann::ordered_json::array();
  nlohmann::ordered_json unknown = nlohmann::ordered_json::array();
  nlohmann::ordered_json not_contradicted = nlohmann::ordered_json::array();
  for (const Gate& g : w.gates) {
    if (g.state == GateState::failed) failed.push_back(g.key);
    if (g.state == GateState::unknown) unknown.push_back(g.key);
    if (g.state == GateState::not_contradicted) not_contradicted.push_back(g.key);
  }
  j["gates_failed"] = failed;
  j["gates_unknown"] = unknown;
  j["gates_not_contradicted"] = not_contradicted;
  j["conditional"] = w.reading ? w.reading->conditional : false;
  return j;
}

nlohmann::ordered_json summary_json(const RecordSummary& s, const Thresholds& t) {
  nlohmann::ordered_json j = to_json(describe_record(s, t));
  nlohmann::ordered_json out;
  for (const char* key : {"tool", "version", "command", "inputs"}) out[key] = j[key];
  out["duration"] = to_json(as_seconds(s.duration, 1));
  out["beats"] = to_json(count_shown(s.beats.total(), "{beats}", "beats"));
  out["beats_rejected"] = to_json(s.beats);
  out["breaths"] = to_json(count_shown(s.breaths, "{breaths}", "breaths"));
  out["heart_rate"] = optional_json(s.heart_rate, [](Frequency f) { return as_per_min(f, 0); });
  out["respiratory_rate"] =
      optional_json(s.respiratory_rate, [](Frequency f) { return as_per_min(f, 1); });
  out["hr_rr_ratio"] =
      optional_json(s.hr_rr_ratio, [](Ratio r) { return as_number(in_fraction(r), 1); });
  out["ppv"] = s.ppv ? ppv_json(*s.ppv) : nlohmann::ordered_json(nullptr);
  out["spv"] = optional_json(s.spv, [](Pressure p) { return as_mmHg(p, 1); });
  if (s.has_pressure) {
    out["mean_airway_pressure"] =
        optional_json(s.mean_airway_pressure, [](Pressure p) { return as_cmH2O(p, 1); });
  }
  for (const char* key : {"results", "skipped", "gates", "reading", "notes", "cautions"})
    out[key] = j[key];
  return out;
}

}  // namespace bb::wave
