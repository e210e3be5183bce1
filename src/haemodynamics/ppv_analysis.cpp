// calc ppv: validation, results, gates and reading (the answer is made in
// src/present/haemodynamics_answer.cpp).
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

std::string mm(Pressure p) {
  return format_number(in_mmHg(p), 1) + " mmHg";
}

// A value inside a list (pp_cycles, beats): the error names the field by id and
// the place in the list ("breath 2, PPmin") in its problem.
struct ListPlace {
  const char* field;
  std::string where;  // "" for a value that is not in a list
};

std::string placed(const ListPlace& at, const std::string& problem) {
  return at.where.empty() ? problem : at.where + " " + problem;
}

// Runs a plausibility check but names the exact place in the list on failure.
template <class Q>
void check_plausible_as(const Thresholds& t, std::string_view range, Q value, const ListPlace& at) {
  try {
    t.check_plausible(range, value);
  } catch (const InputError& e) {
    throw InputError(at.field, e.value(), placed(at, e.problem()), e.expected());
  }
}

void require_positive(Pressure p, const ListPlace& at) {
  if (p > mmHg(0.0)) return;
  throw InputError(at.field, mm(p), placed(at, "must be positive"), "a pressure above 0 mmHg");
}

void require_breaths(std::size_t n, const char* field, const Thresholds& t) {
  const double min = t.number("ppv.min_breaths");
  if (static_cast<double>(n) >= min) return;
  throw InputError(
      field, std::to_string(n) + " breath(s)",
      "has fewer breaths than PPV needs (it is averaged over at least " + format_number(min, 0) +
          " breaths)",
      "at least " + format_number(min, 0) + " breaths (" + t.source("ppv.min_breaths") + ")");
}

void validate_cycles(const std::vector<BreathPulsePressures>& cycles, const Thresholds& t) {
  for (std::size_t i = 0; i < cycles.size(); ++i) {
    const std::string breath = "breath " + std::to_string(i + 1);
    const ListPlace pp_max{"pp_cycles", breath + ", PPmax"};
    const ListPlace pp_min{"pp_cycles", breath + ", PPmin"};
    require_positive(cycles[i].pp_max, pp_max);
    require_positive(cycles[i].pp_min, pp_min);
    check_plausible_as(t, "pulse_pressure", cycles[i].pp_max, pp_max);
    check_plausible_as(t, "pulse_pressure", cycles[i].pp_min, pp_min);
    if (cycles[i].pp_min > cycles[i].pp_max) {
      throw InputError(
          "pp_cycles", mm(cycles[i].pp_max) + "/" + mm(cycles[i].pp_min),
          breath + ": PPmin " + mm(cycles[i].pp_min) + " is above PPmax " + mm(cycles[i].pp_max),
          "PPmax/PPmin with PPmax first, PPmin at most PPmax");
    }
  }
  require_breaths(cycles.size(), "pp_cycles", t);
}

void validate_beat(const ArterialBeat& beat, const std::string& at, const Thresholds& t) {
  const ListPlace sbp{"beats", at + ", SBP"};
  const ListPlace dbp{"beats", at + ", DBP"};
  require_positive(beat.sbp, sbp);
  require_positive(beat.dbp, dbp);
  check_plausible_as(t, "sbp", beat.sbp, sbp);
  check_plausible_as(t, "dbp", beat.dbp, dbp);
  if (beat.dbp < beat.sbp) return;
  throw InputError("beats", mm(beat.sbp) + "/" + mm(beat.dbp),
                   at + ": DBP " + mm(beat.dbp) + " is not below SBP " + mm(beat.sbp),
                   "SBP/DBP with systolic first and diastolic below it");
}

void validate_beats(const std::vector<BreathBeats>& breaths, const Thresholds& t) {
  for (std::size_t b = 0; b < breaths.size(); ++b) {
    const std::string breath = "breath " + std::to_string(b + 1);
    if (breaths[b].size() < 2) {
      throw InputError("beats", std::to_string(breaths[b].size()) + " beat(s)",
                       breath + " has fewer than 2 beats, so it has no pulse-pressure extremes",
                       "at least 2 beats per breath (HR/RR is normally above 3.6)");
    }
    for (std::size_t i = 0; i < breaths[b].size(); ++i) {
      validate_beat(breaths[b][i], breath + ", beat " + std::to_string(i + 1), t);
    }
  }
  require_breaths(breaths.size(), "beats", t);
}

// Zero or negative is never a measurement, even with --allow-implausible.
void require_positive_value(bool given, double value, const char* field, const char* unit) {
  if (!given || value > 0.0) return;
  throw InputError(field, format_number(value, 1) + " " + unit, "must be positive",
                   std::string("a value above 0 ") + unit);
}

void validate_conditions(const PpvConditions& c, const Thresholds& t) {
  require_positive_value(c.vt_per_kg.has_value(), c.vt_per_kg ? in_mL_per_kg(*c.vt_per_kg) : 0,
                         "vt_per_kg", "mL/kg");
  require_positive_value(c.hr.has_value(), c.hr ? in_per_min(*c.hr) : 0, "hr", "/min");
  require_positive_value(c.rr.has_value(), c.rr ? in_per_min(*c.rr) : 0, "rr", "/min");
  require_positive_value(c.crs.has_value(), c.crs ? in_mL_per_cmH2O(*c.crs) : 0, "crs", "mL/cmH2O");
  if (c.vt_per_kg) t.check_plausible("vt_per_kg", *c.vt_per_kg);
  if (c.hr) t.check_plausible("hr", *c.hr);
  if (c.rr) t.check_plausible("rr", *c.rr);
  if (c.crs) t.check_plausible("crs", *c.crs);
}

