// Haemodynamics and preload responsiveness: pulse pressure variation (PPV),
// systolic pressure variation (SPV), stroke volume variation (SVV), the MAP
// estimate, the HR/RR ratio, the validity gates of the dynamic indices and the
// paired before/after preload tests.
//
// One function per published formula, then reusable gate and reading
// functions (the trial report and the waveform engine call them), then the
// analyses behind `calc ppv` and `calc preload-test`. Every cut-off is read
// from presets/thresholds/haemodynamics.toml. Methods: docs/methods.md.
//
// Inputs are named by their field id (breathbeat/fields/registry.hpp) in
// InputError and in Need; notes are typed. The words people read are made by
// breathbeat/present/haemodynamics.hpp.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// ---- formulas ---------------------------------------------------------------

// PP = SBP - DBP for one beat; textbook (common practice, no source).
Pressure pulse_pressure(Pressure sbp, Pressure dbp);
// PPV = (PPmax - PPmin) / ((PPmax + PPmin)/2) x 100 over one breath; Michard et al., AJRCCM
// 2000;162:134.
Ratio pulse_pressure_variation(Pressure pp_max, Pressure pp_min);
// SPV = SBPmax - SBPmin over one breath; Perel et al., Anesthesiology 1987;67:498.
Pressure systolic_pressure_variation(Pressure sbp_max, Pressure sbp_min);
// SVV = (SVmax - SVmin) / ((SVmax + SVmin)/2) x 100, PPV applied to stroke volume (from memory).
Ratio stroke_volume_variation(Volume sv_max, Volume sv_min);
// MAP = DBP + (SBP - DBP)/3 when no measured mean; textbook (common practice, no source).
Pressure mean_arterial_pressure_estimate(Pressure sbp, Pressure dbp);
// HR/RR, beats per breath; De Backer et al., Anesthesiology 2009;110:1092.
Ratio heart_rate_to_respiratory_rate_ratio(Frequency hr, Frequency rr);
// (after - before) / before, the relative change of a preload test (common practice, no source).
template <class Q>
Ratio relative_change(Q before, Q after) {
  return Ratio((after - before) / before);
}
// PPVafter - PPVbefore in percentage points, tidal-volume challenge; Myatra et al., Crit Care Med
// 2017;45:415.
Ratio ppv_absolute_change(Ratio ppv_before, Ratio ppv_after);

// ---- arterial pressure per breath ---------------------------------------------

// Extremes of pulse pressure within one breath.
struct BreathPulsePressures {
  Pressure pp_max;
  Pressure pp_min;
};

// One arterial beat.
struct ArterialBeat {
  Pressure sbp;
  Pressure dbp;
};
using BreathBeats = std::vector<ArterialBeat>;  // the beats of one breath

// Extremes of one breath found from its beats (pulse pressure = SBP - DBP per beat).
struct BreathExtremes {
  Pressure pp_max;
  Pressure pp_min;
  Pressure sbp_max;
  Pressure sbp_min;
};
BreathExtremes breath_extremes(const BreathBeats& beats);

// "62/48,60/47,63/50": PPmax/PPmin per breath; each number may carry its own
// pressure unit, a bare number is `default_unit`. Throws InputError naming `field`
// (the place in the list, "breath 2, PPmin", is in the problem).
std::vector<BreathPulsePressures> parse_pulse_pressure_cycles(
    std::string_view text, std::string_view field = "pp_cycles",
    std::string_view default_unit = "mmHg");
// "120/70,118/69,121/71;119/70,116/68,122/72": SBP/DBP per beat, beats separated
// by ',' and breaths by ';'. Throws InputError naming `field` (place in the problem).
std::vector<BreathBeats> parse_beats_by_breath(std::string_view text,
                                               std::string_view field = "beats",
                                               std::string_view default_unit = "mmHg");

// A percentage typed at the bedside: "12" and "12%" both mean 12 % (a bare
// number is never read as a fraction here, unlike saturations).
Ratio parse_percent_points(std::string_view text, std::string_view field);

// ---- validity gates and readings (reusable) ------------------------------------

// What is known about the conditions of a PPV/SVV reading; absent = not known.
struct PpvConditions {
  std::optional<bool> passive;  // controlled ventilation, no spontaneous effort
  std::optional<bool> regular_rhythm;
  std::optional<VolumePerMass> vt_per_kg;  // per kg predicted body weight
  std::optional<Frequency> hr;
  std::optional<Frequency> rr;
  std::optional<Compliance> crs;
  std::optional<bool> closed_chest;
  std::optional<bool> intra_abdominal_hypertension;
  std::optional<bool> rv_failure;
  // A "passive" or "regular" that only recorded signals support: the signals did
  // not contradict it, which does not prove it (the gate is not_contradicted).
  bool passive_from_signals = false;
  bool rhythm_from_signals = false;
};

