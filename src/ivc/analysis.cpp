// IVC analysis: validation, indices, the RAP estimate, the validity gates and
// the reading. Inputs are named by field id; src/present/ivc_answer.cpp words
// the results.
#include <cmath>
#include <cstdio>

#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

// A number as the reading and the gates print it (rounded half away from zero,
// as every presenter rounds).
std::string shown_cm(Length l) {
  return format_number(in_cm(l), 2) + " cm";
}
std::string shown_percent(Ratio r) {
  return format_number(in_percent(r), 1) + " %";
}
std::string shown_mL_per_kg(VolumePerMass v) {
  return format_number(in_mL_per_kg(v), 1) + " mL/kg";
}

void require_positive(const std::optional<Length>& d, const char* field) {
  if (!d || d->value() > 0.0) return;
  throw InputError(field, shown_cm(*d), "is not above zero",
                   "a diameter above zero, in cm (default) or mm");
}

// Plausibility (presets/plausibility.toml key `key`), reported on field `id`.
template <class Q>
void check_plausible(const Thresholds& limits, const char* id, const char* key, Q value) {
  try {
    limits.check_plausible(key, value);
  } catch (const InputError& e) {
    throw InputError(id, e.value(), e.problem(), e.expected());
  }
}

// ---- gates --------------------------------------------------------------------

Gate stated_absent(const char* key, const char* label, const std::optional<bool>& present,
                   const char* failed_detail, const char* source) {
  Gate g{key, label, GateState::unknown, "", source};
  if (!present) {
    g.detail = "not stated";
  } else if (*present) {
    g.state = GateState::failed;
    g.detail = failed_detail;
  } else {
    g.state = GateState::met;
    g.detail = "stated absent";
  }
  return g;
}

Gate passive_gate(const IvcInputs& in) {
  Gate g{kIvcGatePassive, "Fully passive patient (no breathing effort)", GateState::unknown, "",
         "Barbier et al., Intensive Care Med 2004;30:1740; Feissel et al., Intensive Care Med "
         "2004;30:1834 (both studied fully ventilated, passive patients)"};
  if (!in.effort_seen && in.breathing == Breathing::passive) {
    g.state = GateState::met;  // the breathing state "passive" says so
    g.detail = "stated: passive breathing state (controlled ventilation, no breathing effort)";
  } else if (!in.effort_seen) {
    g.detail = "not stated";
  } else if (*in.effort_seen) {
    g.state = GateState::failed;
    g.detail = "breathing effort was seen";
  } else if (in.passive_from_signals) {
    g.state = GateState::not_contradicted;
    g.detail = "the recorded signals show no breathing effort, which does not prove it";
  } else {
    g.state = GateState::met;
    g.detail = "stated: no breathing effort";
  }
  return g;
}

Gate tidal_volume_gate(const IvcInputs& in, const Thresholds& limits) {
  const auto vt_min = limits.get<VolumePerMass>("ivc.vt_per_kg_min");
  const std::string floor = shown_mL_per_kg(vt_min);
  Gate g{kIvcGateVtPerKg, "Tidal volume at least " + floor, GateState::unknown, "",
         limits.source("ivc.vt_per_kg_min")};
  if (!in.vt_per_kg) {
    g.detail = "not given";
    return g;
  }
  const std::string given = shown_mL_per_kg(*in.vt_per_kg);
  // Compared in mL/kg, so that the rounding tolerance is that of the bedside unit.
  const bool met = cutoff::at_least(in_mL_per_kg(*in.vt_per_kg), in_mL_per_kg(vt_min));
  g.state = met ? GateState::met : GateState::failed;
  g.detail = given + (met ? " (at or above " : " (below ") + floor + ")";
  return g;
}

