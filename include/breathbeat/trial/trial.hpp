// A trial: one patient stepped through several ventilator settings, with what
// was measured at each step. This is the in-memory model; reading it from a
// TOML file is trial_file.hpp, analysing it is analysis.hpp.
//
// Every value is a unit-typed quantity; anything not measured is absent
// (std::nullopt). `places` remembers where each value was written (file, line,
// column) so later checks can point at it.
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/infusion.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/units.hpp"

namespace bb {

struct TrialPatient {
  std::optional<Sex> sex;
  std::optional<Length> height;
  std::optional<Mass> weight;
  std::optional<double> age_years;
  std::string label;  // free-text pseudonym; never required to be a real name
};

// [step.ventilator]
struct TrialVentilator {
  std::optional<VentMode> mode;
  std::optional<Pressure> set_peep;
  std::optional<Volume> vt;
  // `pinsp` as written: refused on reading (it does not say total or above PEEP); kept only
  // to point at it.
  std::optional<Pressure> pinsp;
  std::optional<Pressure> pc_pressure_total;       // PC: set pressure, total (PEEP included)
  std::optional<Pressure> pc_pressure_above_peep;  // PC: set pressure above set PEEP
  std::optional<Frequency> rr;
  std::optional<Time> ti;
  std::optional<double> ie_expiratory;  // I:E written "1:2" -> 2 (inspiration is 1)
  std::optional<Ratio> fio2;
  std::optional<Flow> flow;
  std::optional<Pressure> pmean;  // mean airway pressure as measured by the ventilator
};

// [step.hold]: end-inspiratory and end-expiratory holds, oesophageal balloon.
struct TrialHold {
  std::optional<Pressure> ppeak;
  std::optional<Pressure> pplat;
  std::optional<Pressure> peep_total;
  std::optional<Pressure> pes_ee;
  std::optional<Pressure> pes_ei;
};

// [step.gases]
struct TrialGases {
  std::optional<Pressure> pao2;
  std::optional<Pressure> paco2;
  std::optional<Ratio> sao2;
  std::optional<Ratio> spo2;
  std::optional<Ratio> svo2;   // mixed venous
  std::optional<Ratio> scvo2;  // central venous, stands in for SvO2 with a note
  std::optional<Pressure> pvo2;
  std::optional<MassConcentration> hb;
  std::optional<AmountConcentration> lactate;
};

// [step.circulation]
struct TrialCirculation {
  std::optional<Frequency> hr;
  std::optional<bool> rhythm_regular;
  std::optional<Pressure> sbp;
  std::optional<Pressure> dbp;
  std::optional<Pressure> map;
  std::optional<Pressure> cvp;
  std::optional<Pressure> pmsf;
  std::optional<Flow> co;
  std::optional<FlowPerArea> ci;
  std::optional<std::string> co_method;  // free text: "thermodilution", "pulse contour", "echo"
  std::vector<BreathPulsePressures> pp_cycles;  // PPmax/PPmin per breath
  std::optional<Ratio> ppv_monitor;             // PPV as shown by a monitor
  // Set when PPV/HR came from the step's recorded waveform, not from a monitor:
  // names the record and window (see trial/waveform_step.hpp).
  std::optional<std::string> signals_origin;
  std::optional<Ratio> svv;
  std::optional<bool> spontaneous_effort;
  std::optional<bool> chest_open;
  std::optional<bool> intra_abdominal_hypertension;
  std::optional<bool> rv_failure;
  // Set when a "regular" rhythm or "no breathing effort" above came only from
  // the step's recorded signals: they did not contradict it, which is not proof.
  bool rhythm_from_signals = false;
  bool passive_from_signals = false;
};

// [step.ultrasound]
struct TrialUltrasound {
  std::optional<Length> ivc_dmax;
  std::optional<Length> ivc_dmin;
  std::optional<Breathing> ivc_breathing;
  std::optional<Length> lvot_diameter;
  std::optional<Length> vti;
};

// [[step.infusion]]: the text as written and as read by the infusion module.
struct TrialInfusion {
  std::string drug;
  std::optional<std::string> rate;           // e.g. "15 mL/h"
  std::optional<std::string> dose;           // e.g. "0.25 ug/kg/min"
  std::optional<std::string> concentration;  // e.g. "80 ug/mL"
  std::optional<InfusionInput> parsed;       // absent if the text had a problem
  SourcePlace place;
};

// [step.preload.<test>]: a paired before/after preload test done at this step.
struct TrialPreloadTest {
  PreloadTestInputs inputs;         // VT per kg PBW filled from vt_before/vt_after and the patient
  std::optional<Volume> vt_before;  // tidal-volume challenge, as written
  std::optional<Volume> vt_after;
  SourcePlace place;
};

// [step.peep_release]: one-breath PEEP release for the recruitment-to-inflation ratio.
struct TrialPeepRelease {
  Volume delta_eelv;
  Pressure peep_high;
  Pressure peep_low;
  Pressure pplat_low;
  std::optional<Volume> vt;  // tidal volume at the low PEEP; the step's VT when absent
  std::optional<Pressure> airway_opening_pressure;
  SourcePlace place;
};

// [step.waveform]: a recording to analyse over a time window.
struct TrialWaveform {
  std::string file;
  std::optional<Time> start;
  std::optional<Time> end;
  SourcePlace place;
  bool analysed = false;  // set by apply_step_waveforms
  // Set by apply_step_waveforms when the window lies outside the record (check_step_window): the
  // step is reported without its signals.
  std::optional<InputError> window_refused;
  // What the record gave (set by apply_step_waveforms) and where a value typed at the step took
  // precedence over it, so that the report can say which value came from where.
  std::optional<Ratio> record_ppv;     // median PPV over the window
  std::optional<Frequency> record_hr;  // heart rate over the window
  bool ppv_typed = false;              // a typed PPV (monitor or pp_cycles) kept over record_ppv
  bool hr_typed = false;               // a typed heart rate kept over record_hr
  bool rhythm_overridden = false;      // the record's irregular rhythm over a typed "regular"
  bool passive_overridden = false;     // the record's breathing effort over a typed "passive"
};

// [step.challenge]: the record of a manoeuvre step (TrialStep::manoeuvre): for a fluid or mini
// fluid challenge its fluid, rate, objective and safety limits (Vincent & Weil, Crit Care Med
// 2006;34:1333); for an end-expiratory occlusion its hold.
struct TrialChallenge {
  FluidRecord fluid;
  std::optional<FluidObjective> objective;
  std::optional<Pressure> cvp_max;     // stated for this challenge (else the site's preset)
  std::optional<Ratio> pf_fall_max;    // relative
  std::optional<Ratio> spo2_fall_max;  // percentage points
  std::optional<bool> oedema_signs;    // new signs of pulmonary oedema at this step
  std::optional<Time> hold;
  SourcePlace place;
};

struct TrialStep {
  std::string label;
  std::string time;  // as written (clock time or elapsed); not interpreted
  SourcePlace place;
  // Set when this step is a preload test of the step before it (field `manoeuvre`): a passive
  // leg raise, fluid or mini fluid challenge, or end-expiratory occlusion.
  std::optional<PreloadTestKind> manoeuvre;
  // The label of the step just before this one in the file, when that step is voided: a
  // manoeuvre or tidal-volume challenge is never paired across it (set by the reader).
  std::optional<std::string> voided_before;
  std::optional<TrialChallenge> challenge;
  TrialVentilator ventilator;
  TrialHold hold;
  TrialGases gases;
  TrialCirculation circulation;
  TrialUltrasound ultrasound;
  std::vector<TrialInfusion> infusions;
  std::vector<TrialPreloadTest> preload_tests;
  std::optional<TrialPeepRelease> peep_release;
  std::optional<TrialWaveform> waveform;
  // Where each value was written, keyed "<table>.<field>" ("hold.pplat").
  std::map<std::string, SourcePlace> places;
};

// [[voided]]: a step taken out of the report by a correction appended to the
// file (breathbeat trial void-step); the step stays in the file as written.
struct TrialVoid {
  std::string step;        // label of the voided step
  std::string reason;      // free text
  std::string at;          // when it was voided, as written (a TOML date-time)
  SourcePlace place;       // of the [[voided]] record
  SourcePlace step_place;  // of the voided [[step]]
};

struct Trial {
  std::string file;  // where it was read from ("" for built-in)
  TrialPatient patient;
  std::optional<std::string> thresholds_file;  // as written, relative to the trial file
  std::string date;                            // [trial] date, "2026-12-03"; "" when not written
  std::vector<TrialStep> steps;                // the steps in force: voided steps are left out
  std::vector<TrialVoid> voided;
};

}  // namespace bb