// The eight PPV validity conditions (sources in docs/methods.md), in a fixed order, keys:
// passive_ventilation, regular_rhythm, vt_per_kg_pbw, hr_rr_ratio, compliance, closed_chest,
// no_intra_abdominal_hypertension, no_rv_failure. Each met, failed or unknown.
std::vector<Gate> ppv_gates(const PpvConditions& c, const Thresholds& t);

// True when any gate failed / is unknown.
bool any_gate_failed(const std::vector<Gate>& gates);
bool any_gate_unknown(const std::vector<Gate>& gates);

// PPV reading (key "ppv"): "below_grey_zone" (< ppv.grey_zone_low), "grey_zone"
// (low..high, both ends included; Cannesson et al., Anesthesiology 2011;115:231) or
// "above_grey_zone" (> ppv.grey_zone_high; Michard 2000), weighed by the direction
// of each condition (weighed_reading, breathbeat/condition_bias.hpp):
// "not_interpretable" when a failed condition could have pushed the value the way
// it points; conditional, led by them, when such conditions are unknown.
Reading read_ppv(Ratio ppv, const std::vector<Gate>& gates, const Thresholds& t);

// SVV reading (key "svv"): "below_threshold" (< svv.uncertain_low),
// "device_dependent_zone" (low..responsive_above) or "above_threshold" (from memory),
// weighed by direction as PPV is (the same conditions and [bias.ppv.*] entries).
Reading read_svv(Ratio svv, const std::vector<Gate>& gates, const Thresholds& t);

// ---- calc ppv -----------------------------------------------------------------

struct PpvInputs {
  std::vector<BreathPulsePressures> cycles;  // PPmax/PPmin per breath, or
  std::vector<BreathBeats> beats;            // SBP/DBP per beat grouped by breath
  std::optional<Ratio> svv;                  // as reported by a device
  std::optional<Pressure> sbp;               // for the MAP estimate with pulse pressures
  std::optional<Pressure> dbp;
  PpvConditions conditions;
};

// What calc ppv says besides its results, in the order it says it.
enum class PpvNoteKind {
  map_from_beats,        // MAP estimated from the mean SBP and DBP of `count` beats
  vt_challenge_instead,  // the VT gate failed: a tidal-volume challenge still tests responsiveness
  plr_instead,           // a gate failed (not IAH): passive leg raising by CO still applies
  beats_per_breath,      // `per_breath` beats listed per breath on average (approximates HR/RR)
  ppv_mean_of_breaths,   // PPV is the mean of `count` breaths
  svv_reading,           // the SVV reading, when PPV gives the main reading
};
struct PpvNote {
  PpvNoteKind kind = PpvNoteKind::ppv_mean_of_breaths;
  std::size_t count = 0;    // beats or breaths
  double per_breath = 0.0;  // beats per breath
};

struct PpvResults {
  std::optional<Ratio> ppv;  // mean over breaths
  std::vector<Ratio> ppv_per_breath;
  std::optional<Pressure> spv;  // mean over breaths (beats only)
  std::optional<Pressure> map_estimate;
  std::optional<Ratio> hr_rr_ratio;
  std::optional<Ratio> svv;
  std::vector<Gate> gates;
  std::optional<Reading> reading;  // PPV reading, or SVV when no PPV
  std::optional<Reading> svv_reading;
  std::vector<Skipped> skipped;  // needs named by field id
  std::vector<PpvNote> notes;
};

// Throws InputError naming the field by id (pp_cycles, beats, svv, sbp, dbp, hr,
// rr, vt_per_kg, crs): fewer breaths than ppv.min_breaths, PPmin > PPmax,
// DBP >= SBP, non-positive or implausible values, both or neither of
// pp_cycles/beats (neither is allowed when an SVV is given).
void validate_ppv(const PpvInputs& in, const Thresholds& t);
PpvResults analyse_ppv(const PpvInputs& in, const Thresholds& t);

// ---- preload tests (paired before/after) ---------------------------------------

enum class PreloadTestKind {
  vt_challenge,
  end_expiratory_occlusion,
  passive_leg_raising,
  fluid_challenge,
  mini_fluid_challenge
};
// What was measured before and after: PPV, cardiac output, stroke volume or LVOT VTI.
enum class PreloadMeasure { ppv, cardiac_output, stroke_volume, vti };
using PreloadValue = std::variant<Ratio, Flow, Volume, Length>;

