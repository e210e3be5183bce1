// Respiratory mechanics: one function per published formula, then the
// analysis that computes whatever the given measurements allow.
// Formulas, sources and check values: docs/methods.md.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/body.hpp"  // Sex
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// Breath type (registry field "mode": "vc", "pc").
enum class VentMode { volume_control, pressure_control };
const char* to_string(VentMode m);  // the registry's choice word: "vc", "pc"

// ---- formulas ---------------------------------------------------------------

// PBW = 50 (male) or 45.5 (female) + 0.91 (height cm - 152.4) kg; ARDS Network, NEJM 2000;342:1301.
Mass predicted_body_weight(Sex sex, Length height);
// VT / PBW; ARDS Network, NEJM 2000;342:1301.
VolumePerMass tidal_volume_per_kg(Volume vt, Mass pbw);
// dP = Pplat - PEEPtotal; Amato et al., NEJM 2015;372:747.
Pressure driving_pressure(Pressure pplat, Pressure peep_total);
// Crs = VT / (Pplat - PEEPtotal); textbook (common practice, no source).
Compliance static_compliance(Volume vt, Pressure pplat, Pressure peep_total);
// Cdyn = VT / (Ppeak - PEEPtotal); textbook (common practice, no source).
Compliance dynamic_compliance(Volume vt, Pressure ppeak, Pressure peep_total);
// Raw = (Ppeak - Pplat) / constant inspiratory flow; textbook, square-wave flow only.
Resistance airway_resistance(Pressure ppeak, Pressure pplat, Flow inspiratory_flow);
// tau = Rrs * Crs; textbook (common practice, no source).
Time time_constant(Resistance rrs, Compliance crs);
// PEEPi = PEEPtotal - set PEEP; Akoumianaki et al., AJRCCM 2014;189:520 (from memory).
Pressure intrinsic_peep(Pressure peep_total, Pressure set_peep);
// Ptotal = set PEEP + PC pressure above PEEP (common practice, no source).
Pressure pressure_control_total(Pressure set_peep, Pressure above_peep);
// Inspiratory flow time = VT / constant flow (VC square wave); common practice, no source.
Time inspiratory_flow_time(Volume vt, Flow inspiratory_flow);
// Ttot = 60 s / RR (common practice, no source).
Time breath_period(Frequency rr);
// Pmean = PEEP + 1/2 (Ppeak - PEEP) Ti/Ttot, square-wave VC; Marini & Ravenscraft, Crit Care Med
// 1992;20:1461.
Pressure mean_airway_pressure_volume_control(Pressure peep, Pressure ppeak, Time ti, Time ttot);
// Pmean = PEEP + (Pinsp - PEEP) Ti/Ttot, PC; Marini & Ravenscraft, Crit Care Med 1992;20:1461.
Pressure mean_airway_pressure_pressure_control(Pressure peep, Pressure pinsp, Time ti, Time ttot);
// MP = 0.098 RR VT (Ppeak - dP/2) J/min, VC; Gattinoni et al., Intensive Care Med 2016;42:1567.
Power mechanical_power_volume_control(Frequency rr, Volume vt, Pressure ppeak, Pressure dp);
// MP = 0.098 RR VT (PEEP + dPinsp) J/min, PC; Becher et al., Intensive Care Med 2019 (from memory).
Power mechanical_power_pressure_control(Frequency rr, Volume vt, Pressure peep,
                                        Pressure delta_pinsp);
// VR = (VE PaCO2) / (PBW 100 mL/min/kg 37.5 mmHg); Sinha et al., Br J Anaesth 2009;102:692 (from
// memory).
Ratio ventilatory_ratio(Flow ve, Pressure paco2, Mass pbw);
// Ecw = dPes / VT; Gattinoni/Chiumello, AJRCCM 2008;178:346 (from memory).
Elastance chest_wall_elastance(Pressure delta_pes, Volume vt);
// EL = (dP - dPes) / VT; Gattinoni/Chiumello, AJRCCM 2008;178:346 (from memory).
Elastance lung_elastance(Pressure dp, Pressure delta_pes, Volume vt);
// Ers = dP / VT = EL + Ecw; textbook.
Elastance respiratory_system_elastance(Pressure dp, Volume vt);
// Ecw/Ers; Gattinoni/Chiumello, AJRCCM 2008;178:346 (from memory).
Ratio chest_wall_elastance_ratio(Elastance ecw, Elastance ers);
// PL,ee = PEEPtotal - Pes,ee; Talmor et al., NEJM 2008;359:2095.
Pressure transpulmonary_pressure_end_expiratory(Pressure peep_total, Pressure pes_ee);
// PL,ei = Pplat EL/Ers (elastance-derived); Chiumello et al., AJRCCM 2008;178:346 (from memory).
Pressure transpulmonary_pressure_end_inspiratory(Pressure pplat, Elastance el, Elastance ers);
// PL,ei = Pplat - Pes,ei (direct); Talmor et al., NEJM 2008;359:2095.
Pressure transpulmonary_pressure_end_inspiratory_direct(Pressure pplat, Pressure pes_ei);

// ---- analysis -----------------------------------------------------------------

