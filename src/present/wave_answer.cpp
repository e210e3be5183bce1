// The waveform record summary as an Answer and as JSON, and the JSON of one
// window (breathbeat/present/wave.hpp).
#include <cmath>

#include <algorithm>

#include "breathbeat/cautions.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/present/gate_words.hpp"
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

// A stated yes/no condition as the input echo shows it: "yes" or "no", under the
// field registry's label (InputItem with no label).
void add_stated(Answer& a, const char* id, const std::optional<bool>& v) {
  if (v) a.inputs.push_back({id, std::string(*v ? "yes" : "no")});
}

// How the PPV's respiratory cycles were found, for the note beside the PPV.
std::string cycles_words(const RecordSummary& s) {
  std::string n = std::to_string(s.ppv ? s.ppv->breaths : 0);
  switch (s.cycles) {
    case CycleSource::breaths:
      return n + " breaths; Michard 2000";
    case CycleSource::set_rate:
      return n + " cycles of 60/RR s at the set rate; Michard 2000";
    case CycleSource::pulse_modulation:
      return n + " cycles of the modulation found in the pulse pressure; Michard 2000";
  }
  return n;
}

// What arterial pressure alone can and cannot say (said before the other notes).
void note_arterial_alone(std::vector<std::string>& notes, const RecordSummary& s,
                         const Thresholds& t) {
  if (s.has_breath_channel) return;
  std::string note =
      "Arterial pressure alone: the record has no airway pressure, flow or respiration channel, "
      "so breaths, breathing effort, tidal volume and compliance cannot be seen. Beats, heart "
      "rate, rhythm and pulse pressure come from the arterial pressure. ";
  if (s.cycles == CycleSource::set_rate) {
    note +=
        "PPV is taken over whole respiratory cycles of 60/RR s at the respiratory rate as set (" +
        format_number(in_per_min(*s.set_rr), 1) +
        " /min): it holds only if the patient breathes at that rate, every breath delivered by "
        "the ventilator.";
  } else {
    note += "No respiratory rate was set (" + field_name("rr", FieldContext::command_line) +
            "): each window's respiratory rate is the respiratory modulation found in the pulse "
            "pressure itself, the highest peak of the Lomb-Scargle periodogram of the beats' pulse "
            "pressures between " +
            format_number(in_per_min(t.get<Frequency>("waveform.modulation_rr_min")), 0) + " and " +
            format_number(in_per_min(t.get<Frequency>("waveform.modulation_rr_max")), 0) +
            " /min (Lomb, Astrophys Space Sci 1976; Scargle, Astrophys J 1982; the approach of "
            "finding the respiratory period in the pulse pressure after Aboy et al., IEEE Trans "
            "Biomed Eng 2004;51:2198, from memory), and PPV is taken over whole cycles of that "
            "period. This is an estimate: it assumes the modulation comes from the ventilator's "
            "breaths, which the signals cannot show.";
    if (s.windows_without_modulation > 0) {
      note += " In " + std::to_string(s.windows_without_modulation) + " of " +
              std::to_string(s.windows) +
              " windows no modulation stood out (false-alarm probability above " +
              format_number(in_percent(t.get<Ratio>("waveform.modulation_false_alarm_max")), 0) +
              " %): no PPV there.";
    }
  }
  if (s.cycles == CycleSource::set_rate && s.windows_rate_mismatch > 0 && s.mismatch_rate) {
    note += " In " + std::to_string(s.windows_rate_mismatch) + " of " + std::to_string(s.windows) +
            " windows the pulse pressure is clearly modulated at another rate (median " +
            format_number(in_per_min(*s.mismatch_rate), 1) + " /min, more than " +
            format_number(in_percent(t.get<Ratio>("waveform.set_rate_mismatch")), 0) +
            " % from the set rate): the patient may breathe above the set rate (breathing "
            "effort), or the rate given is not the one set; the PPV over cycles of the set rate "
            "may then be wrong there.";
  }
  note += " The conditions it cannot check are listed as unknown unless stated.";
  notes.push_back(note);
}

}  // namespace