const char* to_string(PreloadTestKind kind);    // "vt-challenge", "eeo", ... (as shown)
const char* to_string(PreloadMeasure measure);  // "ppv", "co", "sv", "vti"
// The test's id: the choice word of field `kind` and the trial-file table
// (preload.<id>): "vt_challenge", "eeo", "plr", "fluid_challenge", "mini_fluid".
const char* id_of(PreloadTestKind kind);
std::optional<PreloadTestKind> preload_test_kind_from_id(std::string_view id);
// A measure from its word (the choice words of field `measure`).
std::optional<PreloadMeasure> preload_measure_from_word(std::string_view word);
// What people call a test ("tidal-volume challenge") and a measure ("cardiac output").
const char* display_name(PreloadTestKind kind);
const char* display_name(PreloadMeasure measure);
// The preload_tests.* cut-off of a test, and its higher cut-off (fluid challenge only).
const char* cut_off_key(PreloadTestKind kind);
const char* cut_off_high_key(PreloadTestKind kind);  // nullptr when the test has one cut-off
// The measure used when none is named, and the measures a test accepts.
PreloadMeasure default_measure(PreloadTestKind kind);
std::vector<PreloadMeasure> accepted_measures(PreloadTestKind kind);

struct FluidRecord {
  std::optional<Volume> volume;
  std::optional<Time> duration;
  std::optional<std::string> fluid;  // crystalloid, albumin, ...
};

struct PreloadTestInputs {
  PreloadTestKind kind = PreloadTestKind::passive_leg_raising;
  PreloadMeasure measure = PreloadMeasure::cardiac_output;
  PreloadValue before;
  PreloadValue after;
  FluidRecord fluid;                              // fluid and mini fluid challenges
  std::optional<VolumePerMass> vt_before_per_kg;  // tidal-volume challenge
  std::optional<VolumePerMass> vt_after_per_kg;
  std::optional<bool> passive;                       // tidal-volume challenge, EEO
  std::optional<Time> hold;                          // EEO hold duration
  std::optional<bool> intra_abdominal_hypertension;  // PLR
  // A "passive" that only recorded signals support (the gate is not_contradicted).
  bool passive_from_signals = false;
  // Tidal-volume challenge: what is known of rhythm, HR/RR and the chest where it was done
  // (absent = unknown); they are conditions of the manoeuvre (Myatra et al. 2017).
  PpvConditions challenge_conditions;
};

// A fluid record outside the usual range (flagged, not refused); low == high
// when the usual record is one value (mini fluid challenge).
template <class Q>
struct OutsideUsual {
  Q value;
  Q low;
  Q high;
  std::string source;
};

// What a preload test says besides its reading, in the order it says it.
enum class PreloadNote {
  fluid_volume_not_recorded,
  fluid_duration_not_recorded,
  fluid_type_not_recorded,
  eeo_how_to_read,          // read the end of the hold; no triggering; beat-by-beat CO
  plr_how_to_do,            // semi-recumbent start, judge by CO at its peak, re-measure
  vt_challenge_restore_vt,  // return VT to its protective setting
};

struct PreloadTestResult {
  PreloadTestKind kind = PreloadTestKind::passive_leg_raising;
  Ratio change;  // percentage points (vt challenge) or relative change
  bool change_is_points = false;
  std::optional<Flow> fluid_rate;
  std::vector<Gate> conditions;  // the test's own conditions
  Reading reading;  // "responsive", "not_responsive", "between_cut_offs", "not_interpretable"
  // Fluid record outside common practice (flags "fluid_volume", "fluid_duration").
  std::optional<OutsideUsual<Volume>> volume_outside_usual;
  std::optional<OutsideUsual<Time>> duration_outside_usual;
  std::vector<PreloadNote> notes;
};

// The key of a test's reading ("end_expiratory_occlusion").
const char* reading_key(PreloadTestKind kind);

// Reading of a change for a test (key = test name), weighed by the direction of
// each condition ([bias.<test id>.*]). Cut-offs: preload_tests.* in haemodynamics.toml.
Reading read_preload_change(PreloadTestKind kind, Ratio change, const std::vector<Gate>& conditions,
                            const Thresholds& t);
// The test's own conditions (tidal-volume step and passive patient; EEO hold and
// passive patient, no triggering during the hold; IAH for PLR), with their bias.
std::vector<Gate> preload_test_conditions(const PreloadTestInputs& in, const Thresholds& t);