// What was measured; anything absent is simply not given. Each member is the
// registry field of the same id (breathbeat/fields/registry.hpp).
struct MechanicsInputs {
  std::optional<Sex> sex;
  std::optional<Length> height;
  std::optional<VentMode> mode;
  std::optional<Volume> vt;
  std::optional<Pressure> peep_total;  // end-expiratory hold (field peep_total)
  std::optional<Pressure> set_peep;    // ventilator setting (field set_peep)
  std::optional<Pressure> pplat;
  std::optional<Pressure> ppeak;
  // PC set inspiratory pressure, stated one of two ways (never both; validate_mechanics):
  std::optional<Pressure> pc_pressure_total;       // above atmosphere, PEEP included
  std::optional<Pressure> pc_pressure_above_peep;  // above set PEEP (total = set PEEP + this)
  std::optional<Frequency> rr;
  std::optional<Time> ti;
  std::optional<Flow> flow;  // constant inspiratory flow in VC
  std::optional<Pressure> pes_ee;
  std::optional<Pressure> pes_ei;
  std::optional<Flow> ve;
  std::optional<Pressure> paco2;
};

// What the analysis has to say beside its numbers; presenters word them.
enum class MechanicsNote {
  set_peep_stands_in,             // only set_peep given: it stands in for total PEEP
  volume_control_assumed,         // no mode given: volume control, constant flow assumed
  minute_ventilation_from_vt_rr,  // no ve given: VE = VT x RR
  // Pes,ei - Pes,ee outside 0 to dP (value: oesophageal_swing): Ecw, EL, Ecw/Ers and the
  // elastance-derived PL,ei are refused (not given).
  oesophageal_swing_unreliable,
  // set PEEP above total PEEP (value: intrinsic_peep_below_zero): intrinsic PEEP not given
  // (leak, hold too short, or the two values read at different times).
  intrinsic_peep_negative,
  // PC without pplat: dP (and Crs, PL) from the set pressure, assuming zero end-inspiratory flow.
  driving_pressure_from_set_pressure,
  // pc_pressure_above_peep with no set_peep: added to total PEEP instead.
  pc_pressure_above_total_peep,
};

struct MechanicsResults {
  std::optional<Mass> pbw;
  std::optional<VolumePerMass> vt_per_kg;
  std::optional<Pressure> peep_used;  // the PEEP the formulas used
  std::optional<Pressure> driving_pressure;
  std::optional<Compliance> compliance_static;
  std::optional<Compliance> compliance_dynamic;
  std::optional<Resistance> resistance_airway;
  std::optional<Time> time_constant;
  std::optional<Pressure> intrinsic_peep;             // only when not below zero
  std::optional<Pressure> intrinsic_peep_below_zero;  // total - set PEEP when negative (a note)
  // PC set pressure on the total scale (pc_pressure_total, or PEEP + pc_pressure_above_peep).
  std::optional<Pressure> pc_pressure_total;
  // The end-inspiratory pressure the formulas used: pplat, or in PC without a hold the set
  // pressure (note driving_pressure_from_set_pressure).
  std::optional<Pressure> plateau_used;
  std::optional<Pressure> mean_airway_pressure;
  std::optional<Power> mechanical_power;
  std::optional<Flow> minute_ventilation;
  std::optional<Ratio> ventilatory_ratio;
  std::optional<Pressure> oesophageal_swing;  // Pes,ei - Pes,ee, when the partition was made
  std::optional<Elastance> elastance_lung;
  std::optional<Elastance> elastance_chest_wall;
  std::optional<Elastance> elastance_rs;
  std::optional<Ratio> elastance_ratio_cw_rs;
  std::optional<Pressure> transpulmonary_pressure_ee;
  std::optional<Pressure> transpulmonary_pressure_ei;         // elastance-derived
  std::optional<Pressure> transpulmonary_pressure_ei_direct;  // Pplat - Pes,ei
  std::vector<Skipped> skipped;                               // needs named by registry id
  std::vector<MechanicsNote> notes;
};

// Contradictions and out-of-range values (plausibility ranges in presets/plausibility.toml); throws
// InputError naming the field by registry id. Contradictions: a pressure below the PEEP or
// plateau it must exceed, Ti not shorter than 60/RR, VT/flow longer than Ti (VC), both
// pc_pressure_total and pc_pressure_above_peep given.
void validate_mechanics(const MechanicsInputs& in, const Thresholds& limits);

// Every result the inputs allow; what cannot be computed is listed with what it needs.
MechanicsResults analyse_mechanics(const MechanicsInputs& in);

// A published limit the values breach (presets/thresholds/mechanics.toml).
enum class MechanicsLimit {
  vt_per_kg_pbw,               // VT/PBW above mechanics.vt_per_kg_pbw_max
  pplat,                       // Pplat above mechanics.pplat_max
  driving_pressure,            // dP above mechanics.driving_pressure_max
  mechanical_power,            // power above mechanics.mechanical_power_max
  intrinsic_peep,              // PEEPi at or above mechanics.intrinsic_peep_flag
  transpulmonary_pressure_ee,  // PL,ee below mechanics.transpulmonary_pressure_ee_min
};
// The threshold key of a limit ("mechanics.pplat_max").
const char* threshold_key(MechanicsLimit l);

// The limits breached, in this order: VT/PBW, Pplat, dP, mechanical power, intrinsic PEEP,
// PL,ee. A value on an upper limit itself does not breach it (bb::cutoff::above); intrinsic
// PEEP is flagged from its limit on (bb::cutoff::at_least), PL,ee below its limit
// (bb::cutoff::below).
std::vector<MechanicsLimit> mechanics_breaches(const MechanicsInputs& in, const MechanicsResults& r,
                                               const Thresholds& limits);

}  // namespace bb
