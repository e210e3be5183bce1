// Respiratory mechanics from whatever was measured: validation, results and
// the published limits they breach. Words for people: src/present/mechanics_answer.cpp.
#include <cmath>
#include <cstdio>

#include "breathbeat/cutoff.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

// A value as written back in an error message ("10.0 cmH2O").
std::string cm(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}

// A PEEP-like pressure with the registry id it came from and its people's name.
struct Named {
  std::optional<Pressure> value;
  const char* id;
  const char* name;
};

void require_not_below(const Named& high, const Named& low) {
  if (!high.value || !low.value || *high.value >= *low.value) return;
  throw InputError(high.id, cm(*high.value),
                   std::string("is below ") + low.name + " (" + cm(*low.value) + ")",
                   std::string("a value at or above ") + low.name +
                       "; check that the holds were read correctly");
}

// The plausible range of a field whose range has another name (peep_total
// uses the range "peep"); the error names the field.
template <class Q>
void check_plausible_as(const Thresholds& limits, const char* id, const char* range,
                        const std::optional<Q>& q) {
  if (!q) return;
  try {
    limits.check_plausible(range, *q);
  } catch (const InputError& e) {
    throw InputError(id, e.value(), e.problem(), e.expected(), e.where());
  }
}

}  // namespace

const char* to_string(VentMode m) {
  return m == VentMode::pressure_control ? "pc" : "vc";
}

void validate_mechanics(const MechanicsInputs& in, const Thresholds& limits) {
  if (in.height) limits.check_plausible("height", *in.height);
  if (in.vt) limits.check_plausible("vt", *in.vt);
  check_plausible_as(limits, "peep_total", "peep", in.peep_total);
  if (in.set_peep) limits.check_plausible("set_peep", *in.set_peep);
  if (in.pplat) limits.check_plausible("pplat", *in.pplat);
  if (in.ppeak) limits.check_plausible("ppeak", *in.ppeak);
  check_plausible_as(limits, "pc_pressure_total", "pinsp", in.pc_pressure_total);
  if (in.pc_pressure_above_peep)
    limits.check_plausible("pc_pressure_above_peep", *in.pc_pressure_above_peep);
  if (in.rr) limits.check_plausible("rr", *in.rr);
  if (in.ti) limits.check_plausible("ti", *in.ti);
  if (in.flow) limits.check_plausible("flow", *in.flow);
  if (in.pes_ee) limits.check_plausible("pes_ee", *in.pes_ee);
  if (in.pes_ei) limits.check_plausible("pes_ei", *in.pes_ei);
  if (in.ve) limits.check_plausible("ve", *in.ve);
  if (in.paco2) limits.check_plausible("paco2", *in.paco2);

  if (in.pc_pressure_total && in.pc_pressure_above_peep) {
    throw InputError(
        "pc_pressure_above_peep", cm(*in.pc_pressure_above_peep),
        "was given together with the total PC pressure (" + cm(*in.pc_pressure_total) + ")",
        "one of the two: the set PC pressure either as total pressure or as the "
        "pressure above PEEP");
  }
  const Named peep = in.peep_total ? Named{in.peep_total, "peep_total", "total PEEP"}
                                   : Named{in.set_peep, "set_peep", "set PEEP"};
  const Named pplat{in.pplat, "pplat", "Pplat"};
  const Named ppeak{in.ppeak, "ppeak", "Ppeak"};
  const Named pc_total{in.pc_pressure_total, "pc_pressure_total", "the total PC pressure"};
  require_not_below(pplat, peep);
  require_not_below(ppeak, pplat);
  require_not_below(ppeak, peep);
  require_not_below(pc_total, peep);
  if (in.pplat && peep.value && *in.pplat == *peep.value) {
    throw InputError(
        "pplat", cm(*in.pplat), std::string("equals ") + peep.name,
        "a plateau pressure above PEEP (a zero driving pressure leaves compliance undefined)");
  }
  if (in.ti && in.rr && in.ti->value() >= breath_period(*in.rr).value()) {
    throw InputError("ti", format_number(in_seconds(*in.ti), 2) + " s",
                     "is not shorter than the whole breath (60/RR = " +
                         format_number(in_seconds(breath_period(*in.rr)), 2) + " s)",
                     "an inspiratory time shorter than 60/RR");
  }
  // Constant-flow VC: the flow delivers VT in VT/flow, which cannot exceed Ti (Ti = flow time
  // plus any end-inspiratory pause).
  if (in.mode != VentMode::pressure_control && in.vt && in.flow && in.ti) {
    const Time flow_time = inspiratory_flow_time(*in.vt, *in.flow);
    if (cutoff::above(in_seconds(flow_time), in_seconds(*in.ti))) {
      throw InputError("flow", format_number(in_L_per_min(*in.flow), 1) + " L/min",
                       "delivers VT in VT/flow = " + format_number(in_seconds(flow_time), 2) +
                           " s, longer than Ti (" + format_number(in_seconds(*in.ti), 2) + " s)",
                       "a constant flow, VT and Ti that fit (VT/flow at most Ti); check the "
                       "three values");
    }
  }
}