std::string progress_text(Time done, std::optional<Time> total) {
  std::string out = "breathbeat wave: " + format_number(in_seconds(done), 0) + " s";
  if (total && in_seconds(*total) > 0) {
    const double share = std::min(1.0, in_seconds(done) / in_seconds(*total));
    out += " of " + format_number(in_seconds(*total), 0) + " s analysed (" +
           format_number(100 * share, 0) + " %)";
  } else {
    out += " of the record analysed";
  }
  return out;
}

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
  a.inputs.push_back({"breath_channel",
                      s.has_breath_channel
                          ? s.breath_channel + " (" + to_string(s.breath_signal) + ")"
                          : std::string("none (arterial pressure alone)"),
                      "Breath channel"});
  a.inputs.push_back({"start", as_seconds(s.start, 1), "Start of the stretch analysed"});
  // What the user stated that the signals cannot show.
  add_stated(a, "passive", s.stated.passive);
  add_stated(a, "regular_rhythm", s.stated.regular_rhythm);
  add_stated(a, "closed_chest", s.stated.closed_chest);
  add_stated(a, "iah", s.stated.intra_abdominal_hypertension);
  add_stated(a, "rv_failure", s.stated.rv_failure);
  if (s.stated.pbw)
    a.inputs.push_back({"pbw", as_kg(*s.stated.pbw, 1), "Predicted body weight (sex, height)"});
  if (s.set_rr) a.inputs.push_back({"rr", as_per_min(*s.set_rr, 1), "Respiratory rate (set)"});
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
  if (s.has_breath_channel) {
    add(a, "breaths", "Breaths", count_shown(s.breaths, "{breaths}", "breaths"));
  } else {
    add(a, "respiratory_cycles", "Respiratory cycles (no breath channel)",
        count_shown(s.cycles_analysed, "{cycles}", "cycles"),
        s.cycles == CycleSource::set_rate ? "60/RR s at the set rate"
                                          : "of the modulation found in the pulse pressure");
  }
  if (s.heart_rate)
    add(a, "heart_rate", "Heart rate (accepted beats)", as_per_min(*s.heart_rate, 0));
  if (s.respiratory_rate) {
    const char* how = s.cycles == CycleSource::set_rate ? "as set"
                      : s.cycles == CycleSource::pulse_modulation
                          ? "median of the windows' pulse-pressure modulation (estimate)"
                          : "";
    add(a, "respiratory_rate", "Respiratory rate", as_per_min(*s.respiratory_rate, 1), how);
  }
  if (s.hr_rr_ratio) add(a, "hr_rr_ratio", "HR/RR", as_number(in_fraction(*s.hr_rr_ratio), 1));
  if (s.map) add(a, "map", "Mean arterial pressure, median", as_mmHg(*s.map, 0), "accepted beats");
  if (s.pulse_pressure) {
    add(a, "pulse_pressure", "Pulse pressure, median", as_mmHg(*s.pulse_pressure, 0),
        "accepted beats");
  }
  if (s.ppv) {
    add(a, "ppv",
        s.cycles == CycleSource::breaths ? "PPV, median (p10-p90) over breaths"
                                         : "PPV, median (p10-p90) over cycles",
        ppv_shown(*s.ppv), cycles_words(s));
  } else if (s.breaths_with_ppv > 0) {
    // As for a typed PPV (ppv.min_breaths): too few breaths give no PPV.
    const std::string need =
        "at least " + std::to_string(s.min_breaths) + " breaths with a PPV (the record has " +
        std::to_string(s.breaths_with_ppv) + "; " + t.source("ppv.min_breaths") + ")";
    a.skipped.push_back(Skipped{"ppv", "PPV", {Need{need}}});
  } else if (s.cycles == CycleSource::pulse_modulation && s.cycles_analysed == 0) {
    // Arterial pressure alone, no modulation found: the set rate would do.
    a.skipped.push_back(
        Skipped{"ppv",
                "PPV",
                {Need{"rr", "", {}},
                 Need{"a respiratory modulation of the pulse pressure the periodogram can find, "
                      "or an airway pressure, flow or respiration channel"}}});
  } else {
    // Not a field: the record itself lacks such breaths (the need is printed as it is).
    const std::string need =
        std::string(s.cycles == CycleSource::breaths ? "breaths" : "respiratory cycles") +
        " with at least " + format_number(t.number("waveform.min_beats_per_breath"), 0) +
        " accepted beats";
    a.skipped.push_back(Skipped{"ppv", "PPV", {Need{need}}});
  }
  if (s.spv)
    add(a, "spv",
        s.cycles == CycleSource::breaths ? "SPV, median over breaths" : "SPV, median over cycles",
        as_mmHg(*s.spv, 1), "Perel 1987");
  if (s.mean_airway_pressure) {
    add(a, "mean_airway_pressure", "Mean airway pressure", as_cmH2O(*s.mean_airway_pressure, 1),
        "time average over whole breaths");
  }
  if (s.ppeak) add(a, "ppeak", "Peak airway pressure, median", as_cmH2O(*s.ppeak, 1));
  if (s.peep) add(a, "peep", "PEEP (end-expiratory), median", as_cmH2O(*s.peep, 1));
  if (s.vt)
    add(a, "vt", "Tidal volume, median", as_mL(*s.vt, 0), "flow integrated, drift corrected");
  if (s.vt_per_kg) {
    add(a, "vt_per_kg", "VT per kg PBW, median", as_mL_per_kg(*s.vt_per_kg, 1),
        "PBW from sex and height; ARDS Network 2000");
  }
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
  a.gates = shown_gates(s.gates);
  if (s.reading) a.reading = shown_reading(*s.reading);
  note_arterial_alone(a.notes, s, t);
  for (const std::string& n : s.notes) a.notes.push_back(n);
  if (s.set_rr_unused) {
    a.notes.push_back("The set respiratory rate (" + field_name("rr", FieldContext::command_line) +
                      ") was not used: the breaths come from channel " + s.breath_channel +
                      ", which measures them.");
  }
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
  j["vt_per_kg"] = optional_json(w.vt_per_kg, [](VolumePerMass v) { return as_mL_per_kg(v, 1); });
  j["cycles"] = to_string(w.cycles);
  if (w.cycles != CycleSource::breaths) j["cycles_analysed"] = w.cycles_analysed;
  if (w.modulation) {
    nlohmann::ordered_json m = to_json(as_per_min(w.modulation->rate, 1));
    m["false_alarm"] = w.modulation->false_alarm;
    m["power"] = w.modulation->power;
    m["beats"] = w.modulation->beats;
    j["modulation"] = m;
  }
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
  out["cycles"] = to_string(s.cycles);
  if (s.cycles != CycleSource::breaths) out["cycles_analysed"] = s.cycles_analysed;
  if (s.cycles == CycleSource::pulse_modulation)
    out["windows_without_modulation"] = s.windows_without_modulation;
  if (s.cycles == CycleSource::set_rate) out["windows_rate_mismatch"] = s.windows_rate_mismatch;
  if (s.has_pressure) {
    out["mean_airway_pressure"] =
        optional_json(s.mean_airway_pressure, [](Pressure p) { return as_cmH2O(p, 1); });
  }
  for (const char* key : {"results", "skipped", "gates", "reading", "notes", "cautions"})
    out[key] = j[key];
  return out;
}

}  // namespace bb::wave
