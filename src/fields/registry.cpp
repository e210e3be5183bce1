// The field registry: every input breathbeat reads, declared once.
// Conventions and the naming rule: include/breathbeat/fields/registry.hpp.
#include "breathbeat/fields/registry.hpp"

#include <algorithm>
#include <stdexcept>

#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

using D = Dimension;
using K = FieldKind;

// clang-format off
const FieldSpec kFields[] = {
  // ---- [trial] --------------------------------------------------------------
  {.id = "date", .kind = K::text, .table = "trial", .label = "Trial date", .help = "Date of the trial, YYYY-MM-DD; names its steps when trials are reported side by side"},

  // ---- [patient] ------------------------------------------------------------
  {.id = "sex", .kind = K::choice, .table = "patient", .label = "Sex", .help = "male or female (for predicted body weight)", .choices = "male,female", .aliases = "m=male,f=female"},
  {.id = "height", .kind = K::quantity, .table = "patient", .dimension = D::length, .default_unit = "cm", .plausibility = "height", .label = "Height", .help = "Height (cm or m)"},
  {.id = "weight", .kind = K::quantity, .table = "patient", .dimension = D::mass, .default_unit = "kg", .plausibility = "weight", .label = "Weight", .help = "Actual body weight (body surface area, doses per kg)"},
  {.id = "age", .kind = K::number, .table = "patient", .plausibility = "age", .label = "Age", .help = "Age in years (for the expected A-a gradient)"},
  {.id = "patient_label", .kind = K::text, .table = "patient", .key = "label", .label = "Patient label", .help = "A pseudonymous label (a real name is never needed)"},

  // ---- [[step]] --------------------------------------------------------------
  {.id = "label", .kind = K::text, .table = "step", .label = "Step", .help = "Label of the step, unique in the trial, e.g. \"PEEP 10\""},
  {.id = "time", .kind = K::text, .table = "step", .label = "Time", .help = "Time of the step: HH:MM (e.g. 14:05), HH:MM:SS or a date-time, read for the intervals between steps (an impossible one is refused); other free text is only shown"},
  {.id = "manoeuvre", .kind = K::choice, .table = "step", .label = "Manoeuvre", .help = "This step is a preload test of the step before it: plr (passive leg raise), fluid (fluid challenge), mini_fluid (mini fluid challenge) or eeo (end-expiratory occlusion), read from the two steps' CO, SV or VTI", .choices = "plr,fluid,mini_fluid,eeo", .aliases = "fluid_challenge=fluid,mini_fluid_challenge=mini_fluid"},

  // ---- [step.ventilator] -------------------------------------------------------
  {.id = "mode", .kind = K::choice, .table = "ventilator", .label = "Mode", .help = "Breath type: vc (volume control, constant flow) or pc (pressure control)", .choices = "vc,pc"},
  {.id = "set_peep", .kind = K::quantity, .table = "ventilator", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "set_peep", .label = "Set PEEP", .help = "PEEP set on the ventilator"},
  {.id = "vt", .kind = K::quantity, .table = "ventilator", .dimension = D::volume, .default_unit = "mL", .plausibility = "vt", .label = "Tidal volume", .help = "Tidal volume"},
  {.id = "pinsp", .kind = K::quantity, .table = "ventilator", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pinsp", .label = "Inspiratory pressure (PC), ambiguous", .help = "Refused: it does not say whether the set PC pressure is total or above PEEP; use pc_pressure_total or pc_pressure_above_peep"},
  {.id = "pc_pressure_total", .kind = K::quantity, .table = "ventilator", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pinsp", .label = "PC pressure, total", .help = "PC: set inspiratory pressure as total pressure above atmosphere, PEEP included"},
  {.id = "pc_pressure_above_peep", .kind = K::quantity, .table = "ventilator", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pc_pressure_above_peep", .label = "PC pressure above PEEP", .help = "PC: set inspiratory pressure above set PEEP (total = set PEEP + this)"},
  {.id = "rr", .kind = K::quantity, .table = "ventilator", .dimension = D::frequency, .default_unit = "/min", .plausibility = "rr", .label = "Respiratory rate", .help = "Respiratory rate"},
  {.id = "ti", .kind = K::quantity, .table = "ventilator", .dimension = D::time, .default_unit = "s", .plausibility = "ti", .label = "Inspiratory time", .help = "Inspiratory time"},
  {.id = "ie", .kind = K::list, .table = "ventilator", .label = "I:E", .help = "I:E ratio, e.g. 1:2 (Ti is then 60/RR x I/(I+E))"},
  {.id = "fio2", .kind = K::quantity, .table = "ventilator", .dimension = D::fraction, .default_unit = "%", .plausibility = "fio2", .label = "FiO2", .help = "Inspired O2 fraction (0.21 to 1.0, or 21 to 100 %)"},
  {.id = "flow", .kind = K::quantity, .table = "ventilator", .dimension = D::flow, .default_unit = "L/min", .plausibility = "flow", .label = "Inspiratory flow", .help = "Constant inspiratory flow (VC)"},
  {.id = "pmean", .kind = K::quantity, .table = "ventilator", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pmean", .label = "Mean airway pressure (measured)", .help = "Mean airway pressure as the ventilator measured it (for OI and OSI; otherwise estimated)"},

  // ---- [step.hold] ---------------------------------------------------------------
  {.id = "ppeak", .kind = K::quantity, .table = "hold", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "ppeak", .label = "Peak pressure", .help = "Peak airway pressure"},
  {.id = "pplat", .kind = K::quantity, .table = "hold", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pplat", .label = "Plateau pressure", .help = "Plateau pressure, end-inspiratory hold"},
  {.id = "peep_total", .kind = K::quantity, .table = "hold", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "peep", .label = "Total PEEP (expiratory hold)", .help = "Total PEEP, from an end-expiratory hold", .aliases = "--peep"},
  {.id = "pes_ee", .kind = K::quantity, .table = "hold", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pes_ee", .label = "Oesophageal pressure, end-exp.", .help = "Oesophageal pressure at end-expiration"},
  {.id = "pes_ei", .kind = K::quantity, .table = "hold", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pes_ei", .label = "Oesophageal pressure, end-insp.", .help = "Oesophageal pressure at end-inspiration"},

  // ---- [step.gases] ----------------------------------------------------------------
  {.id = "pao2", .kind = K::quantity, .table = "gases", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "pao2", .label = "PaO2", .help = "Arterial PO2"},
  {.id = "paco2", .kind = K::quantity, .table = "gases", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "paco2", .label = "PaCO2", .help = "Arterial PCO2"},
  {.id = "sao2", .kind = K::quantity, .table = "gases", .dimension = D::fraction, .default_unit = "%", .plausibility = "sao2", .label = "SaO2", .help = "Arterial O2 saturation, from the blood gas (0.98, 98 or 98%)"},
  {.id = "spo2", .kind = K::quantity, .table = "gases", .dimension = D::fraction, .default_unit = "%", .plausibility = "spo2", .label = "SpO2", .help = "Pulse-oximetry saturation (for SpO2/FiO2 and OSI)"},
  {.id = "svo2", .kind = K::quantity, .table = "gases", .dimension = D::fraction, .default_unit = "%", .plausibility = "svo2", .label = "SvO2 (mixed venous)", .help = "Mixed venous O2 saturation"},
  {.id = "scvo2", .kind = K::quantity, .table = "gases", .dimension = D::fraction, .default_unit = "%", .plausibility = "svo2", .label = "ScvO2 (central venous)", .help = "Central venous O2 saturation (stands in for SvO2, with a note)"},
  {.id = "pvo2", .kind = K::quantity, .table = "gases", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "pvo2", .label = "PvO2", .help = "Mixed venous PO2"},
  {.id = "hb", .kind = K::quantity, .table = "gases", .dimension = D::haemoglobin, .default_unit = "g/dL", .plausibility = "hb", .label = "Haemoglobin", .help = "Haemoglobin (g/dL, g/L or mmol/L)"},
  {.id = "lactate", .kind = K::quantity, .table = "gases", .dimension = D::lactate, .default_unit = "mmol/L", .plausibility = "lactate", .label = "Lactate", .help = "Arterial lactate (mmol/L; mg/dL accepted)"},

  // ---- [step.circulation] ------------------------------------------------------------
  {.id = "hr", .kind = K::quantity, .table = "circulation", .dimension = D::frequency, .default_unit = "/min", .plausibility = "hr", .label = "Heart rate", .help = "Heart rate"},
  {.id = "regular_rhythm", .kind = K::flag, .table = "circulation", .label = "Regular rhythm", .help = "Cardiac rhythm regular (--regular) or irregular, e.g. AF or ectopy (--irregular)", .yes = "--regular", .no = "--irregular", .aliases = "rhythm_regular"},
  {.id = "sbp", .kind = K::quantity, .table = "circulation", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "sbp", .label = "Systolic pressure", .help = "Systolic arterial pressure"},
  {.id = "dbp", .kind = K::quantity, .table = "circulation", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "dbp", .label = "Diastolic pressure", .help = "Diastolic arterial pressure"},
  {.id = "map", .kind = K::quantity, .table = "circulation", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "map", .label = "Mean arterial pressure", .help = "Mean arterial pressure (estimated from SBP/DBP when absent)"},
  {.id = "cvp", .kind = K::quantity, .table = "circulation", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "cvp", .label = "Central venous pressure", .help = "Central venous pressure (stands in for right-atrial pressure)"},
  {.id = "pmsf", .kind = K::quantity, .table = "circulation", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "pmsf", .label = "Mean systemic filling pressure", .help = "Mean systemic filling pressure"},
  {.id = "co", .kind = K::quantity, .table = "circulation", .dimension = D::flow, .default_unit = "L/min", .plausibility = "co", .label = "Cardiac output", .help = "Cardiac output"},
  {.id = "co_method", .kind = K::text, .table = "circulation", .label = "CO method", .help = "How cardiac output was measured (free text)"},
  {.id = "pp_cycles", .kind = K::list, .table = "circulation", .default_unit = "mmHg", .plausibility = "pulse_pressure", .label = "Pulse pressure per breath", .help = "PPmax/PPmin per breath, e.g. 62/48,60/47,63/50 (mmHg), at least 3 breaths", .aliases = "--cycles"},
  {.id = "ppv", .kind = K::quantity, .table = "circulation", .dimension = D::fraction, .default_unit = "%", .plausibility = "ppv", .label = "PPV (monitor)", .help = "Pulse pressure variation as shown by a monitor"},
  {.id = "svv", .kind = K::quantity, .table = "circulation", .dimension = D::fraction, .default_unit = "%", .plausibility = "svv", .label = "Stroke volume variation", .help = "Stroke volume variation from a device (12 or 12%)"},
  {.id = "passive", .kind = K::flag, .table = "circulation", .label = "Passive (no breathing effort)", .help = "Fully passive, no breathing effort (--passive), or breathing effort seen (--effort)", .yes = "--passive", .no = "--effort", .aliases = "!spontaneous_effort,!--spontaneous,--no-effort"},
  {.id = "closed_chest", .kind = K::flag, .table = "circulation", .label = "Chest closed", .help = "Chest closed (--closed-chest) or open, e.g. sternotomy (--open-chest)", .yes = "--closed-chest", .no = "--open-chest", .aliases = "!chest_open,--chest-closed,!--chest-open"},
  {.id = "iah", .kind = K::flag, .table = "circulation", .label = "Intra-abdominal hypertension", .help = "Intra-abdominal hypertension present (--iah) or absent (--no-iah)", .yes = "--iah", .no = "--no-iah", .aliases = "intra_abdominal_hypertension"},
  {.id = "rv_failure", .kind = K::flag, .table = "circulation", .label = "Right-ventricular failure", .help = "Severe right-ventricular failure or tricuspid regurgitation present (--rv-failure) or absent (--no-rv-failure)", .yes = "--rv-failure", .no = "--no-rv-failure"},

  // ---- [step.ultrasound] ---------------------------------------------------------------
  {.id = "ivc_dmax", .kind = K::quantity, .table = "ultrasound", .dimension = D::length, .default_unit = "cm", .plausibility = "dmax", .label = "IVC widest diameter", .help = "Widest IVC diameter over the breath (cm or mm)", .aliases = "--dmax"},
  {.id = "ivc_dmin", .kind = K::quantity, .table = "ultrasound", .dimension = D::length, .default_unit = "cm", .plausibility = "dmin", .label = "IVC narrowest diameter", .help = "Narrowest IVC diameter over the breath (cm or mm)", .aliases = "--dmin"},
  {.id = "ivc_breathing", .kind = K::choice, .table = "ultrasound", .label = "Breathing during the IVC scan", .help = "passive (controlled ventilation, no breathing effort), assisted (breathing effort on positive pressure: pressure support, CPAP) or unassisted (breathing without ventilator support), while the IVC was imaged; decides which index applies", .choices = "passive,assisted,unassisted", .aliases = "--breathing", .unclear = "spontaneous=assisted|unassisted"},
  {.id = "lvot_diameter", .kind = K::quantity, .table = "ultrasound", .dimension = D::length, .default_unit = "cm", .plausibility = "lvot", .label = "LVOT diameter", .help = "LVOT diameter, mid-systole (cm or mm)", .aliases = "--lvot"},
  {.id = "vti", .kind = K::quantity, .table = "ultrasound", .dimension = D::length, .default_unit = "cm", .plausibility = "vti", .label = "LVOT VTI", .help = "LVOT velocity-time integral (pulsed-wave Doppler)"},

  // ---- [[step.infusion]] -------------------------------------------------------------------
  {.id = "drug", .kind = K::text, .table = "infusion", .label = "Drug", .help = "Generic drug name of one infusion"},
  {.id = "rate", .kind = K::text, .table = "infusion", .default_unit = "mL/h", .plausibility = "infusion_rate", .label = "Pump rate", .help = "Pump rate"},
  {.id = "concentration", .kind = K::text, .table = "infusion", .default_unit = "mcg/mL", .label = "Concentration", .help = "Concentration (U/mL for vasopressin)", .aliases = "--conc"},
  {.id = "dose", .kind = K::text, .table = "infusion", .default_unit = "mcg/kg/min", .label = "Dose", .help = "Dose (U/min for vasopressin, ng/kg/min for angiotensin II); gives the rate"},

  // ---- [step.preload.<test>] ------------------------------------------------------------------
  {.id = "kind", .kind = K::choice, .label = "Preload test", .help = "Which test: vt_challenge, eeo, plr, fluid_challenge, mini_fluid", .choices = "vt_challenge,eeo,plr,fluid_challenge,mini_fluid", .aliases = "fluid=fluid_challenge"},
  {.id = "measure", .kind = K::choice, .table = "preload.*", .label = "Measure", .help = "What was measured: ppv, co, sv or vti (default by test)", .choices = "ppv,co,sv,vti"},
  {.id = "before", .kind = K::quantity, .table = "preload.*", .label = "Before", .help = "Value before the test (its unit says what it is)"},
  {.id = "after", .kind = K::quantity, .table = "preload.*", .label = "After", .help = "Value after (at the peak of) the test"},
  {.id = "volume", .kind = K::quantity, .table = "preload.*", .dimension = D::volume, .default_unit = "mL", .plausibility = "fluid_volume", .label = "Fluid volume", .help = "one-step fluid or mini-fluid challenge (before and after values together): volume given"},
  {.id = "duration", .kind = K::quantity, .table = "preload.*", .dimension = D::time, .default_unit = "min", .plausibility = "fluid_duration", .label = "Duration", .help = "one-step fluid or mini-fluid challenge: time over which it was given"},
  {.id = "fluid", .kind = K::text, .table = "preload.*", .label = "Fluid", .help = "one-step fluid or mini-fluid challenge: fluid type (crystalloid, balanced, saline, albumin, gelatin, blood)"},
  {.id = "hold", .kind = K::quantity, .table = "preload.*", .dimension = D::time, .default_unit = "s", .plausibility = "eeo_hold", .label = "Occlusion hold", .help = "one-step end-expiratory occlusion: duration of the hold"},
  {.id = "vt_before", .kind = K::quantity, .table = "preload.*", .dimension = D::volume, .default_unit = "mL", .plausibility = "vt", .label = "VT before", .help = "tidal-volume challenge: tidal volume before"},
  {.id = "vt_after", .kind = K::quantity, .table = "preload.*", .dimension = D::volume, .default_unit = "mL", .plausibility = "vt", .label = "VT during", .help = "tidal-volume challenge: tidal volume during the challenge"},

  // ---- [step.challenge]: the record of a manoeuvre step (manoeuvre = ...) -----------------------
  {.id = "challenge_fluid", .kind = K::text, .table = "challenge", .key = "fluid", .label = "Fluid given", .help = "manoeuvre step (fluid or mini-fluid challenge of the step before): the fluid (crystalloid, balanced, saline, albumin, gelatin, blood)"},
  {.id = "challenge_volume", .kind = K::quantity, .table = "challenge", .key = "volume", .dimension = D::volume, .default_unit = "mL", .plausibility = "fluid_volume", .label = "Volume given", .help = "manoeuvre step (fluid or mini-fluid challenge of the step before): volume given"},
  {.id = "challenge_duration", .kind = K::quantity, .table = "challenge", .key = "duration", .dimension = D::time, .default_unit = "min", .plausibility = "fluid_duration", .label = "Given over", .help = "manoeuvre step (fluid or mini-fluid challenge of the step before): time over which it was given (volume over time is the rate)"},
  {.id = "objective", .kind = K::choice, .table = "challenge", .label = "Objective", .help = "What the manoeuvre is judged by: co, sv, vti, ppv, or map, hr, urine_output (weaker surrogates of a cardiac-output response; fluid challenge only)", .choices = "co,sv,vti,ppv,map,hr,urine_output"},
  {.id = "cvp_max", .kind = K::quantity, .table = "challenge", .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "cvp", .label = "CVP ceiling", .help = "fluid challenge safety limit: stop when CVP reaches this (default: the site's preset)"},
  {.id = "pf_fall_max", .kind = K::quantity, .table = "challenge", .dimension = D::fraction, .default_unit = "%", .plausibility = "safety_fall", .label = "Largest PaO2/FiO2 fall", .help = "fluid challenge safety limit: stop when PaO2/FiO2 falls by this much, relative (default: the site's preset)"},
  {.id = "spo2_fall_max", .kind = K::quantity, .table = "challenge", .dimension = D::fraction, .default_unit = "%", .plausibility = "safety_fall", .label = "Largest SpO2 fall", .help = "fluid challenge safety limit: stop when SpO2 falls by this many percentage points (default: the site's preset)"},
  {.id = "oedema_signs", .kind = K::flag, .table = "challenge", .label = "New signs of pulmonary oedema", .help = "fluid challenge safety limit: new signs of pulmonary oedema at this step, e.g. new B-lines on lung ultrasound or crackles (--oedema-signs), or none (--no-oedema-signs)", .yes = "--oedema-signs", .no = "--no-oedema-signs"},
  {.id = "challenge_hold", .kind = K::quantity, .table = "challenge", .key = "hold", .dimension = D::time, .default_unit = "s", .plausibility = "eeo_hold", .label = "Occlusion hold", .help = "manoeuvre step (end-expiratory occlusion of the step before): duration of the hold"},

  // ---- [step.peep_release] ---------------------------------------------------------------------
  {.id = "delta_eelv", .kind = K::quantity, .table = "peep_release", .dimension = D::volume, .default_unit = "mL", .plausibility = "delta_eelv", .label = "Released volume", .help = "Extra volume exhaled when PEEP is released high to low in one breath"},
  {.id = "peep_high", .kind = K::quantity, .table = "peep_release", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "peep", .label = "PEEP before release", .help = "PEEP before the release"},
  {.id = "peep_low", .kind = K::quantity, .table = "peep_release", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "peep", .label = "PEEP after release", .help = "PEEP after the release"},
  {.id = "pplat_low", .kind = K::quantity, .table = "peep_release", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "pplat", .label = "Plateau at low PEEP", .help = "Plateau pressure at the low PEEP"},
  {.id = "release_vt", .kind = K::quantity, .table = "peep_release", .key = "vt", .dimension = D::volume, .default_unit = "mL", .plausibility = "vt", .label = "VT at low PEEP", .help = "Tidal volume at the low PEEP (the step's VT when absent)"},
  {.id = "airway_opening_pressure", .kind = K::quantity, .table = "peep_release", .dimension = D::pressure, .default_unit = "cmH2O", .plausibility = "airway_opening_pressure", .label = "Airway opening pressure", .help = "Airway opening pressure, if airway closure was found"},

  // ---- [step.waveform] ----------------------------------------------------------------------------
  {.id = "record", .kind = K::text, .table = "waveform", .key = "file", .label = "Record", .help = "Recording of the step (WFDB .hea, EDF or CSV); in the file relative to the trial file"},
  {.id = "from", .kind = K::quantity, .table = "waveform", .key = "start", .dimension = D::time, .default_unit = "s", .plausibility = "waveform_time", .label = "Window start", .help = "Start of the window of the record to analyse (e.g. 60s, 5min)"},
  {.id = "to", .kind = K::quantity, .table = "waveform", .key = "end", .dimension = D::time, .default_unit = "s", .plausibility = "waveform_time", .label = "Window end", .help = "End of the window of the record to analyse"},

  // ---- [[voided]]: corrections, appended by trial void-step ------------------------------------------
  {.id = "voided_step", .kind = K::text, .table = "voided", .key = "step", .label = "Voided step", .help = "Label of the step this record voids (it stays in the file, out of the report)"},
  {.id = "reason", .kind = K::text, .table = "voided", .label = "Reason", .help = "Why the step is voided, e.g. \"values typed for the wrong patient\""},
  {.id = "voided_at", .kind = K::text, .table = "voided", .key = "at", .label = "Voided at", .help = "When the step was voided: a TOML date-time in UTC, written by trial void-step"},

  // ---- command line only ------------------------------------------------------------------------
  {.id = "ve", .kind = K::quantity, .dimension = D::flow, .default_unit = "L/min", .plausibility = "ve", .label = "Minute ventilation", .help = "Minute ventilation"},
  {.id = "peco2", .kind = K::quantity, .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "peco2", .label = "Mixed expired PCO2", .help = "Mixed expired PCO2, not end-tidal (for VD/VT)"},
  {.id = "pb", .kind = K::quantity, .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "pb", .label = "Barometric pressure", .help = "Barometric pressure (default: the preset, 760 mmHg)"},
  {.id = "ph2o", .kind = K::quantity, .dimension = D::pressure, .default_unit = "mmHg", .plausibility = "ph2o", .label = "Water vapour pressure", .help = "Water vapour pressure (default: the preset, 47 mmHg at 37 degC)"},
  {.id = "rq", .kind = K::number, .plausibility = "rq", .label = "Respiratory quotient", .help = "Respiratory quotient R, a plain number (default: the preset, 0.8)"},
  {.id = "ci", .kind = K::quantity, .dimension = D::flow_per_area, .default_unit = "L/min/m2", .label = "Cardiac index", .help = "Cardiac index"},
  {.id = "bsa", .kind = K::quantity, .dimension = D::area, .default_unit = "m2", .plausibility = "bsa", .label = "Body surface area", .help = "Body surface area, if known (otherwise from height and weight)"},
  {.id = "bsa_formula", .kind = K::choice, .label = "BSA formula", .help = "Body surface area formula: dubois (default) or mosteller", .choices = "dubois,mosteller", .aliases = "du-bois=dubois"},
  {.id = "vt_per_kg", .kind = K::quantity, .dimension = D::volume_per_mass, .default_unit = "mL/kg", .plausibility = "vt_per_kg", .label = "VT per kg PBW", .help = "Tidal volume per kg predicted body weight"},
  {.id = "crs", .kind = K::quantity, .dimension = D::compliance, .default_unit = "mL/cmH2O", .plausibility = "crs", .label = "Static compliance", .help = "Static respiratory-system compliance"},
  {.id = "beats", .kind = K::list, .default_unit = "mmHg", .label = "Beats", .help = "SBP/DBP per beat, ',' between beats, ';' between breaths"},
  {.id = "infusion", .kind = K::list, .label = "Infusion", .help = "One infusion as DRUG:rate=..,conc=.. (repeatable)"},
};
// clang-format on

bool same_word(std::string_view a, std::string_view b) {
  if (a.size() != b.size()) return false;
  for (std::size_t i = 0; i < a.size(); ++i) {
    char x = ascii_lower(a[i]), y = ascii_lower(b[i]);
    if (x == '-') x = '_';
    if (y == '-') y = '_';
    if (x != y) return false;
  }
  return true;
}

}  // namespace

std::span<const FieldSpec> all_fields() {
  return kFields;
}

const FieldSpec* find_field(std::string_view id) {
  for (const FieldSpec& f : kFields) {
    if (f.id == id) return &f;
  }
  return nullptr;
}

const FieldSpec& field_spec(std::string_view id) {
  if (const FieldSpec* f = find_field(id)) return *f;
  throw std::logic_error("field '" + std::string(id) + "' is not in the field registry");
}

std::string option_name(const FieldSpec& f) {
  if (f.kind == FieldKind::flag && !f.yes.empty()) return std::string(f.yes);
  std::string s = "--" + std::string(f.id);
  std::replace(s.begin(), s.end(), '_', '-');
  return s;
}

std::string_view file_key(const FieldSpec& f) {
  return f.key.empty() ? f.id : f.key;
}

std::string file_path(const FieldSpec& f) {
  if (f.table.empty()) return "";
  if (f.table == "step") return std::string(file_key(f));
  return std::string(f.table) + "." + std::string(file_key(f));
}

std::string field_name(std::string_view id, FieldContext context) {
  const FieldSpec* f = find_field(id);
  if (!f) return std::string(id);
  if (context == FieldContext::command_line) {
    if (f->kind == FieldKind::flag) return std::string(f->yes) + "/" + std::string(f->no);
    return option_name(*f);
  }
  const std::string path = file_path(*f);
  return path.empty() ? std::string(id) : path;
}

std::optional<AliasHit> resolve_alias(std::string_view spelling, std::string_view table) {
  const bool is_option = spelling.rfind("--", 0) == 0;
  for (const FieldSpec& f : kFields) {
    if (!is_option && !table.empty() && f.table != table) continue;
    for (std::string_view a : split_view(f.aliases, ',')) {
      bool inverted = false;
      if (!a.empty() && a.front() == '!') {
        inverted = true;
        a.remove_prefix(1);
      }
      if (a.find('=') != std::string_view::npos) continue;  // a choice word alias
      if (a == spelling) return AliasHit{&f, inverted};
    }
    if (is_option && f.kind == FieldKind::flag && spelling == f.no) return AliasHit{&f, true};
  }
  return std::nullopt;
}

std::string deprecation_note(std::string_view spelling, const AliasHit& hit, FieldContext context) {
  const FieldSpec& f = *hit.field;
  std::string now;
  std::string polarity;
  if (context == FieldContext::command_line) {
    now = f.kind == FieldKind::flag ? std::string(hit.inverted ? f.no : f.yes) : option_name(f);
  } else {
    now = std::string(file_key(f));
    if (f.kind == FieldKind::flag && hit.inverted) polarity = " (with the opposite true/false)";
  }
  return old_spelling_note(spelling, now, polarity);
}

std::string old_spelling_note(std::string_view spelling, std::string_view now,
                              std::string_view polarity) {
  return "note: '" + std::string(spelling) + "' is an old spelling of '" + std::string(now) + "'" +
         std::string(polarity) + "; it still works, but please use the new name";
}

std::vector<const FieldSpec*> fields_of_table(std::string_view table) {
  std::vector<const FieldSpec*> out;
  for (const FieldSpec& f : kFields) {
    if (f.table == table) out.push_back(&f);
  }
  return out;
}

std::vector<std::string> choice_words(const FieldSpec& f) {
  std::vector<std::string> out;
  for (std::string_view w : split_view(f.choices, ',')) out.emplace_back(w);
  return out;
}

std::vector<std::string> unclear_choice(const FieldSpec& f, std::string_view typed) {
  const std::string_view word = trim_view(typed);
  for (std::string_view u : split_view(f.unclear, ',')) {
    const auto eq = u.find('=');
    if (eq == std::string_view::npos || !same_word(u.substr(0, eq), word)) continue;
    std::vector<std::string> out;
    for (std::string_view w : split_view(u.substr(eq + 1), '|')) out.emplace_back(w);
    return out;
  }
  return {};
}

std::string unclear_choice_problem(const std::vector<std::string>& meant) {
  std::string words;
  for (std::size_t i = 0; i < meant.size(); ++i) {
    words += (i == 0 ? "" : i + 1 == meant.size() ? " or " : ", ") + ("'" + meant[i] + "'");
  }
  return "may mean " + words + "; say which is meant";
}

std::optional<std::string> match_choice(const FieldSpec& f, std::string_view typed) {
  const std::string_view word = trim_view(typed);
  for (std::string_view w : split_view(f.choices, ',')) {
    if (same_word(w, word)) return std::string(w);
  }
  // Old words of a choice: "fluid=fluid_challenge".
  for (std::string_view a : split_view(f.aliases, ',')) {
    const auto eq = a.find('=');
    if (eq != std::string_view::npos && same_word(a.substr(0, eq), word)) {
      return std::string(a.substr(eq + 1));
    }
  }
  return std::nullopt;
}

}  // namespace bb