MechanicsResults analyse_mechanics(const MechanicsInputs& in) {
  MechanicsResults r;
  auto skip = [&](const char* key, const char* label, std::vector<Need> needs) {
    r.skipped.push_back(Skipped{key, label, std::move(needs)});
  };
  const bool pressure_control = in.mode == VentMode::pressure_control;

  if (in.sex && in.height) {
    r.pbw = predicted_body_weight(*in.sex, *in.height);
  } else {
    skip("pbw", "Predicted body weight", {{"sex"}, {"height"}});
  }
  if (in.vt && r.pbw) {
    r.vt_per_kg = tidal_volume_per_kg(*in.vt, *r.pbw);
  } else {
    skip("vt_per_kg_pbw", "VT per kg PBW", {{"vt"}, {"sex"}, {"height"}});
  }

  if (in.peep_total) {
    r.peep_used = in.peep_total;
  } else if (in.set_peep) {
    r.peep_used = in.set_peep;
    r.notes.push_back(MechanicsNote::set_peep_stands_in);
  }

  // The PC set pressure on the total scale: given so, or set PEEP + the pressure above PEEP.
  if (in.pc_pressure_total) {
    r.pc_pressure_total = in.pc_pressure_total;
  } else if (in.pc_pressure_above_peep && (in.set_peep || in.peep_total)) {
    r.pc_pressure_total = pressure_control_total(in.set_peep ? *in.set_peep : *in.peep_total,
                                                 *in.pc_pressure_above_peep);
    if (!in.set_peep) r.notes.push_back(MechanicsNote::pc_pressure_above_total_peep);
  }

  // The end-inspiratory pressure: the plateau of a hold, or in PC without one the set
  // pressure, which equals alveolar pressure only when flow has stopped by end-inspiration.
  if (in.pplat) {
    r.plateau_used = in.pplat;
  } else if (pressure_control && r.pc_pressure_total) {
    r.plateau_used = r.pc_pressure_total;
    if (r.peep_used) r.notes.push_back(MechanicsNote::driving_pressure_from_set_pressure);
  }
  const std::vector<Need> plateau_needs =
      pressure_control ? std::vector<Need>{{"pplat", "", {"pc_pressure_total"}}}
                       : std::vector<Need>{{"pplat"}};
  auto with = [&](std::vector<Need> first, std::vector<Need> last) {
    std::vector<Need> out = std::move(first);
    out.insert(out.end(), plateau_needs.begin(), plateau_needs.end());
    out.insert(out.end(), last.begin(), last.end());
    return out;
  };

  if (r.plateau_used && r.peep_used) {
    r.driving_pressure = driving_pressure(*r.plateau_used, *r.peep_used);
  } else {
    skip("driving_pressure", "Driving pressure", with({}, {{"peep_total"}}));
  }
  if (in.vt && r.plateau_used && r.peep_used) {
    r.compliance_static = static_compliance(*in.vt, *r.plateau_used, *r.peep_used);
  } else {
    skip("compliance_static", "Static compliance", with({{"vt"}}, {{"peep_total"}}));
  }
  if (in.vt && in.ppeak && r.peep_used) {
    r.compliance_dynamic = dynamic_compliance(*in.vt, *in.ppeak, *r.peep_used);
  } else {
    skip("compliance_dynamic", "Dynamic compliance", {{"vt"}, {"ppeak"}, {"peep_total"}});
  }
  if (in.ppeak && in.pplat && in.flow && !pressure_control) {
    r.resistance_airway = airway_resistance(*in.ppeak, *in.pplat, *in.flow);
  } else {
    skip("resistance_airway", "Airway resistance (constant-flow VC only)",
         {{"ppeak"}, {"pplat"}, {"flow"}, {"mode", "vc"}});
  }
  if (r.resistance_airway && r.compliance_static) {
    r.time_constant = time_constant(*r.resistance_airway, *r.compliance_static);
  } else {
    skip("time_constant", "Time constant",
         {{"ppeak"}, {"pplat"}, {"flow"}, {"vt"}, {"peep_total"}});
  }
  if (in.peep_total && in.set_peep) {
    const Pressure pi = intrinsic_peep(*in.peep_total, *in.set_peep);
    // Below zero it is no intrinsic PEEP but a sign of a leak or a hold too short.
    if (cutoff::below(in_cmH2O(pi), 0.0)) {
      r.intrinsic_peep_below_zero = pi;
      r.notes.push_back(MechanicsNote::intrinsic_peep_negative);
    } else {
      r.intrinsic_peep = pi;
    }
  } else {
    skip("intrinsic_peep", "Intrinsic PEEP", {{"peep_total"}, {"set_peep"}});
  }

  if (pressure_control) {
    const Need pc_need{"pc_pressure_total", "", {"pc_pressure_above_peep", "set_peep"}};
    if (r.pc_pressure_total && r.peep_used && in.ti && in.rr) {
      r.mean_airway_pressure = mean_airway_pressure_pressure_control(
          *r.peep_used, *r.pc_pressure_total, *in.ti, breath_period(*in.rr));
    } else {
      skip("mean_airway_pressure", "Mean airway pressure (PC estimate)",
           {pc_need, {"peep_total"}, {"ti"}, {"rr"}});
    }
    if (in.rr && in.vt && r.pc_pressure_total && r.peep_used) {
      r.mechanical_power = mechanical_power_pressure_control(*in.rr, *in.vt, *r.peep_used,
                                                             *r.pc_pressure_total - *r.peep_used);
    } else {
      skip("mechanical_power", "Mechanical power (PC, simplified)",
           {{"rr"}, {"vt"}, pc_need, {"peep_total"}});
    }
  } else {
    if (in.ppeak && r.peep_used && in.ti && in.rr) {
      r.mean_airway_pressure = mean_airway_pressure_volume_control(*r.peep_used, *in.ppeak, *in.ti,
                                                                   breath_period(*in.rr));
    } else {
      skip("mean_airway_pressure", "Mean airway pressure (VC estimate)",
           {{"ppeak"}, {"peep_total"}, {"ti"}, {"rr"}});
    }
    if (in.rr && in.vt && in.ppeak && r.driving_pressure) {
      r.mechanical_power =
          mechanical_power_volume_control(*in.rr, *in.vt, *in.ppeak, *r.driving_pressure);
    } else {
      skip("mechanical_power", "Mechanical power (VC, simplified)",
           {{"rr"}, {"vt"}, {"ppeak"}, {"pplat"}, {"peep_total"}});
    }
    if (!in.mode) r.notes.push_back(MechanicsNote::volume_control_assumed);
  }

  if (in.ve) {
    r.minute_ventilation = in.ve;
  } else if (in.vt && in.rr) {
    r.minute_ventilation = Flow(*in.vt * *in.rr);
    r.notes.push_back(MechanicsNote::minute_ventilation_from_vt_rr);
  }
  if (r.minute_ventilation && in.paco2 && r.pbw) {
    r.ventilatory_ratio = ventilatory_ratio(*r.minute_ventilation, *in.paco2, *r.pbw);
  } else {
    skip("ventilatory_ratio", "Ventilatory ratio",
         {{"ve", "", {"vt", "rr"}}, {"paco2"}, {"sex"}, {"height"}});
  }

  if (in.pes_ee && in.pes_ei && in.vt && r.driving_pressure) {
    const Pressure delta_pes = *in.pes_ei - *in.pes_ee;
    r.oesophageal_swing = delta_pes;
    r.elastance_rs = respiratory_system_elastance(*r.driving_pressure, *in.vt);
    // The swing must lie strictly between 0 and the driving pressure: outside it Ecw or EL
    // would be zero or negative, which no chest wall or lung has; the partition is refused.
    if (cutoff::at_most(in_cmH2O(delta_pes), 0.0) ||
        cutoff::at_least(in_cmH2O(delta_pes), in_cmH2O(*r.driving_pressure))) {
      r.notes.push_back(MechanicsNote::oesophageal_swing_unreliable);
    } else {
      r.elastance_chest_wall = chest_wall_elastance(delta_pes, *in.vt);
      r.elastance_lung = lung_elastance(*r.driving_pressure, delta_pes, *in.vt);
      r.elastance_ratio_cw_rs =
          chest_wall_elastance_ratio(*r.elastance_chest_wall, *r.elastance_rs);
      r.transpulmonary_pressure_ei = transpulmonary_pressure_end_inspiratory(
          *r.plateau_used, *r.elastance_lung, *r.elastance_rs);
    }
  } else {
    const std::vector<Need> needs = with({{"pes_ee"}, {"pes_ei"}, {"vt"}}, {{"peep_total"}});
    skip("elastance_ratio_cw_rs", "Chest-wall / respiratory-system elastance", needs);
    skip("transpulmonary_pressure_ei",
         "End-inspiratory transpulmonary pressure (elastance-derived)", needs);
  }
  if (in.pes_ei && r.plateau_used) {
    r.transpulmonary_pressure_ei_direct =
        transpulmonary_pressure_end_inspiratory_direct(*r.plateau_used, *in.pes_ei);
  } else {
    skip("transpulmonary_pressure_ei_direct",
         "End-inspiratory transpulmonary pressure (direct, Pplat - Pes)", with({}, {{"pes_ei"}}));
  }
  if (in.pes_ee && r.peep_used) {
    r.transpulmonary_pressure_ee = transpulmonary_pressure_end_expiratory(*r.peep_used, *in.pes_ee);
  } else {
    skip("transpulmonary_pressure_ee", "End-expiratory transpulmonary pressure",
         {{"pes_ee"}, {"peep_total"}});
  }
  return r;
}

