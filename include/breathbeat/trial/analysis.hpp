// Analysis of a trial: per step, everything the calculators can derive from
// what was measured; then, across steps, the heart-lung estimate against a
// reference step, the preload reading of each step and the comparison of the
// steps (methods and sources: docs/methods.md, "Heart–lung estimates and comparing PEEP steps").
// All formulas live in the calculator modules (mechanics, oxygen, haemodynamics, ivc, echo,
// infusion, heart_lung); this module only gathers their inputs from the trial and keeps their typed
// results. It returns facts, never words: the report's cells, labels and
// sentences are made by the presenters (breathbeat/present/report.hpp).
// How each reading is formed: docs/report.md.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <utility>
#include <variant>
#include <vector>

#include "breathbeat/echo.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/infusion.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/oxygen.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// ---- the calculators' inputs, gathered from one step ------------------------------

MechanicsInputs trial_mechanics_inputs(const TrialPatient& patient, const TrialStep& step);
// `pmean`: the mean airway pressure estimated by the mechanics results, when known; used
// (with pmean_estimated) only when the step has no measured ventilator.pmean.
OxygenInputs trial_oxygen_inputs(const TrialPatient& patient, const TrialStep& step,
                                 std::optional<Pressure> pmean = std::nullopt);
// Nothing when no IVC diameters were recorded.
std::optional<IvcInputs> trial_ivc_inputs(const TrialPatient& patient, const TrialStep& step);
// Nothing unless both LVOT diameter and VTI were recorded.
std::optional<EchoInputs> trial_echo_inputs(const TrialPatient& patient, const TrialStep& step);
// The infusions running at this step, read by the infusion module (with the patient's weight).
InfusionSet trial_infusion_set(const TrialPatient& patient, const TrialStep& step);
// The conditions of PPV/SVV at this step (VT/kg and Crs from the mechanics results).
PpvConditions trial_ppv_conditions(const TrialStep& step, const MechanicsResults& mechanics);
// Ti as set, or from I:E and RR: Ti = (60/RR) * I/(I+E) (common practice, no source).
std::optional<Time> trial_inspiratory_time(const TrialVentilator& v);

// ---- the preload reading of one step ------------------------------------------------

// How one preload index reads at one step.
enum class PreloadDirection { responsive, unresponsive, grey_zone, not_valid };
const char* to_string(PreloadDirection d);

// Which index a reading is.
enum class PreloadIndex {
  ppv,           // from the pulse-pressure cycles of the step
  ppv_monitor,   // PPV as a monitor showed it
  ppv_signals,   // PPV from the step's recorded waveform
  svv,           // stroke volume variation from a device
  ivc,           // IVC respiratory change
  preload_test,  // a paired test recorded at the step ([step.preload.<test>])
  vt_challenge,  // two steps differing only in VT (6 -> 8 mL/kg PBW)
  manoeuvre,     // a step marked as a preload test of the step before it (TrialStep::manoeuvre)
};

// A fluid or mini fluid challenge: its objective and its safety limits (Vincent & Weil, Crit Care
// Med 2006;34:1333). `stop`: a safety limit was reached, whatever the objective did.
struct FluidChallengeOutcome {
  ObjectiveResult objective;
  bool objective_stated = false;  // [step.challenge] objective; else the measure compared
  std::vector<SafetyCheck> safety;
  bool stop = false;
  FluidRecord fluid;         // as recorded at the manoeuvre step
  std::optional<Flow> rate;  // volume over time
};
struct PreloadIndexReading {
  // id: "ppv", "ppv_monitor", "ppv_signals", "svv", "ivc", "vt_challenge" or a test's
  // id_of(kind) ("eeo", "plr", ...)
  std::string key;
  PreloadIndex index = PreloadIndex::ppv;
  std::optional<Ratio> value;  // ppv, ppv_monitor, ppv_signals, svv
  // preload_test and vt_challenge: what the test compared and what it found.
  std::optional<PreloadTestInputs> test_inputs;
  std::optional<PreloadTestResult> test;
  std::string from_step;  // vt_challenge: the low-VT step; manoeuvre: the step before
  std::string to_step;    // vt_challenge: the high-VT step; manoeuvre: the manoeuvre step
  // manoeuvre, a fluid or mini fluid challenge: its objective and safety limits (as the finding).
  std::optional<FluidChallengeOutcome> fluid;
  std::vector<Gate> gates;
  Reading reading;
  PreloadDirection direction = PreloadDirection::not_valid;
  bool conditional = false;  // some gate unknown: the reading holds only if it is met
};

