// Respiratory mechanics in words: labels, notes as sentences and the messages
// of the limits breached. The numbers come from src/mechanics/.
#include "breathbeat/present/mechanics.hpp"

#include "breathbeat/cautions.hpp"

namespace bb {

namespace {

std::string cm(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}

// A pressure compared with `cut`, with the digits that decide.
std::string cm_deciding(Pressure p, Pressure cut) {
  return format_deciding(in_cmH2O(p), in_cmH2O(cut), 1) + " cmH2O";
}

// How a field is named in `context`, or "" when it has no name there (a
// command-line-only field in a trial report).
std::string name_in(std::string_view id, FieldContext context) {
  if (context == FieldContext::trial_file) {
    const FieldSpec* f = find_field(id);
    if (!f || file_path(*f).empty()) return "";
  }
  return field_name(id, context);
}

Flag flag_of(MechanicsLimit l, const MechanicsInputs& in, const MechanicsResults& r,
             const Thresholds& limits) {
  const char* key = threshold_key(l);
  switch (l) {
    case MechanicsLimit::vt_per_kg_pbw: {
      const auto max = limits.get<VolumePerMass>(key);
      return {"vt_per_kg_pbw",
              "VT " + format_deciding(in_mL_per_kg(*r.vt_per_kg), in_mL_per_kg(max), 1) +
                  " mL/kg PBW is above " + format_number(in_mL_per_kg(max), 1) + " mL/kg PBW",
              limits.source(key)};
    }
    case MechanicsLimit::pplat:
      return {"pplat",
              "Pplat " + cm_deciding(*in.pplat, limits.get<Pressure>(key)) + " is above " +
                  cm(limits.get<Pressure>(key)),
              limits.source(key)};
    case MechanicsLimit::driving_pressure:
      return {"driving_pressure",
              "Driving pressure " + cm_deciding(*r.driving_pressure, limits.get<Pressure>(key)) +
                  " is above " + cm(limits.get<Pressure>(key)),
              limits.source(key)};
    case MechanicsLimit::mechanical_power:
      return {"mechanical_power",
              "Mechanical power " + format_number(in_J_per_min(*r.mechanical_power), 2) +
                  " J/min is above " + format_number(in_J_per_min(limits.get<Power>(key)), 0) +
                  " J/min",
              limits.source(key)};
    case MechanicsLimit::intrinsic_peep:
      return {"intrinsic_peep",
              "Intrinsic PEEP " + cm(*r.intrinsic_peep) + " is at or above " +
                  cm(limits.get<Pressure>(key)) +
                  ": gas trapping; check expiratory time and airflow obstruction",
              limits.source(key)};
    case MechanicsLimit::transpulmonary_pressure_ee:
      return {"transpulmonary_pressure_ee",
              "End-expiratory transpulmonary pressure " + cm(*r.transpulmonary_pressure_ee) +
                  " is below " + cm(limits.get<Pressure>(key)) +
                  ": the lung may close at end-expiration at this PEEP",
              limits.source(key)};
  }
  return {};
}

void add_inputs(const MechanicsInputs& in, Answer& a) {
  if (in.sex) a.inputs.push_back({"sex", std::string(to_string(*in.sex))});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height)});
  if (in.mode) a.inputs.push_back({"mode", std::string(to_string(*in.mode))});
  if (in.vt) a.inputs.push_back({"vt", as_mL(*in.vt)});
  if (in.peep_total) a.inputs.push_back({"peep_total", as_cmH2O(*in.peep_total)});
  if (in.set_peep) a.inputs.push_back({"set_peep", as_cmH2O(*in.set_peep)});
  if (in.pplat) a.inputs.push_back({"pplat", as_cmH2O(*in.pplat)});
  if (in.ppeak) a.inputs.push_back({"ppeak", as_cmH2O(*in.ppeak)});
  if (in.pc_pressure_total)
    a.inputs.push_back({"pc_pressure_total", as_cmH2O(*in.pc_pressure_total)});
  if (in.pc_pressure_above_peep)
    a.inputs.push_back({"pc_pressure_above_peep", as_cmH2O(*in.pc_pressure_above_peep)});
  if (in.rr) a.inputs.push_back({"rr", as_per_min(*in.rr)});
  if (in.ti) a.inputs.push_back({"ti", as_seconds(*in.ti)});
  if (in.flow) a.inputs.push_back({"flow", as_L_per_min(*in.flow)});
  if (in.pes_ee) a.inputs.push_back({"pes_ee", as_cmH2O(*in.pes_ee)});
  if (in.pes_ei) a.inputs.push_back({"pes_ei", as_cmH2O(*in.pes_ei)});
  if (in.ve) a.inputs.push_back({"ve", as_L_per_min(*in.ve)});
  if (in.paco2) a.inputs.push_back({"paco2", as_mmHg(*in.paco2)});
}

}  // namespace