template <class Q>
Q mean_of(const std::vector<Q>& values) {
  Q sum = values.front() * 0.0;
  for (const Q& v : values) sum += v;
  return sum / static_cast<double>(values.size());
}

bool gate_failed(const std::vector<Gate>& gates, std::string_view key) {
  for (const Gate& g : gates) {
    if (g.key == key) return g.state == GateState::failed;
  }
  return false;
}

// When PPV cannot be read, say which paired test still can.
void add_alternatives(const std::vector<Gate>& gates, std::vector<PpvNote>& notes) {
  if (!any_gate_failed(gates)) return;
  if (gate_failed(gates, "vt_per_kg_pbw")) notes.push_back({PpvNoteKind::vt_challenge_instead});
  if (gate_failed(gates, "no_intra_abdominal_hypertension")) return;  // PLR is blunted by IAH too
  notes.push_back({PpvNoteKind::plr_instead});
}

// Beats listed per breath approximate HR/RR when every beat of each breath was entered.
void add_beats_per_breath(const std::vector<BreathBeats>& breaths, std::vector<PpvNote>& notes) {
  std::size_t beats = 0;
  for (const BreathBeats& b : breaths) beats += b.size();
  const double per_breath = static_cast<double>(beats) / static_cast<double>(breaths.size());
  notes.push_back({PpvNoteKind::beats_per_breath, beats, per_breath});
}

}  // namespace

void validate_ppv(const PpvInputs& in, const Thresholds& t) {
  if (!in.cycles.empty() && !in.beats.empty()) {
    throw InputError("beats", "", "was given together with the pulse pressures per breath",
                     "either PPmax/PPmin per breath or SBP/DBP per beat, not both");
  }
  if (in.cycles.empty() && in.beats.empty() && !in.svv) {
    throw InputError("pp_cycles", "", "is missing",
                     "PPmax/PPmin per breath, SBP/DBP per beat, or an SVV");
  }
  if (!in.cycles.empty()) validate_cycles(in.cycles, t);
  if (!in.beats.empty()) validate_beats(in.beats, t);
  if (in.svv) {
    if (in.svv->value() < 0.0) {
      throw InputError("svv", format_number(in_percent(*in.svv), 1) + " %", "is negative",
                       "0 % or more");
    }
    t.check_plausible("svv", *in.svv);
  }
  if (in.sbp) {
    require_positive(*in.sbp, {"sbp", ""});
    t.check_plausible("sbp", *in.sbp);
  }
  if (in.dbp) {
    require_positive(*in.dbp, {"dbp", ""});
    t.check_plausible("dbp", *in.dbp);
  }
  if (in.sbp && in.dbp && *in.dbp >= *in.sbp) {
    throw InputError("dbp", mm(*in.dbp), "is not below SBP " + mm(*in.sbp),
                     "a diastolic pressure below systolic");
  }
  validate_conditions(in.conditions, t);
}

PpvResults analyse_ppv(const PpvInputs& in, const Thresholds& t) {
  PpvResults r;
  std::vector<Pressure> spv_per_breath;
  std::vector<Pressure> sbps, dbps;
  for (const BreathPulsePressures& c : in.cycles) {
    r.ppv_per_breath.push_back(pulse_pressure_variation(c.pp_max, c.pp_min));
  }
  for (const BreathBeats& beats : in.beats) {
    const BreathExtremes e = breath_extremes(beats);
    r.ppv_per_breath.push_back(pulse_pressure_variation(e.pp_max, e.pp_min));
    spv_per_breath.push_back(systolic_pressure_variation(e.sbp_max, e.sbp_min));
    for (const ArterialBeat& b : beats) {
      sbps.push_back(b.sbp);
      dbps.push_back(b.dbp);
    }
  }
  if (!r.ppv_per_breath.empty()) r.ppv = mean_of(r.ppv_per_breath);

  if (!spv_per_breath.empty()) {
    r.spv = mean_of(spv_per_breath);
  } else {
    r.skipped.push_back({"spv", "Systolic pressure variation", {Need{"beats"}}});
  }

  if (!sbps.empty()) {
    r.map_estimate = mean_arterial_pressure_estimate(mean_of(sbps), mean_of(dbps));
    r.notes.push_back({PpvNoteKind::map_from_beats, sbps.size()});
  } else if (in.sbp && in.dbp) {
    r.map_estimate = mean_arterial_pressure_estimate(*in.sbp, *in.dbp);
  } else {
    r.skipped.push_back({"map", "MAP estimate", {Need{"beats", "", {"sbp", "dbp"}}}});
  }

  const PpvConditions& c = in.conditions;
  if (c.hr && c.rr) {
    r.hr_rr_ratio = heart_rate_to_respiratory_rate_ratio(*c.hr, *c.rr);
  } else {
    r.skipped.push_back({"hr_rr_ratio", "HR/RR ratio", {Need{"hr"}, Need{"rr"}}});
  }

  r.svv = in.svv;
  r.gates = ppv_gates(c, t);
  if (r.ppv) r.reading = read_ppv(*r.ppv, r.gates, t);
  if (in.svv) r.svv_reading = read_svv(*in.svv, r.gates, t);
  const std::optional<Reading>& first = r.reading ? r.reading : r.svv_reading;
  // Only a value its conditions leave unreadable needs another test.
  if (first && first->category == "not_interpretable") add_alternatives(r.gates, r.notes);
  if (!in.beats.empty()) add_beats_per_breath(in.beats, r.notes);
  if (r.ppv) r.notes.push_back({PpvNoteKind::ppv_mean_of_breaths, r.ppv_per_breath.size()});
  if (in.svv) {
    if (r.reading) {
      r.notes.push_back({PpvNoteKind::svv_reading});
    } else {
      r.reading = r.svv_reading;
    }
  }
  return r;
}

}  // namespace bb