// The overall preload statement of a step.
enum class PreloadCategory { likely_responsive, unlikely, indeterminate, not_assessable };
const char* to_string(PreloadCategory c);  // "likely_responsive", ..., "not_assessable"

// A gate that failed, by the index it belongs to and its condition id.
struct FailedGate {
  std::string index;  // "ppv"
  std::string gate;   // "vt_per_kg_pbw"
};

// What an index is measured from. Indices from one measurement count once when
// readings are weighed together: PPV however obtained, SVV (pulse contour) and a
// tidal-volume challenge all come from the arterial pressure swing; IVC
// distensibility and variation both come from Dmax and Dmin; each paired
// manoeuvre is its own measurement.
enum class PreloadMeasurement {
  arterial_swing,  // ppv, ppv_monitor, ppv_signals, svv, vt_challenge
  ivc_diameters,   // ivc
  end_expiratory_occlusion,
  passive_leg_raising,
  fluid_challenge,
  mini_fluid_challenge,
};
const char* to_string(PreloadMeasurement m);  // "arterial_swing", "ivc_diameters", ...
PreloadMeasurement measurement_of(const PreloadIndexReading& r);

// The indices of one measurement that a statement rests on.
struct MeasurementSupport {
  PreloadMeasurement measurement = PreloadMeasurement::arterial_swing;
  std::vector<std::string> indices;
};

// A condition a statement holds only if met: unknown, or only not contradicted
// by the signals, and able to have made a supporting reading point its way.
struct OpenCondition {
  std::string index;  // "ppv"
  std::string gate;   // "regular_rhythm"
  Gate condition;     // the gate (present/gate_words.hpp words it)
  GateState state = GateState::unknown;
};

struct PreloadStatement {
  PreloadCategory category = PreloadCategory::not_assessable;
  bool any_index = false;                 // some index was recorded at this step
  std::vector<std::string> responsive;    // valid indices reading responsive
  std::vector<std::string> unresponsive;  // valid indices reading not responsive
  std::vector<std::string> grey_zone;     // valid indices in their grey zone
  std::vector<std::string> supporting;    // indices the statement rests on
  // The same, grouped by independent measurement (what "supported by" counts).
  std::vector<MeasurementSupport> measurements;
  bool conditional = false;  // a supporting reading holds only if open conditions are met
  std::vector<OpenCondition> open_conditions;
  std::vector<FailedGate> failed_gates;
};

// ---- what one step shows ------------------------------------------------------------

struct StepPpv {  // PPV from the step's pulse-pressure cycles
  PpvInputs inputs;
  PpvResults results;
};
struct StepIvc {
  IvcInputs inputs;
  IvcResults results;
};
struct StepEcho {
  EchoInputs inputs;
  EchoResults results;
};
struct StepInfusions {
  InfusionSet set;
  InfusionResults results;
};

struct StepAnalysis {
  std::string label;
  std::string time;
  TrialStep recorded;  // what was written for this step

  MechanicsInputs mechanics_inputs;
  MechanicsResults mechanics_results;
  OxygenInputs oxygen_inputs;
  OxygenResults oxygen_results;
  std::optional<Time> ti;       // as set, or from I:E and RR
  std::optional<Pressure> map;  // measured, or estimated from SBP/DBP
  bool map_estimated = false;
  std::optional<StepPpv> ppv_cycles;              // from pulse-pressure cycles
  std::optional<InputError> ppv_cycles_rejected;  // why the cycles gave no PPV
  std::optional<Ratio> ppv;      // from pulse-pressure cycles, else the monitor (or signals)
  std::optional<StepIvc> ivc;    // both IVC diameters recorded
  std::optional<StepEcho> echo;  // LVOT diameter and VTI recorded
  std::optional<StepInfusions> infusions;  // some infusion running
  std::vector<PreloadIndexReading> preload;
  // On a step marked as a passive leg raise or an end-expiratory occlusion (TrialStep::manoeuvre):
  // the step's own readings (PPV, SVV, IVC, a test recorded at the step), measured while the
  // manoeuvre changed preload or held ventilation, so not a state of the patient. They are not
  // read: left out of `preload` and of the statement, kept here to be shown as not read.
  std::vector<PreloadIndexReading> not_read_during_manoeuvre;
  PreloadStatement preload_statement;
  // Set when this step is the high-VT step of a tidal-volume challenge: the label of its low-VT
  // step. A brief manoeuvre, not a candidate setting: left out of the best-step findings.
  std::optional<std::string> vt_challenge_from;
  // Set when this step is a manoeuvre (recorded.manoeuvre) read against the step before it: that
  // step's label. A manoeuvre step is never a candidate setting, read or not.
  std::optional<std::string> manoeuvre_from;
};

