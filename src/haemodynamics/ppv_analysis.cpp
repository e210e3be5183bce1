// calc ppv: validation, results, gates, reading and the answer shown.
#include <algorithm>

#include "breathbeat/cautions.hpp"
#include "breathbeat/haemodynamics.hpp"

namespace bb {

namespace {

std::string mm(Pressure p) {
  return format_number(in_mmHg(p), 1) + " mmHg";
}

// Runs a plausibility check but names the exact place in the list on failure.
template <class Q>
void check_plausible_as(const Thresholds& t, std::string_view range, Q value,
                        const std::string& name) {
  try {
    t.check_plausible(range, value);
  } catch (const InputError& e) {
    throw InputError(name, e.value(), e.problem(), e.expected());
  }
}

void require_positive(Pressure p, const std::string& name) {
  if (p > mmHg(0.0)) return;
  throw InputError(name, mm(p), "must be positive", "a pressure above 0 mmHg");
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
    const std::string at = "cycles (breath " + std::to_string(i + 1);
    require_positive(cycles[i].pp_max, at + ", PPmax)");
    require_positive(cycles[i].pp_min, at + ", PPmin)");
    check_plausible_as(t, "pulse_pressure", cycles[i].pp_max, at + ", PPmax)");
    check_plausible_as(t, "pulse_pressure", cycles[i].pp_min, at + ", PPmin)");
    if (cycles[i].pp_min > cycles[i].pp_max) {
      throw InputError(at + ")", mm(cycles[i].pp_max) + "/" + mm(cycles[i].pp_min),
                       "PPmin " + mm(cycles[i].pp_min) + " is above PPmax " + mm(cycles[i].pp_max),
                       "PPmax/PPmin with PPmax first, PPmin at most PPmax");
    }
  }
  require_breaths(cycles.size(), "cycles", t);
}

void validate_beat(const ArterialBeat& beat, const std::string& at, const Thresholds& t) {
  require_positive(beat.sbp, at + ", SBP)");
  require_positive(beat.dbp, at + ", DBP)");
  check_plausible_as(t, "sbp", beat.sbp, at + ", SBP)");
  check_plausible_as(t, "dbp", beat.dbp, at + ", DBP)");
  if (beat.dbp < beat.sbp) return;
  throw InputError(at + ")", mm(beat.sbp) + "/" + mm(beat.dbp),
                   "DBP " + mm(beat.dbp) + " is not below SBP " + mm(beat.sbp),
                   "SBP/DBP with systolic first and diastolic below it");
}

void validate_beats(const std::vector<BreathBeats>& breaths, const Thresholds& t) {
  for (std::size_t b = 0; b < breaths.size(); ++b) {
    const std::string breath = "beats (breath " + std::to_string(b + 1);
    if (breaths[b].size() < 2) {
      throw InputError(breath + ")", std::to_string(breaths[b].size()) + " beat(s)",
                       "has fewer than 2 beats, so it has no pulse-pressure extremes",
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
void add_alternatives(const std::vector<Gate>& gates, std::vector<std::string>& notes) {
  if (!any_gate_failed(gates)) return;
  if (gate_failed(gates, "vt_per_kg_pbw")) {
    notes.push_back(
        "With VT below the gate, a tidal-volume challenge (6 to 8 mL/kg PBW, then the rise in "
        "PPV) can still test preload responsiveness (Myatra et al., Crit Care Med 2017;45:415): "
        "calc preload-test --kind vt-challenge.");
  }
  if (gate_failed(gates, "no_intra_abdominal_hypertension")) return;  // PLR is blunted by IAH too
  notes.push_back(
      "A passive leg raising test judged by cardiac output does not need these ventilation and "
      "rhythm conditions (Monnet et al., Crit Care Med 2006;34:1402): calc preload-test --kind "
      "plr.");
}

// Beats listed per breath approximate HR/RR when every beat of each breath was entered.
void add_beats_per_breath(const std::vector<BreathBeats>& breaths,
                          std::vector<std::string>& notes) {
  std::size_t beats = 0;
  for (const BreathBeats& b : breaths) beats += b.size();
  const double per_breath = static_cast<double>(beats) / static_cast<double>(breaths.size());
  notes.push_back(
      "On average " + format_number(per_breath, 1) +
      " beats were listed per breath; if every beat was entered this approximates HR/RR.");
}

}  // namespace

void validate_ppv(const PpvInputs& in, const Thresholds& t) {
  if (!in.cycles.empty() && !in.beats.empty()) {
    throw InputError(
        "beats", "", "was given together with cycles",
        "either cycles (PPmax/PPmin per breath) or beats (SBP/DBP per beat), not both");
  }
  if (in.cycles.empty() && in.beats.empty() && !in.svv) {
    throw InputError("cycles", "", "is missing",
                     "PPmax/PPmin per breath (cycles), SBP/DBP per beat (beats), or an SVV");
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
    require_positive(*in.sbp, "sbp");
    t.check_plausible("sbp", *in.sbp);
  }
  if (in.dbp) {
    require_positive(*in.dbp, "dbp");
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
    r.skipped.push_back({"spv", "Systolic pressure variation", {"--beats (SBP/DBP per beat)"}});
  }

  if (!sbps.empty()) {
    r.map_estimate = mean_arterial_pressure_estimate(mean_of(sbps), mean_of(dbps));
    r.notes.push_back("MAP estimated from the mean SBP and DBP of all " +
                      std::to_string(sbps.size()) +
                      " beats; prefer a measured mean when the monitor shows one.");
  } else if (in.sbp && in.dbp) {
    r.map_estimate = mean_arterial_pressure_estimate(*in.sbp, *in.dbp);
  } else {
    r.skipped.push_back({"map", "MAP estimate", {"--beats", "or --sbp and --dbp"}});
  }

  const PpvConditions& c = in.conditions;
  if (c.hr && c.rr) {
    r.hr_rr_ratio = heart_rate_to_respiratory_rate_ratio(*c.hr, *c.rr);
  } else {
    r.skipped.push_back({"hr_rr_ratio", "HR/RR ratio", {"--hr", "--rr"}});
  }

  r.svv = in.svv;
  r.gates = ppv_gates(c, t);
  add_alternatives(r.gates, r.notes);
  if (!in.beats.empty()) add_beats_per_breath(in.beats, r.notes);
  if (r.ppv) {
    r.reading = read_ppv(*r.ppv, r.gates, t);
    r.notes.push_back("PPV is the mean of " + std::to_string(r.ppv_per_breath.size()) +
                      " breaths, each (PPmax - PPmin) / mean of the two.");
  }
  if (in.svv) {
    r.svv_reading = read_svv(*in.svv, r.gates, t);
    if (r.reading) {
      r.notes.push_back("SVV reading: " + r.svv_reading->text);
    } else {
      r.reading = r.svv_reading;
    }
  }
  return r;
}

namespace {

std::string yes_no(bool v) {
  return v ? "yes" : "no";
}

void add_inputs(const PpvInputs& in, Answer& a) {
  const std::size_t breaths = in.cycles.empty() ? in.beats.size() : in.cycles.size();
  if (breaths > 0) a.inputs.push_back({"breaths", as_number(static_cast<double>(breaths), 0)});
  if (in.sbp) a.inputs.push_back({"sbp", as_mmHg(*in.sbp)});
  if (in.dbp) a.inputs.push_back({"dbp", as_mmHg(*in.dbp)});
  if (in.svv) a.inputs.push_back({"svv", as_percent(*in.svv)});
  const PpvConditions& c = in.conditions;
  if (c.hr) a.inputs.push_back({"hr", as_per_min(*c.hr)});
  if (c.rr) a.inputs.push_back({"rr", as_per_min(*c.rr)});
  if (c.vt_per_kg) a.inputs.push_back({"vt_per_kg_pbw", as_mL_per_kg(*c.vt_per_kg)});
  if (c.crs) a.inputs.push_back({"crs", as_mL_per_cmH2O(*c.crs)});
  if (c.passive) a.inputs.push_back({"passive", yes_no(*c.passive)});
  if (c.regular_rhythm) a.inputs.push_back({"regular_rhythm", yes_no(*c.regular_rhythm)});
  if (c.closed_chest) a.inputs.push_back({"closed_chest", yes_no(*c.closed_chest)});
  if (c.intra_abdominal_hypertension) {
    a.inputs.push_back({"intra_abdominal_hypertension", yes_no(*c.intra_abdominal_hypertension)});
  }
  if (c.rv_failure) a.inputs.push_back({"rv_failure", yes_no(*c.rv_failure)});
}

}  // namespace

Answer describe_ppv(const PpvInputs& in, const PpvResults& r, const Thresholds& /*t*/) {
  Answer a;
  a.command = "calc ppv";
  a.title = "pulse pressure variation";
  add_inputs(in, a);
  if (r.ppv) {
    a.results.push_back(
        {"ppv", "Pulse pressure variation (PPV)", as_percent(*r.ppv), "mean over breaths"});
    const auto [lo, hi] = std::minmax_element(r.ppv_per_breath.begin(), r.ppv_per_breath.end());
    a.results.push_back({"ppv_lowest_breath", "PPV, lowest single breath", as_percent(*lo), ""});
    a.results.push_back({"ppv_highest_breath", "PPV, highest single breath", as_percent(*hi), ""});
  }
  if (r.spv)
    a.results.push_back(
        {"spv", "Systolic pressure variation (SPV)", as_mmHg(*r.spv, 1), "mean over breaths"});
  if (r.map_estimate)
    a.results.push_back(
        {"map", "Mean arterial pressure", as_mmHg(*r.map_estimate), "estimate DBP + PP/3"});
  if (r.hr_rr_ratio)
    a.results.push_back({"hr_rr_ratio", "HR/RR ratio", as_fraction(*r.hr_rr_ratio, 1), ""});
  if (r.svv)
    a.results.push_back({"svv", "Stroke volume variation (SVV)", as_percent(*r.svv), "as given"});
  a.skipped = r.skipped;
  a.gates = r.gates;
  a.reading = r.reading;
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