const char* threshold_key(MechanicsLimit l) {
  switch (l) {
    case MechanicsLimit::vt_per_kg_pbw:
      return "mechanics.vt_per_kg_pbw_max";
    case MechanicsLimit::pplat:
      return "mechanics.pplat_max";
    case MechanicsLimit::driving_pressure:
      return "mechanics.driving_pressure_max";
    case MechanicsLimit::mechanical_power:
      return "mechanics.mechanical_power_max";
    case MechanicsLimit::intrinsic_peep:
      return "mechanics.intrinsic_peep_flag";
    case MechanicsLimit::transpulmonary_pressure_ee:
      return "mechanics.transpulmonary_pressure_ee_min";
  }
  return "";
}

std::vector<MechanicsLimit> mechanics_breaches(const MechanicsInputs& in, const MechanicsResults& r,
                                               const Thresholds& limits) {
  std::vector<MechanicsLimit> out;
  auto limit = [&](MechanicsLimit l) { return threshold_key(l); };
  // Compared in the bedside unit, so the rounding tolerance is relative to it.
  if (r.vt_per_kg &&
      cutoff::above(in_mL_per_kg(*r.vt_per_kg), in_mL_per_kg(limits.get<VolumePerMass>(
                                                    limit(MechanicsLimit::vt_per_kg_pbw))))) {
    out.push_back(MechanicsLimit::vt_per_kg_pbw);
  }
  if (in.pplat && cutoff::above(in_cmH2O(*in.pplat),
                                in_cmH2O(limits.get<Pressure>(limit(MechanicsLimit::pplat))))) {
    out.push_back(MechanicsLimit::pplat);
  }
  if (r.driving_pressure &&
      cutoff::above(in_cmH2O(*r.driving_pressure),
                    in_cmH2O(limits.get<Pressure>(limit(MechanicsLimit::driving_pressure))))) {
    out.push_back(MechanicsLimit::driving_pressure);
  }
  if (r.mechanical_power &&
      cutoff::above(in_J_per_min(*r.mechanical_power),
                    in_J_per_min(limits.get<Power>(limit(MechanicsLimit::mechanical_power))))) {
    out.push_back(MechanicsLimit::mechanical_power);
  }
  if (r.intrinsic_peep &&
      cutoff::at_least(in_cmH2O(*r.intrinsic_peep),
                       in_cmH2O(limits.get<Pressure>(limit(MechanicsLimit::intrinsic_peep))))) {
    out.push_back(MechanicsLimit::intrinsic_peep);
  }
  if (r.transpulmonary_pressure_ee &&
      cutoff::below(
          in_cmH2O(*r.transpulmonary_pressure_ee),
          in_cmH2O(limits.get<Pressure>(limit(MechanicsLimit::transpulmonary_pressure_ee))))) {
    out.push_back(MechanicsLimit::transpulmonary_pressure_ee);
  }
  return out;
}

}  // namespace bb
