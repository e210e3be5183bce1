// Respiratory mechanics from whatever was measured: validation, results,
// published limits and the answer shown to the user.
#include <cmath>

#include "breathbeat/cautions.hpp"
#include "breathbeat/mechanics.hpp"

namespace bb {

namespace {

std::string cm(Pressure p) { return format_number(in_cmH2O(p), 1) + " cmH2O"; }

void require_not_below(const std::optional<Pressure>& high, const char* high_name,
                       const std::optional<Pressure>& low, const char* low_name) {
  if (!high || !low || *high >= *low) return;
  throw InputError(high_name, cm(*high), std::string("is below ") + low_name + " (" + cm(*low) + ")",
                   std::string("a value at or above ") + low_name +
                       "; check that the holds were read correctly");
}

}  // namespace

void validate_mechanics(const MechanicsInputs& in, const Thresholds& limits) {
  if (in.height) limits.check_plausible("height", *in.height);
  if (in.vt) limits.check_plausible("vt", *in.vt);
  if (in.peep_total) limits.check_plausible("peep", *in.peep_total);
  if (in.set_peep) limits.check_plausible("set_peep", *in.set_peep);
  if (in.pplat) limits.check_plausible("pplat", *in.pplat);
  if (in.ppeak) limits.check_plausible("ppeak", *in.ppeak);
  if (in.pinsp) limits.check_plausible("pinsp", *in.pinsp);
  if (in.rr) limits.check_plausible("rr", *in.rr);
  if (in.ti) limits.check_plausible("ti", *in.ti);
  if (in.flow) limits.check_plausible("flow", *in.flow);
  if (in.pes_ee) limits.check_plausible("pes_ee", *in.pes_ee);
  if (in.pes_ei) limits.check_plausible("pes_ei", *in.pes_ei);
  if (in.ve) limits.check_plausible("ve", *in.ve);
  if (in.paco2) limits.check_plausible("paco2", *in.paco2);

  const std::optional<Pressure> peep = in.peep_total ? in.peep_total : in.set_peep;
  const char* peep_name = in.peep_total ? "peep" : "set_peep";
  require_not_below(in.pplat, "pplat", peep, peep_name);
  require_not_below(in.ppeak, "ppeak", in.pplat, "pplat");
  require_not_below(in.ppeak, "ppeak", peep, peep_name);
  require_not_below(in.pinsp, "pinsp", peep, peep_name);
  if (in.pplat && peep && *in.pplat == *peep) {
    throw InputError("pplat", cm(*in.pplat), std::string("equals ") + peep_name,
                     "a plateau pressure above PEEP (a zero driving pressure leaves compliance undefined)");
  }
  if (in.ti && in.rr && in.ti->value() >= breath_period(*in.rr).value()) {
    throw InputError("ti", format_number(in_seconds(*in.ti), 2) + " s",
                     "is not shorter than the whole breath (60/RR = " +
                         format_number(in_seconds(breath_period(*in.rr)), 2) + " s)",
                     "an inspiratory time shorter than 60/RR");
  }
}

MechanicsResults analyse_mechanics(const MechanicsInputs& in) {
  MechanicsResults r;
  auto skip = [&](const char* key, const char* label, std::vector<std::string> needs) {
    r.skipped.push_back(Skipped{key, label, std::move(needs)});
  };

  if (in.sex && in.height) {
    r.pbw = predicted_body_weight(*in.sex, *in.height);
  } else {
    skip("pbw", "Predicted body weight", {"--sex", "--height"});
  }
  if (in.vt && r.pbw) {
    r.vt_per_kg = tidal_volume_per_kg(*in.vt, *r.pbw);
  } else {
    skip("vt_per_kg_pbw", "VT per kg PBW", {"--vt", "--sex", "--height"});
  }

  if (in.peep_total) {
    r.peep_used = in.peep_total;
  } else if (in.set_peep) {
    r.peep_used = in.set_peep;
    r.notes.push_back(
        "Only the set PEEP was given; it stands in for total PEEP. If intrinsic PEEP is "
        "suspected, measure total PEEP with an end-expiratory hold (--peep).");
  }

  if (in.pplat && r.peep_used) {
    r.driving_pressure = driving_pressure(*in.pplat, *r.peep_used);
  } else {
    skip("driving_pressure", "Driving pressure", {"--pplat", "--peep"});
  }
  if (in.vt && in.pplat && r.peep_used) {
    r.compliance_static = static_compliance(*in.vt, *in.pplat, *r.peep_used);
  } else {
    skip("compliance_static", "Static compliance", {"--vt", "--pplat", "--peep"});
  }
  if (in.vt && in.ppeak && r.peep_used) {
    r.compliance_dynamic = dynamic_compliance(*in.vt, *in.ppeak, *r.peep_used);
  } else {
    skip("compliance_dynamic", "Dynamic compliance", {"--vt", "--ppeak", "--peep"});
  }
  const bool pressure_control = in.mode == VentMode::pressure_control;
  if (in.ppeak && in.pplat && in.flow && !pressure_control) {
    r.resistance_airway = airway_resistance(*in.ppeak, *in.pplat, *in.flow);
  } else {
    skip("resistance_airway", "Airway resistance (constant-flow VC only)",
         {"--ppeak", "--pplat", "--flow", "--mode vc"});
  }
  if (r.resistance_airway && r.compliance_static) {
    r.time_constant = time_constant(*r.resistance_airway, *r.compliance_static);
  } else {
    skip("time_constant", "Time constant", {"--ppeak", "--pplat", "--flow", "--vt", "--peep"});
  }
  if (in.peep_total && in.set_peep) {
    r.intrinsic_peep = intrinsic_peep(*in.peep_total, *in.set_peep);
  } else {
    skip("intrinsic_peep", "Intrinsic PEEP", {"--peep (end-expiratory hold)", "--set-peep"});
  }

  if (pressure_control) {
    if (in.pinsp && r.peep_used && in.ti && in.rr) {
      r.mean_airway_pressure =
          mean_airway_pressure_pressure_control(*r.peep_used, *in.pinsp, *in.ti, breath_period(*in.rr));
    } else {
      skip("mean_airway_pressure", "Mean airway pressure (PC estimate)",
           {"--pinsp", "--peep", "--ti", "--rr"});
    }
    if (in.rr && in.vt && in.pinsp && r.peep_used) {
      r.mechanical_power =
          mechanical_power_pressure_control(*in.rr, *in.vt, *r.peep_used, *in.pinsp - *r.peep_used);
    } else {
      skip("mechanical_power", "Mechanical power (PC, simplified)", {"--rr", "--vt", "--pinsp", "--peep"});
    }
  } else {
    if (in.ppeak && r.peep_used && in.ti && in.rr) {
      r.mean_airway_pressure =
          mean_airway_pressure_volume_control(*r.peep_used, *in.ppeak, *in.ti, breath_period(*in.rr));
    } else {
      skip("mean_airway_pressure", "Mean airway pressure (VC estimate)",
           {"--ppeak", "--peep", "--ti", "--rr"});
    }
    if (in.rr && in.vt && in.ppeak && r.driving_pressure) {
      r.mechanical_power = mechanical_power_volume_control(*in.rr, *in.vt, *in.ppeak, *r.driving_pressure);
    } else {
      skip("mechanical_power", "Mechanical power (VC, simplified)",
           {"--rr", "--vt", "--ppeak", "--pplat", "--peep"});
    }
    if (!in.mode) {
      r.notes.push_back("No --mode given: volume control with constant flow is assumed.");
    }
  }

  if (in.ve) {
    r.minute_ventilation = in.ve;
  } else if (in.vt && in.rr) {
    r.minute_ventilation = Flow(*in.vt * *in.rr);
    r.notes.push_back("Minute ventilation taken as VT x RR (no --ve given).");
  }
  if (r.minute_ventilation && in.paco2 && r.pbw) {
    r.ventilatory_ratio = ventilatory_ratio(*r.minute_ventilation, *in.paco2, *r.pbw);
  } else {
    skip("ventilatory_ratio", "Ventilatory ratio", {"--ve (or --vt and --rr)", "--paco2", "--sex", "--height"});
  }

  if (in.pes_ee && in.pes_ei && in.vt && r.driving_pressure) {
    const Pressure delta_pes = *in.pes_ei - *in.pes_ee;
    r.elastance_chest_wall = chest_wall_elastance(delta_pes, *in.vt);
    r.elastance_lung = lung_elastance(*r.driving_pressure, delta_pes, *in.vt);
    r.elastance_rs = respiratory_system_elastance(*r.driving_pressure, *in.vt);
    r.elastance_ratio_cw_rs = chest_wall_elastance_ratio(*r.elastance_chest_wall, *r.elastance_rs);
    r.transpulmonary_pressure_ei =
        transpulmonary_pressure_end_inspiratory(*in.pplat, *r.elastance_lung, *r.elastance_rs);
    if (delta_pes <= cmH2O(0.0) || delta_pes >= *r.driving_pressure) {
      r.notes.push_back("The oesophageal swing (" + cm(delta_pes) +
                        ") is outside 0 to the driving pressure: check balloon position and "
                        "that the patient was passive; the elastance partition is unreliable.");
    }
  } else {
    skip("elastance_ratio_cw_rs", "Chest-wall / respiratory-system elastance",
         {"--pes-ee", "--pes-ei", "--vt", "--pplat", "--peep"});
    skip("transpulmonary_pressure_ei", "End-inspiratory transpulmonary pressure (elastance-derived)",
         {"--pes-ee", "--pes-ei", "--vt", "--pplat", "--peep"});
  }
  if (in.pes_ee && r.peep_used) {
    r.transpulmonary_pressure_ee = transpulmonary_pressure_end_expiratory(*r.peep_used, *in.pes_ee);
  } else {
    skip("transpulmonary_pressure_ee", "End-expiratory transpulmonary pressure", {"--pes-ee", "--peep"});
  }
  return r;
}

std::vector<Flag> mechanics_flags(const MechanicsInputs& in, const MechanicsResults& r,
                                  const Thresholds& limits) {
  std::vector<Flag> flags;
  const auto vt_max = limits.get<VolumePerMass>("mechanics.vt_per_kg_pbw_max");
  if (r.vt_per_kg && *r.vt_per_kg > vt_max) {
    flags.push_back({"vt_per_kg_pbw", "VT " + format_number(in_mL_per_kg(*r.vt_per_kg), 1) +
                                          " mL/kg PBW is above " + format_number(in_mL_per_kg(vt_max), 1) +
                                          " mL/kg PBW",
                     limits.source("mechanics.vt_per_kg_pbw_max")});
  }
  const auto pplat_max = limits.get<Pressure>("mechanics.pplat_max");
  if (in.pplat && *in.pplat > pplat_max) {
    flags.push_back({"pplat", "Pplat " + cm(*in.pplat) + " is above " + cm(pplat_max),
                     limits.source("mechanics.pplat_max")});
  }
  const auto dp_max = limits.get<Pressure>("mechanics.driving_pressure_max");
  if (r.driving_pressure && *r.driving_pressure > dp_max) {
    flags.push_back({"driving_pressure", "Driving pressure " + cm(*r.driving_pressure) + " is above " + cm(dp_max),
                     limits.source("mechanics.driving_pressure_max")});
  }
  const auto power_max = limits.get<Power>("mechanics.mechanical_power_max");
  if (r.mechanical_power && *r.mechanical_power > power_max) {
    flags.push_back({"mechanical_power",
                     "Mechanical power " + format_number(in_J_per_min(*r.mechanical_power), 2) +
                         " J/min is above " + format_number(in_J_per_min(power_max), 0) + " J/min",
                     limits.source("mechanics.mechanical_power_max")});
  }
  return flags;
}

namespace {
void add_inputs(const MechanicsInputs& in, Answer& a) {
  if (in.sex) a.inputs.push_back({"sex", std::string(*in.sex == Sex::male ? "male" : "female")});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height)});
  if (in.mode) {
    a.inputs.push_back({"mode", std::string(*in.mode == VentMode::volume_control ? "vc" : "pc")});
  }
  if (in.vt) a.inputs.push_back({"vt", as_mL(*in.vt)});
  if (in.peep_total) a.inputs.push_back({"peep", as_cmH2O(*in.peep_total)});
  if (in.set_peep) a.inputs.push_back({"set_peep", as_cmH2O(*in.set_peep)});
  if (in.pplat) a.inputs.push_back({"pplat", as_cmH2O(*in.pplat)});
  if (in.ppeak) a.inputs.push_back({"ppeak", as_cmH2O(*in.ppeak)});
  if (in.pinsp) a.inputs.push_back({"pinsp", as_cmH2O(*in.pinsp)});
  if (in.rr) a.inputs.push_back({"rr", as_per_min(*in.rr)});
  if (in.ti) a.inputs.push_back({"ti", as_seconds(*in.ti)});
  if (in.flow) a.inputs.push_back({"flow", as_L_per_min(*in.flow)});
  if (in.pes_ee) a.inputs.push_back({"pes_ee", as_cmH2O(*in.pes_ee)});
  if (in.pes_ei) a.inputs.push_back({"pes_ei", as_cmH2O(*in.pes_ei)});
  if (in.ve) a.inputs.push_back({"ve", as_L_per_min(*in.ve)});
  if (in.paco2) a.inputs.push_back({"paco2", as_mmHg(*in.paco2)});
}
}  // namespace