// The heart-lung estimate of one step against the reference step (docs/methods.md, "Heart–lung
// estimates", sections 1-5).
struct HeartLungComparison {
  std::string step;
  std::string reference;
  std::optional<HeartLungEstimate> estimate;
  std::optional<InputError> not_estimated;  // why no estimate was made
  // Observed beside the estimate (absent at the reference step itself).
  std::optional<Ratio> observed_co_change;      // relative change
  std::optional<Ratio> observed_map_change;     // relative change
  std::optional<Ratio> observed_ppv_change;     // in percentage points
  std::optional<Pressure> observed_cvp_change;  // step - reference, both measured
  // Set, and observed_ppv_change left empty, when the PPV of the step or of the reference was
  // measured during a passive leg raise or an end-expiratory occlusion (TrialStep::manoeuvre):
  // not the patient's state, so the change is not read (as in the preload table).
  struct PpvNotRead {
    std::string step;  // the manoeuvre step whose PPV it was
    PreloadTestKind manoeuvre;
  };
  std::optional<PpvNotRead> ppv_not_read;
};

// ---- the comparison across steps (docs/methods.md, "Comparing steps of a PEEP trial") ----

enum class FindingKind {
  best_compliance,
  max_do2,
  lowest_driving_pressure,
  limit_breach,
  haemodynamic_cost,
  oxygenation_gain,
  recruitment_to_inflation,
  vt_challenge,
  manoeuvre,  // a passive leg raise, fluid or mini fluid challenge or EEO between two steps
  trade_off,
  map_below_target,     // steps with MAP below the target (shock context)
  lactate_above_limit,  // steps with lactate above the limit (shock context)
  lactate_change,       // lactate between time-stamped measurements
};
const char* to_string(FindingKind k);  // "best_compliance", ...

// What a haemodynamic cost is measured on.
enum class CostMeasure { co, do2, map };
const char* to_string(CostMeasure m);  // "co", "do2", "map"

