// Analysis of a trial: per step, everything the calculators can derive from
// what was measured; then, across steps, the heart-lung estimate against a
// reference step, the preload reading of each step and the comparison of the
// steps (brief sections 7 and 8). All formulas live in the calculator modules
// (mechanics, oxygen, haemodynamics, ivc, heart_lung); this module only
// gathers their inputs from the trial and arranges their answers.
// How each reading is formed: docs/report.md.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/heart_lung.hpp"
#include "breathbeat/ivc.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/output.hpp"
#include "breathbeat/oxygen.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb {

// ---- the calculators' inputs, gathered from one step ------------------------------

MechanicsInputs trial_mechanics_inputs(const TrialPatient& patient, const TrialStep& step);
// `pmean`: the mean airway pressure from the mechanics results, when known.
OxygenInputs trial_oxygen_inputs(const TrialPatient& patient, const TrialStep& step,
                                 std::optional<Pressure> pmean = std::nullopt);
// Nothing when no IVC diameters were recorded.
std::optional<IvcInputs> trial_ivc_inputs(const TrialPatient& patient, const TrialStep& step);
// The infusions running at this step, read by the infusion module (with the patient's weight).
InfusionSet trial_infusion_set(const TrialPatient& patient, const TrialStep& step);
// The conditions of PPV/SVV at this step (VT/kg and Crs from the mechanics results).
PpvConditions trial_ppv_conditions(const TrialStep& step, const MechanicsResults& mechanics);

// ---- what one step shows ------------------------------------------------------------

// One row of a report section at one step: a number with its unit, or a word.
struct Cell {
  std::string key;    // machine name, also the CSV/JSON column ("driving_pressure")
  std::string label;  // people's name, without the unit ("Driving pressure (Pplat - PEEP)")
  std::optional<Shown> shown;
  std::string text;  // when the value is a word ("vc", "regular")
  std::string note;  // method or assumption
};

// How one preload index reads at one step.
enum class PreloadDirection { responsive, unresponsive, grey_zone, not_valid };
const char* to_string(PreloadDirection d);

struct PreloadIndexReading {
  std::string key;    // "ppv", "ppv_monitor", "svv", "ivc", "vt_challenge", "eeo", "plr", ...
  std::string label;  // "Pulse pressure variation"
  std::vector<Cell> values;
  std::vector<Gate> gates;
  Reading reading;
  PreloadDirection direction = PreloadDirection::not_valid;
  bool conditional = false;  // some gate unknown: the reading holds only if it is met
};

// The overall preload statement of a step.
struct PreloadStatement {
  std::string category;  // "likely_responsive", "unlikely", "indeterminate", "not_assessable"
  std::string text;
  std::vector<std::string> supporting;    // indices the statement rests on
  std::vector<std::string> grey_zone;     // valid indices in their grey zone
  std::vector<std::string> failed_gates;  // "ppv: vt_per_kg_pbw", ...
};

struct StepAnalysis {
  std::string label;
  std::string time;
  std::vector<Cell> settings;
  std::vector<Cell> mechanics;
  std::vector<Cell> gas_exchange;  // gases and O2 transport
  std::vector<Cell> circulation;   // pressures, CO, PPV value, IVC indices, infusions
  std::vector<Flag> flags;         // limits breached at this step
  std::vector<PreloadIndexReading> preload;
  PreloadStatement preload_statement;
  std::vector<std::string> notes;

  // Typed results the comparison across steps uses.
  MechanicsResults mechanics_results;
  OxygenResults oxygen_results;
  std::optional<Pressure> map;  // measured, or estimated from SBP/DBP
  std::optional<Ratio> ppv;     // from pulse-pressure cycles, else the monitor
};

// The heart-lung estimate of one step against the reference step (brief §7).
struct HeartLungComparison {
  std::string step;
  std::string reference;
  std::optional<HeartLungEstimate> estimate;
  std::vector<Cell> estimated;  // ranges (Shown low/high)
  std::vector<Cell> observed;   // change in CO, MAP, PPV beside the estimate
  std::vector<std::string> notes;
};

// One finding of the comparison across steps (brief §8). States what was seen;
// never prescribes a setting.
struct Finding {
  std::string key;  // "best_compliance", "max_do2", "lowest_driving_pressure", "limit_breach",
                    // "haemodynamic_cost", "oxygenation_gain", "recruitment_to_inflation",
                    // "vt_challenge", "trade_off"
  std::string text;
  std::vector<std::string> steps;  // the step labels it concerns
  std::vector<Cell> values;
  bool flagged = false;
  std::string source;
};

struct TrialAnalysis {
  std::string file;
  std::string patient_label;
  std::vector<Cell> patient;  // sex, height, weight, PBW, BSA
  std::string reference;      // label of the reference step
  std::vector<StepAnalysis> steps;
  std::vector<HeartLungComparison> heart_lung;
  std::vector<Finding> comparison;
  std::vector<std::string> notes;  // what the analysis could not do
  std::vector<std::string> cautions;
  std::vector<std::pair<std::string, std::string>> thresholds_used;  // key, "value unit (source)"
};

// The whole analysis. `reference` names the reference step (default the first);
// an unknown label throws InputError placed at `reference_place` if given.
TrialAnalysis analyse_trial(const Trial& trial, const Thresholds& limits,
                            const std::optional<std::string>& reference = std::nullopt);

}  // namespace bb