// The conditions of the passive-ventilation indices (distensibility, variation),
// each with the direction it biases them ([bias.ivc.*] in presets/thresholds/ivc.toml).
std::vector<Gate> passive_ventilation_gates(const IvcInputs& in, const Thresholds& limits) {
  std::vector<Gate> gates{
      passive_gate(in),
      tidal_volume_gate(in, limits),
      stated_absent(kIvcGateNoIah, "No intra-abdominal hypertension", in.iah,
                    "intra-abdominal hypertension is present: raised abdominal pressure "
                    "compresses the IVC",
                    "common practice, no source"),
      stated_absent(kIvcGateNoRvFailure, "No severe RV failure or tricuspid regurgitation",
                    in.rv_failure,
                    "severe RV failure or TR is present: a congested IVC varies little "
                    "whatever the preload",
                    "common practice, no source"),
  };
  const char* failed_as[] = {"breathing effort", "a low tidal volume",
                             "intra-abdominal hypertension",
                             "RV failure or tricuspid regurgitation"};
  for (std::size_t i = 0; i < gates.size(); ++i) gates[i].failed_as = failed_as[i];
  apply_bias(gates, "ivc", limits);
  return gates;
}

// ---- reading ------------------------------------------------------------------

// Distensibility and variation come from the same two diameters: one reading,
// weighed by the direction of each condition (directional_reading).
Reading passive_reading(const IvcResults& r, const Thresholds& limits) {
  const Ratio dist_cut = limits.get<Ratio>("ivc.distensibility_responsive_above");
  const Ratio var_cut = limits.get<Ratio>("ivc.variation_responsive_above");
  const bool dist_above = cutoff::above(*r.distensibility, dist_cut);
  const bool var_above = cutoff::above(*r.variation, var_cut);
  const std::string subject = "IVC distensibility " + shown_percent(*r.distensibility) +
                              (dist_above ? " > " : " <= ") + shown_percent(dist_cut) +
                              ", variation " + shown_percent(*r.variation) +
                              (var_above ? " > " : " <= ") + shown_percent(var_cut) + ":";
  Reading reading{"ivc", "", "", {"ivc_distensibility", "ivc_variation"}};
  if (dist_above && var_above) {
    reading.category = kIvcResponsive;
    return directional_reading(std::move(reading), Pointing::responsive, subject,
                               "suggests preload responsiveness", r.gates);
  }
  if (!dist_above && !var_above) {
    reading.category = kIvcNotResponsive;
    return directional_reading(std::move(reading), Pointing::unresponsive, subject,
                               "preload responsiveness not shown by the IVC", r.gates);
  }
  reading.category = kIvcDiscordant;
  return directional_reading(std::move(reading), Pointing::neither, subject,
                             "the two IVC indices disagree; no conclusion from the IVC alone",
                             r.gates);
}

Reading ivc_reading(const IvcInputs& in, const IvcResults& r, const Thresholds& limits) {
  if (!r.distensibility) {
    return Reading{"ivc", kIvcNotInterpretable, "No IVC diameters were given.", {}};
  }
  if (!in.breathing) {
    return Reading{"ivc",
                   kIvcNotInterpretable,
                   "The breathing state was not stated; which index applies depends on it.",
                   {}};
  }
  switch (*in.breathing) {
    case Breathing::passive:
      return passive_reading(r, limits);
    case Breathing::assisted:
      return Reading{"ivc",
                     kIvcNotApplicable,
                     "Breathing effort on positive pressure (pressure support, CPAP): the "
                     "responsiveness cut-offs of distensibility and variation were found in "
                     "passive ventilation and the right-atrial pressure table in unassisted "
                     "breathing; neither applies.",
                     {}};
    case Breathing::unassisted:
      return Reading{"ivc",
                     kIvcNotApplicable,
                     "Unassisted breathing: the responsiveness cut-offs of distensibility and "
                     "variation were found in passive ventilation and do not apply. "
                     "Collapsibility serves the right-atrial pressure estimate.",
                     {"ivc_collapsibility"}};
  }
  return Reading{"ivc", kIvcNotInterpretable, "", {}};
}

}  // namespace