// best_compliance, max_do2, lowest_driving_pressure: the winning value, and the steps whose
// value lies within the preset resolution of it (trial.resolution_*): ties, named as
// Finding::steps[1..] with their values in `tied`. A tidal-volume challenge step is never a
// candidate.
using StepValue = std::variant<Compliance, Flow, Pressure>;
// NOLINTNEXTLINE(bugprone-exception-escape): copying a quantity (one double) cannot throw
struct BestStepFinding {
  StepValue value;
  std::vector<StepValue> tied;  // at steps[1], steps[2], ...
  // The resolution: absolute (same quantity as value) or relative (Ratio, of the best value).
  std::variant<Compliance, Flow, Pressure, Ratio> resolution;
};
// limit_breach: a lung-protective limit the step breaches (Pplat, dP, mechanical power).
struct LimitBreachFinding {
  MechanicsLimit limit = MechanicsLimit::pplat;
};
// haemodynamic_cost: a fall against the reference step (as the heart-lung table measures).
// Finding::steps = {step, reference}.
// NOLINTNEXTLINE(bugprone-exception-escape): copying a quantity (one double) cannot throw
struct HaemodynamicCostFinding {
  CostMeasure measure = CostMeasure::co;
  std::variant<Flow, Pressure> value;            // at the step
  std::variant<Flow, Pressure> reference_value;  // at the reference step
  Ratio change;                                  // (step - reference) / reference
  Ratio flag_at;                                 // the fall that is flagged
};
// oxygenation_gain: the highest PaO2/FiO2 against the reference step.
struct OxygenationGainFinding {
  Pressure best;
  Pressure reference;
  Ratio gain;  // (best - reference) / reference
  bool best_is_reference = false;
};
// recruitment_to_inflation: from a PEEP release.
struct RecruitmentFinding {
  std::optional<RecruitmentResult> result;
  bool no_tidal_volume = false;            // neither the release nor the step gave a VT
  std::optional<InputError> not_computed;  // the recruitment module's objection
};
// vt_challenge: two steps differing only in VT (about 6 -> about 8 mL/kg PBW, same PEEP, mode,
// RR and FiO2; Myatra et al., Crit Care Med 2017;45:415). Found only for two consecutive steps,
// low VT first, within trial.vt_challenge_max_interval where both times are recorded; a pair at
// the challenge's volumes and settings that breaks one of these is kept as refused.
enum class VtChallengeRefusal {
  wrong_order,      // the 8 mL/kg step comes first
  not_consecutive,  // other steps lie between them
  voided_between,   // a voided step lies between them in the file
  too_far_apart,    // the times are further apart than the preset interval
};
const char* to_string(VtChallengeRefusal r);  // "wrong_order", ...
// Keys of the conditions checked at each of the two steps, prefixed to the gate key in the
// challenge reading's gates ("low_vt_step.regular_rhythm").
inline constexpr const char* kVtChallengeLowStep = "low_vt_step.";
inline constexpr const char* kVtChallengeHighStep = "high_vt_step.";
struct VtChallengeFinding {
  std::optional<Ratio> ppv_low;             // at the low-VT step
  std::optional<Ratio> ppv_high;            // at the high-VT step
  std::optional<PreloadTestResult> result;  // absent when PPV was not recorded at both
  std::vector<Gate> conditions;             // the manoeuvre's and each step's (prefixed keys)
  std::optional<Time> interval;             // between the two steps, when both times are read
  Time max_interval;                        // trial.vt_challenge_max_interval
  std::optional<VtChallengeRefusal> refused;
};
// manoeuvre: a step marked as a preload test of the step before it (TrialStep::manoeuvre), read
// from the two steps' CO, SV or VTI (the test's accepted_measures) with the test's cut-off, the
// test's conditions checked at both steps. As for the tidal-volume challenge, the two steps must
// be consecutive (the step before is the baseline) and within the preset interval
// (trial.manoeuvre_max_interval; trial.fluid_challenge_max_interval for a fluid challenge); a
// pair that breaks this is kept as refused. The baseline is the step just before it in the file:
// when that step is voided the manoeuvre is refused (before_voided), never paired with an earlier
// one. Finding::steps = {before, manoeuvre step} (before_voided: the voided step's label), or
// {manoeuvre step} when there is no step before.
enum class ManoeuvreRefusal {
  no_step_before,       // the first step is marked as a manoeuvre
  before_is_manoeuvre,  // the step before is itself a manoeuvre: not a baseline
  settings_changed,     // a ventilator setting recorded at both steps differs
  too_far_apart,        // the times are further apart than the preset interval
  before_voided,        // the step just before it in the file is voided: no baseline
};
const char* to_string(ManoeuvreRefusal r);  // "no_step_before", ...
// Keys of the conditions checked at each of the two steps ("before_step.no_intra_abdominal_...").
inline constexpr const char* kManoeuvreBeforeStep = "before_step.";
inline constexpr const char* kManoeuvreAfterStep = "after_step.";
// NOLINTNEXTLINE(bugprone-exception-escape): copying a quantity (one double) cannot throw
struct ManoeuvreFinding {
  PreloadTestKind kind = PreloadTestKind::passive_leg_raising;
  std::vector<PreloadMeasure> accepted;   // what the test is read by (never PPV for a leg raise)
  std::optional<PreloadMeasure> measure;  // what the two steps were compared by
  std::optional<PreloadValue> before;
  std::optional<PreloadValue> after;
  std::optional<PreloadTestResult> result;  // absent when refused or no measure at both steps
  std::vector<Gate> conditions;             // the test's and each step's (prefixed keys)
  std::optional<Time> interval;
  Time max_interval;
  std::optional<ManoeuvreRefusal> refused;
  std::vector<std::string> changed_settings;   // settings_changed: the field ids ("set_peep")
  std::optional<FluidChallengeOutcome> fluid;  // fluid and mini fluid challenges
};

// trade_off: the best-oxygenating step against its circulatory cost.
struct TradeOffCost {
  CostMeasure measure = CostMeasure::co;
  Ratio change;
  std::string against;  // label of the reference step it is measured against
};
struct TradeOffFinding {
  Pressure pf_ratio;
  std::vector<TradeOffCost> costs;
  std::optional<Ratio> ppv;  // at the best-oxygenating step
  PreloadCategory statement = PreloadCategory::not_assessable;
  bool statement_conditional = false;  // the statement holds only if its open conditions are met
};

