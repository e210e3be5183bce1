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

Gate ivc_gate(const char* key, const char* source) {
  Gate g{key, GateState::unknown, source};
  g.of = GateOf::ivc;
  g.condition = key;
  return g;
}

Gate stated_absent(const char* key, const std::optional<bool>& present, const char* source) {
  Gate g = ivc_gate(key, source);
  if (!present) return g;
  g.basis = GateBasis::stated;
  g.state = *present ? GateState::failed : GateState::met;
  return g;
}

Gate passive_gate(const IvcInputs& in) {
  Gate g = ivc_gate(
      kIvcGatePassive,
      "Barbier et al., Intensive Care Med 2004;30:1740; Feissel et al., Intensive Care Med "
      "2004;30:1834 (both studied fully ventilated, passive patients)");
  if (!in.effort_seen && in.breathing == Breathing::passive) {
    g.state = GateState::met;  // the breathing state "passive" says so
    g.basis = GateBasis::breathing_state;
  } else if (!in.effort_seen) {
    // not stated
  } else if (*in.effort_seen) {
    g.state = GateState::failed;
    g.basis = GateBasis::stated;
  } else if (in.passive_from_signals) {
    g.state = GateState::not_contradicted;
    g.basis = GateBasis::seen_in_signals;
  } else {
    g.state = GateState::met;
    g.basis = GateBasis::stated;
  }
  return g;
}

Gate tidal_volume_gate(const IvcInputs& in, const Thresholds& limits) {
  Gate g = ivc_gate(kIvcGateVtPerKg, "");
  g.source = limits.source("ivc.vt_per_kg_min");
  g.cut_off = in_mL_per_kg(limits.get<VolumePerMass>("ivc.vt_per_kg_min"));
  g.unit = "mL/kg";
  if (!in.vt_per_kg) return g;
  g.basis = GateBasis::measured;
  g.value = in_mL_per_kg(*in.vt_per_kg);
  // Compared in mL/kg, so that the rounding tolerance is that of the bedside unit.
  g.state = cutoff::at_least(*g.value, g.cut_off) ? GateState::met : GateState::failed;
  return g;
}

// The conditions of the passive-ventilation indices (distensibility, variation),
// each with the direction it biases them ([bias.ivc.*] in presets/thresholds/ivc.toml).
std::vector<Gate> passive_ventilation_gates(const IvcInputs& in, const Thresholds& limits) {
  std::vector<Gate> gates{
      passive_gate(in),
      tidal_volume_gate(in, limits),
      stated_absent(kIvcGateNoIah, in.iah, "common practice, no source"),
      stated_absent(kIvcGateNoRvFailure, in.rv_failure, "common practice, no source"),
  };
  apply_bias(gates, "ivc", limits);
  return gates;
}

// ---- reading ------------------------------------------------------------------

// Distensibility and variation come from the same two diameters: one reading,
// weighed by the direction of each condition (weighed_reading).
Reading passive_reading(const IvcResults& r, const Thresholds& limits) {
  const Ratio dist_cut = limits.get<Ratio>("ivc.distensibility_responsive_above");
  const Ratio var_cut = limits.get<Ratio>("ivc.variation_responsive_above");
  const bool dist_above = cutoff::above(*r.distensibility, dist_cut);
  const bool var_above = cutoff::above(*r.variation, var_cut);
  Reading reading{"ivc", "", {"ivc_distensibility", "ivc_variation"}};
  reading.values = {
      ReadValue{in_percent(*r.distensibility), {in_percent(dist_cut)}, dist_above},
      ReadValue{in_percent(*r.variation), {in_percent(var_cut)}, var_above},
  };
  if (dist_above && var_above) {
    reading.category = kIvcResponsive;
    return weighed_reading(std::move(reading), Pointing::responsive, r.gates);
  }
  if (!dist_above && !var_above) {
    reading.category = kIvcNotResponsive;
    return weighed_reading(std::move(reading), Pointing::unresponsive, r.gates);
  }
  reading.category = kIvcDiscordant;
  return weighed_reading(std::move(reading), Pointing::neither, r.gates);
}

Reading not_weighed(const char* category, NotWeighed why, std::vector<std::string> basis = {}) {
  Reading r{"ivc", category, std::move(basis)};
  r.not_weighed = why;
  return r;
}

Reading ivc_reading(const IvcInputs& in, const IvcResults& r, const Thresholds& limits) {
  if (!r.distensibility) return not_weighed(kIvcNotInterpretable, NotWeighed::no_values);
  if (!in.breathing) return not_weighed(kIvcNotInterpretable, NotWeighed::breathing_not_stated);
  switch (*in.breathing) {
    case Breathing::passive:
      return passive_reading(r, limits);
    case Breathing::assisted:
      return not_weighed(kIvcNotApplicable, NotWeighed::assisted_breathing);
    case Breathing::unassisted:
      return not_weighed(kIvcNotApplicable, NotWeighed::unassisted_breathing,
                         {"ivc_collapsibility"});
  }
  return Reading{"ivc", kIvcNotInterpretable, {}};
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