std::vector<Flag> mechanics_flags(const MechanicsInputs& in, const MechanicsResults& r,
                                  const Thresholds& limits, FieldContext context) {
  (void)context;  // no flag names a field
  std::vector<Flag> flags;
  for (MechanicsLimit l : mechanics_breaches(in, r, limits))
    flags.push_back(flag_of(l, in, r, limits));
  return flags;
}

std::string mechanics_note_text(MechanicsNote note, const MechanicsResults& r,
                                FieldContext context) {
  switch (note) {
    case MechanicsNote::set_peep_stands_in: {
      const std::string peep = name_in("peep_total", context);
      return "Only the set PEEP was given; it stands in for total PEEP. If intrinsic PEEP is "
             "suspected, measure total PEEP with an end-expiratory hold" +
             (peep.empty() ? std::string() : " (" + peep + ")") + ".";
    }
    case MechanicsNote::volume_control_assumed: {
      const std::string mode = name_in("mode", context);
      return (mode.empty() ? std::string("No mode") : "No " + mode) +
             " given: volume control with constant flow is assumed.";
    }
    case MechanicsNote::minute_ventilation_from_vt_rr: {
      const std::string ve = name_in("ve", context);
      return "Minute ventilation taken as VT x RR" +
             (ve.empty() ? std::string() : " (no " + ve + " given)") + ".";
    }
    case MechanicsNote::oesophageal_swing_unreliable:
      return "The oesophageal swing (" + (r.oesophageal_swing ? cm(*r.oesophageal_swing) : "?") +
             ") is outside 0 to the driving pressure" +
             (r.driving_pressure ? " (" + cm(*r.driving_pressure) + ")" : std::string()) +
             ": it would give a zero or negative chest-wall or lung elastance, so Ecw, EL, "
             "Ecw/Ers and the elastance-derived transpulmonary pressure are not given. Check "
             "the balloon position (occlusion test) and that the patient was passive.";
    case MechanicsNote::intrinsic_peep_negative:
      return "Set PEEP is above total PEEP by " +
             (r.intrinsic_peep_below_zero ? cm(-*r.intrinsic_peep_below_zero) : "?") +
             ": no intrinsic PEEP is given. An end-expiratory hold reads below set PEEP with a "
             "leak (cuff, circuit, chest drain) or a hold too short to equilibrate; check both "
             "readings.";
    case MechanicsNote::driving_pressure_from_set_pressure:
      return "No plateau pressure was given: in pressure control the driving pressure (and "
             "compliance) come from the set pressure" +
             (r.pc_pressure_total ? " (" + cm(*r.pc_pressure_total) + " total)" : std::string()) +
             ", which assumes zero flow at end-inspiration; with flow still running they "
             "overstate the driving pressure. An end-inspiratory hold measures it.";
    case MechanicsNote::pc_pressure_above_total_peep: {
      const std::string set = name_in("set_peep", context);
      return "No set PEEP" + (set.empty() ? std::string() : " (" + set + ")") +
             " was given: the PC pressure above PEEP was added to total PEEP.";
    }
  }
  return "";
}