// A before/after value in the unit of its measure: PPV in % (bare number = %),
// cardiac output in L/min, stroke volume in mL, VTI in cm (bare numbers), or
// any unit of that dimension written after the number.
PreloadValue parse_preload_value(std::string_view text, PreloadMeasure measure,
                                 std::string_view field);

// Throws InputError naming the field by id (measure, before, after, volume,
// duration, vt_before, vt_after, hold).
void validate_preload_test(const PreloadTestInputs& in, const Thresholds& t);
PreloadTestResult analyse_preload_test(const PreloadTestInputs& in, const Thresholds& t);

// ---- fluid challenge: objective and safety limits ---------------------------------
// A fluid challenge has four parts (Vincent & Weil, Crit Care Med 2006;34:1333): the fluid,
// the rate (volume over time), the objective and the safety limits. The first two are
// FluidRecord; the last two are judged here from the two steps around the challenge.

// What the challenge aims at: a flow measure (CO, SV, VTI), PPV, or MAP, heart rate or urine
// output, weaker surrogates of a cardiac-output response (common practice, no source).
enum class FluidObjective { co, sv, vti, ppv, map, hr, urine_output };
const char* to_string(FluidObjective o);  // "co", ..., "urine_output" (field `objective`)
std::optional<FluidObjective> fluid_objective_from_word(std::string_view word);
bool is_surrogate(FluidObjective o);  // map, hr, urine_output
// The preload measure an objective is (co, sv, vti, ppv); nothing for the surrogates.
std::optional<PreloadMeasure> objective_measure(FluidObjective o);

enum class ObjectiveState {
  met,
  not_met,
  between_cut_offs,  // CO/SV/VTI between the two fluid-challenge cut-offs
  not_readable,      // the reading it rests on is not interpretable (a failed condition)
  not_measured,      // not recorded at both steps
  not_judged,        // urine output: answers over hours, not between two steps
};
const char* to_string(ObjectiveState s);  // "met", "not_met", ...

struct ObjectiveResult {
  FluidObjective objective = FluidObjective::co;
  ObjectiveState state = ObjectiveState::not_measured;
  bool surrogate = false;
  std::optional<Ratio> change;  // relative change (PPV: percentage points)
  std::string cut_off_key;      // the preset that judged it ("" when none)
};

// The preset of a surrogate objective ("fluid_challenge.objective_map_rise", ..._hr_fall);
// nullptr when none (urine output).
const char* surrogate_cut_off_key(FluidObjective o);
// MAP: met when its rise reaches the preset; heart rate: met when its fall reaches it.
// `change` = (after - before) / before. Urine output: not_judged.
ObjectiveState surrogate_objective_state(FluidObjective o, Ratio change, const Thresholds& t);

enum class SafetyLimit { cvp_ceiling, pf_ratio_fall, spo2_fall, pulmonary_oedema };
const char* to_string(SafetyLimit l);  // "cvp_ceiling", ...
enum class LimitState { reached, not_reached, not_checked };
const char* to_string(LimitState s);  // "reached", "not_reached", "not_checked"

struct FluidSafetyInputs {
  std::optional<Pressure> cvp_after;            // at the step after the fluid
  std::optional<Pressure> pf_before, pf_after;  // PaO2/FiO2
  std::optional<Ratio> spo2_before, spo2_after;
  std::optional<bool> oedema_signs;  // new signs of pulmonary oedema after (B-lines, crackles)
  // Stated for this challenge; otherwise the site's presets [fluid_challenge.*].
  std::optional<Pressure> cvp_max;
  std::optional<Ratio> pf_fall_max;    // relative fall
  std::optional<Ratio> spo2_fall_max;  // percentage points
};

using SafetyValue = std::variant<Pressure, Ratio>;
struct SafetyCheck {
  SafetyLimit limit = SafetyLimit::cvp_ceiling;
  LimitState state = LimitState::not_checked;
  bool stated = false;               // the limit was stated for this challenge
  std::optional<SafetyValue> value;  // CVP after; PaO2/FiO2 fall (relative); SpO2 fall (points)
  std::optional<SafetyValue> limit_value;  // absent for signs of pulmonary oedema
  std::string source;
};

// Each safety limit, in SafetyLimit order: reached when CVP after reaches its ceiling, when
// PaO2/FiO2 falls by (before - after)/before or SpO2 by (before - after) points at least the
// limit, or when new signs of pulmonary oedema are recorded; not checked when a value is missing.
std::vector<SafetyCheck> check_fluid_safety(const FluidSafetyInputs& in, const Thresholds& t);
bool safety_limit_reached(const std::vector<SafetyCheck>& checks);

}  // namespace bb