Answer describe_mechanics(const MechanicsInputs& in, const MechanicsResults& r, const Thresholds& limits) {
  Answer a;
  a.command = "calc mechanics";
  a.title = "respiratory mechanics";
  add_inputs(in, a);
  auto add = [&](const char* key, const char* label, const auto& value, auto present, const char* note = "") {
    if (value) a.results.push_back(Item{key, label, present(*value), note});
  };
  add("pbw", "Predicted body weight (PBW)", r.pbw, [](Mass m) { return as_kg(m); });
  add("vt_per_kg_pbw", "VT per kg PBW", r.vt_per_kg, [](VolumePerMass v) { return as_mL_per_kg(v); });
  add("driving_pressure", "Driving pressure (Pplat - PEEP)", r.driving_pressure,
      [](Pressure p) { return as_cmH2O(p); });
  add("compliance_static", "Static compliance (Crs)", r.compliance_static,
      [](Compliance c) { return as_mL_per_cmH2O(c); });
  add("compliance_dynamic", "Dynamic compliance", r.compliance_dynamic,
      [](Compliance c) { return as_mL_per_cmH2O(c); });
  add("resistance_airway", "Airway resistance", r.resistance_airway,
      [](Resistance x) { return as_cmH2O_per_L_per_s(x); }, "needs square-wave flow");
  add("time_constant", "Time constant (Rrs x Crs)", r.time_constant, [](Time t) { return as_seconds(t); });
  add("intrinsic_peep", "Intrinsic PEEP", r.intrinsic_peep, [](Pressure p) { return as_cmH2O(p); });
  add("mean_airway_pressure", "Mean airway pressure (estimate)", r.mean_airway_pressure,
      [](Pressure p) { return as_cmH2O(p); },
      in.mode == VentMode::pressure_control ? "PC formula" : "VC square-flow formula");
  add("mechanical_power", "Mechanical power (simplified)", r.mechanical_power,
      [](Power p) { return as_J_per_min(p); },
      in.mode == VentMode::pressure_control ? "PC formula" : "VC formula");
  add("minute_ventilation", "Minute ventilation", r.minute_ventilation, [](Flow f) { return as_L_per_min(f); });
  add("ventilatory_ratio", "Ventilatory ratio", r.ventilatory_ratio, [](Ratio x) { return as_fraction(x); });
  add("elastance_lung", "Lung elastance (EL)", r.elastance_lung, [](Elastance e) { return as_cmH2O_per_L(e); });
  add("elastance_chest_wall", "Chest-wall elastance (Ecw)", r.elastance_chest_wall,
      [](Elastance e) { return as_cmH2O_per_L(e); });
  add("elastance_ratio_cw_rs", "Chest-wall share of elastance (Ecw/Ers)", r.elastance_ratio_cw_rs,
      [](Ratio x) { return as_fraction(x); });
  add("transpulmonary_pressure_ee", "Transpulmonary pressure, end-expiratory", r.transpulmonary_pressure_ee,
      [](Pressure p) { return as_cmH2O(p); });
  add("transpulmonary_pressure_ei", "Transpulmonary pressure, end-inspiratory", r.transpulmonary_pressure_ei,
      [](Pressure p) { return as_cmH2O(p); }, "elastance-derived");
  a.skipped = r.skipped;
  a.flags = mechanics_flags(in, r, limits);
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