Answer describe_mechanics(const MechanicsInputs& in, const MechanicsResults& r,
                          const Thresholds& limits, FieldContext context) {
  Answer a;
  a.command = "calc mechanics";
  a.title = "respiratory mechanics";
  a.context = context;
  add_inputs(in, a);
  auto add = [&](const char* key, const char* label, const auto& value, auto present,
                 const char* note = "") {
    if (value) a.results.push_back(Item{key, label, present(*value), note});
  };
  const bool pc = in.mode == VentMode::pressure_control;
  add("pbw", "Predicted body weight (PBW)", r.pbw, [](Mass m) { return as_kg(m); });
  add("vt_per_kg_pbw", "VT per kg PBW", r.vt_per_kg,
      [](VolumePerMass v) { return as_mL_per_kg(v); });
  const bool from_set = !in.pplat && r.plateau_used;
  add(
      "driving_pressure",
      from_set ? "Driving pressure (Pset - PEEP)" : "Driving pressure (Pplat - PEEP)",
      r.driving_pressure, [](Pressure p) { return as_cmH2O(p); },
      from_set ? "from the set PC pressure, zero end-insp. flow assumed" : "");
  add("compliance_static", "Static compliance (Crs)", r.compliance_static,
      [](Compliance c) { return as_mL_per_cmH2O(c); });
  add("compliance_dynamic", "Dynamic compliance", r.compliance_dynamic,
      [](Compliance c) { return as_mL_per_cmH2O(c); });
  add(
      "resistance_airway", "Airway resistance", r.resistance_airway,
      [](Resistance x) { return as_cmH2O_per_L_per_s(x); }, "needs square-wave flow");
  add("time_constant", "Time constant (Rrs x Crs)", r.time_constant,
      [](Time t) { return as_seconds(t); });
  add("intrinsic_peep", "Intrinsic PEEP", r.intrinsic_peep, [](Pressure p) { return as_cmH2O(p); });
  if (!in.pc_pressure_total) {
    add(
        "pc_pressure_total", "PC pressure, total", r.pc_pressure_total,
        [](Pressure p) { return as_cmH2O(p); }, "set PEEP + pressure above PEEP");
  }
  add(
      "mean_airway_pressure", "Mean airway pressure (estimate)", r.mean_airway_pressure,
      [](Pressure p) { return as_cmH2O(p); }, pc ? "PC formula" : "VC square-flow formula");
  add(
      "mechanical_power", "Mechanical power (simplified)", r.mechanical_power,
      [](Power p) { return as_J_per_min(p); }, pc ? "PC formula" : "VC formula");
  add("minute_ventilation", "Minute ventilation", r.minute_ventilation,
      [](Flow f) { return as_L_per_min(f); });
  add("ventilatory_ratio", "Ventilatory ratio", r.ventilatory_ratio,
      [](Ratio x) { return as_fraction(x); });
  add("elastance_lung", "Lung elastance (EL)", r.elastance_lung,
      [](Elastance e) { return as_cmH2O_per_L(e); });
  add("elastance_chest_wall", "Chest-wall elastance (Ecw)", r.elastance_chest_wall,
      [](Elastance e) { return as_cmH2O_per_L(e); });
  add("elastance_ratio_cw_rs", "Chest-wall share of elastance (Ecw/Ers)", r.elastance_ratio_cw_rs,
      [](Ratio x) { return as_fraction(x); });
  add("transpulmonary_pressure_ee", "Transpulmonary pressure, end-expiratory",
      r.transpulmonary_pressure_ee, [](Pressure p) { return as_cmH2O(p); });
  add(
      "transpulmonary_pressure_ei_direct", "Transpulmonary pressure, end-insp. (direct)",
      r.transpulmonary_pressure_ei_direct, [](Pressure p) { return as_cmH2O(p); },
      "Pplat - Pes,ei");
  add(
      "transpulmonary_pressure_ei", "Transpulmonary pressure, end-inspiratory",
      r.transpulmonary_pressure_ei, [](Pressure p) { return as_cmH2O(p); }, "elastance-derived");
  a.skipped = r.skipped;
  a.flags = mechanics_flags(in, r, limits, context);
  for (MechanicsNote n : r.notes) a.notes.push_back(mechanics_note_text(n, r, context));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