void validate_ivc(const IvcInputs& in, const Thresholds& limits) {
  require_positive(in.dmax, "ivc_dmax");
  require_positive(in.dmin, "ivc_dmin");
  if (in.dmax && in.dmin && *in.dmin > *in.dmax) {
    throw InputError("ivc_dmin", shown_cm(*in.dmin),
                     "is larger than Dmax (" + shown_cm(*in.dmax) + ")",
                     "Dmin at or below Dmax: Dmax is the widest and Dmin the narrowest diameter "
                     "over the breath");
  }
  if (in.vt_per_kg && in.vt_per_kg->value() <= 0.0) {
    throw InputError("vt_per_kg", shown_mL_per_kg(*in.vt_per_kg), "is not above zero",
                     "a tidal volume per kg above zero, in mL/kg");
  }
  // Assisted and unassisted breathing are breathing effort: "no effort" contradicts them.
  if (in.breathing && *in.breathing != Breathing::passive && in.effort_seen == false) {
    const std::string state = to_string(*in.breathing);
    throw InputError("passive", "passive, with " + state + " breathing during the IVC scan",
                     "contradicts " + state + " breathing",
                     "a passive patient only when fully ventilated, without breathing effort");
  }
  if (in.dmax) check_plausible(limits, "ivc_dmax", "dmax", *in.dmax);
  if (in.dmin) check_plausible(limits, "ivc_dmin", "dmin", *in.dmin);
  if (in.vt_per_kg) check_plausible(limits, "vt_per_kg", "vt_per_kg", *in.vt_per_kg);
}

std::vector<Gate> ivc_gates(const IvcInputs& in, const Thresholds& limits) {
  if (!in.breathing) return {};
  switch (*in.breathing) {
    case Breathing::passive:
      return passive_ventilation_gates(in, limits);
    case Breathing::assisted:    // no IVC reading applies
    case Breathing::unassisted:  // the RAP table rests on no other stated fact
      return {};
  }
  return {};
}

IvcResults analyse_ivc(const IvcInputs& in, const Thresholds& limits) {
  IvcResults r;
  r.gates = ivc_gates(in, limits);
  if (in.dmax && in.dmin) {
    r.collapsibility = ivc_collapsibility(*in.dmax, *in.dmin);
    r.distensibility = ivc_distensibility(*in.dmax, *in.dmin);
    r.variation = ivc_respiratory_variation(*in.dmax, *in.dmin);
  } else {
    const std::vector<Need> diameters = {Need{"ivc_dmax"}, Need{"ivc_dmin"}};
    r.skipped.push_back(Skipped{"ivc_collapsibility", "IVC collapsibility", diameters});
    r.skipped.push_back(Skipped{"ivc_distensibility", "IVC distensibility", diameters});
    r.skipped.push_back(Skipped{"ivc_variation", "IVC respiratory variation", diameters});
  }
  r.collapsibility_applies = in.breathing == Breathing::unassisted;
  r.distensibility_applies = in.breathing == Breathing::passive;
  r.variation_applies = in.breathing == Breathing::passive;

  if (in.breathing == Breathing::unassisted && r.collapsibility) {
    r.rap = right_atrial_pressure_from_ivc(*in.dmax, *r.collapsibility, limits);
    r.notes.push_back(IvcNote::sniff_collapse);
  } else {
    r.skipped.push_back(
        Skipped{"rap_estimate",
                "Right-atrial pressure estimate (unassisted breathing only)",
                {Need{"ivc_breathing", "unassisted"}, Need{"ivc_dmax"}, Need{"ivc_dmin"}}});
  }
  if (in.breathing == Breathing::passive) {
    r.notes.push_back(IvcNote::collapsibility_for_completeness);
  } else if (in.breathing == Breathing::assisted) {
    r.notes.push_back(IvcNote::indices_for_completeness);
  } else if (in.breathing == Breathing::unassisted) {
    r.notes.push_back(IvcNote::distensibility_for_completeness);
  }
  r.notes.push_back(IvcNote::measurement_site);
  r.reading = ivc_reading(in, r, limits);
  return r;
}

}  // namespace bb