// map_below_target: MAP below trial.map_target at each of Finding::steps (values in order).
// lactate_above_limit: lactate above trial.lactate_high at each of Finding::steps.
// NOLINTNEXTLINE(bugprone-exception-escape): copying a quantity (one double) cannot throw
struct ShockContextFinding {
  std::vector<std::variant<Pressure, AmountConcentration>> values;  // at steps[0], steps[1], ...
  std::variant<Pressure, AmountConcentration> limit;
  std::vector<bool> map_estimated;  // map_below_target: MAP estimated from SBP/DBP at that step
};
// lactate_change: lactate at each time-stamped measurement (Finding::steps, in time order) and
// the change between successive ones. Two points show a change, never a trend.
struct LactateMeasurement {
  AmountConcentration value;
  std::string time;  // as written
};
struct LactateStepChange {
  AmountConcentration change;  // later - earlier
  Ratio relative;              // (later - earlier) / earlier
  Time interval;
};
struct LactateChangeFinding {
  std::vector<LactateMeasurement> measurements;
  std::vector<LactateStepChange> changes;  // between measurements i and i+1
};

using FindingDetail =
    std::variant<BestStepFinding, LimitBreachFinding, HaemodynamicCostFinding,
                 OxygenationGainFinding, RecruitmentFinding, VtChallengeFinding, ManoeuvreFinding,
                 TradeOffFinding, ShockContextFinding, LactateChangeFinding>;

// One finding of the comparison across steps. States what was seen; never
// prescribes a setting.
struct Finding {
  FindingKind kind = FindingKind::best_compliance;
  std::vector<std::string> steps;  // the step labels it concerns
  bool flagged = false;
  std::string source;
  FindingDetail detail;
};

// A step whose [step.waveform] was not analysed (breathbeat wave analyses it).
struct UnanalysedWaveform {
  std::string step;
  std::string file;
  std::optional<InputError> window_refused;  // the window lies outside the record
};

// Trials side by side (breathbeat/trial/side_by_side.hpp): for one best-setting finding
// (best_compliance, max_do2, lowest_driving_pressure), the best step of each trial, by the
// label it has in its own file ("" where that trial has no such finding).
// The ventilator settings of a trial's best step, as recorded there.
struct BestStepSettings {
  std::optional<Pressure> set_peep;
  std::optional<Pressure> peep_total;  // from an end-expiratory hold, when recorded
  std::optional<Volume> vt;
  std::optional<VolumePerMass> vt_per_kg;  // per kg predicted body weight
};

struct BestAcrossTrials {
  FindingKind kind = FindingKind::best_compliance;
  std::vector<std::string> best;  // one per trial, in TrialAnalysis::trials order
  // One per trial, beside `best` (nullopt where that trial has no best step).
  std::vector<std::optional<BestStepSettings>> settings;
  // The trials' best settings differ: set PEEP (else total PEEP) by more than
  // trial.same_peep_tolerance, or VT; where neither is recorded, their labels differ.
  bool changed = false;
};

struct TrialAnalysis {
  std::string file;
  std::string date;  // [trial] date; "" when not written (several dates: the first)
  // Several trials side by side: their names (dates, or file names) in order, and where
  // each trial's best settings were; empty for one trial.
  std::vector<std::string> trials;
  std::vector<BestAcrossTrials> best_across_trials;
  std::vector<std::string> references;  // side by side: each trial's reference step, in order
  TrialPatient patient;
  std::optional<Mass> pbw;  // from sex and height
  std::optional<Area> bsa;  // Du Bois, from weight and height
  std::string reference;    // label of the reference step
  std::vector<StepAnalysis> steps;
  std::vector<HeartLungComparison> heart_lung;
  std::vector<Finding> comparison;
  std::vector<UnanalysedWaveform> unanalysed_waveforms;
  std::vector<TrialVoid> voided;  // steps left out by [[voided]] records, in file order
  Thresholds limits;              // the thresholds the analysis used
  std::vector<std::pair<std::string, ThresholdEntry>> thresholds_used;  // the main limits
};

// A step's time as written ("09:10", "09:10:30", "2026-12-02T09:10:00") in time since midnight
// (plus whole days when a date is written); nothing when it is free text or empty.
std::optional<Time> trial_clock_time(const std::string& written);
// Written in the form of a clock time ("H:MM", "HH:MM:SS", a date-time, with a zone), whether or
// not it is a possible one: such a time that trial_clock_time cannot read ("25:70") is refused.
bool trial_time_has_clock_form(const std::string& written);
// From one step's time to a later step's: nothing unless both are read; a clock time earlier
// than the first is taken as the next day (common practice, no source).
std::optional<Time> trial_interval(const std::string& earlier, const std::string& later);

// The whole analysis. `reference` names the reference step (default the first);
// an unknown label throws InputError naming the field "reference" (the command
// line says --reference).
TrialAnalysis analyse_trial(const Trial& trial, const Thresholds& limits,
                            const std::optional<std::string>& reference = std::nullopt);

}  // namespace bb
