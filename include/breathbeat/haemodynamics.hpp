// Haemodynamics and preload responsiveness: pulse pressure variation (PPV),
// systolic pressure variation (SPV), stroke volume variation (SVV), the MAP
// estimate, the HR/RR ratio, the validity gates of the dynamic indices and the
// paired before/after preload tests.
//
// One function per published formula, then reusable gate and reading
// functions (the trial report and the waveform engine call them), then the
// analyses behind `calc ppv` and `calc preload-test`. Every cut-off is read
// from presets/thresholds/haemodynamics.toml. Methods: docs/methods.md.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

#include "breathbeat/output.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"

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
// pressure unit, a bare number is `default_unit`. Throws InputError naming `field`.
std::vector<BreathPulsePressures> parse_pulse_pressure_cycles(
    std::string_view text, std::string_view field = "cycles",
    std::string_view default_unit = "mmHg");
// "120/70,118/69,121/71;119/70,116/68,122/72": SBP/DBP per beat, beats separated
// by ',' and breaths by ';'. Throws InputError naming `field`.
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
};

// The eight gates of brief §5, in a fixed order, keys: passive_ventilation,
// regular_rhythm, vt_per_kg_pbw, hr_rr_ratio, compliance, closed_chest,
// no_intra_abdominal_hypertension, no_rv_failure. Each met, failed or unknown.
std::vector<Gate> ppv_gates(const PpvConditions& c, const Thresholds& t);

// True when any gate failed / is unknown.
bool any_gate_failed(const std::vector<Gate>& gates);
bool any_gate_unknown(const std::vector<Gate>& gates);

// PPV reading (key "ppv"): category "not_interpretable" when any gate failed;
// otherwise "below_grey_zone" (< ppv.grey_zone_low), "grey_zone" (low..high,
// both ends included; Cannesson et al., Anesthesiology 2011;115:231) or
// "above_grey_zone" (> ppv.grey_zone_high, likely responsive; Michard 2000).
// Unknown gates keep the category and the text says the reading is conditional.
Reading read_ppv(Ratio ppv, const std::vector<Gate>& gates, const Thresholds& t);

// SVV reading (key "svv"): "not_interpretable", "below_threshold" (< svv.uncertain_low),
// "device_dependent_zone" (low..responsive_above) or "above_threshold" (from memory).
Reading read_svv(Ratio svv, const std::vector<Gate>& gates, const Thresholds& t);

// ---- calc ppv -----------------------------------------------------------------

struct PpvInputs {
  std::vector<BreathPulsePressures> cycles;  // PPmax/PPmin per breath, or
  std::vector<BreathBeats> beats;            // SBP/DBP per beat grouped by breath
  std::optional<Ratio> svv;                  // as reported by a device
  std::optional<Pressure> sbp;               // for the MAP estimate with --cycles
  std::optional<Pressure> dbp;
  PpvConditions conditions;
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
  std::vector<Skipped> skipped;
  std::vector<std::string> notes;
};

// Throws InputError naming the field: fewer breaths than ppv.min_breaths,
// PPmin > PPmax, DBP >= SBP, non-positive or implausible values, both or
// neither of cycles/beats (neither is allowed when an SVV is given).
void validate_ppv(const PpvInputs& in, const Thresholds& t);
PpvResults analyse_ppv(const PpvInputs& in, const Thresholds& t);
Answer describe_ppv(const PpvInputs& in, const PpvResults& r, const Thresholds& t);

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

const char* to_string(PreloadTestKind kind);    // "vt-challenge", "eeo", ...
const char* to_string(PreloadMeasure measure);  // "ppv", "co", "sv", "vti"
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
};

struct PreloadTestResult {
  PreloadTestKind kind = PreloadTestKind::passive_leg_raising;
  Ratio change;  // percentage points (vt challenge) or relative change
  bool change_is_points = false;
  std::optional<Flow> fluid_rate;
  std::vector<Gate> conditions;  // the test's own conditions
  Reading reading;  // "responsive", "not_responsive", "between_cut_offs", "not_interpretable"
  std::vector<Flag> flags;  // fluid record outside common practice
  std::vector<std::string> notes;
};

// Reading of a change for a test (key = test name); any failed condition makes it
// "not_interpretable". Cut-offs: preload_tests.* in haemodynamics.toml.
Reading read_preload_change(PreloadTestKind kind, Ratio change, const std::vector<Gate>& conditions,
                            const Thresholds& t);
// The test's own conditions (tidal-volume step, EEO hold, passive patient, IAH for PLR).
std::vector<Gate> preload_test_conditions(const PreloadTestInputs& in, const Thresholds& t);

// A before/after value in the unit of its measure: PPV in % (bare number = %),
// cardiac output in L/min, stroke volume in mL, VTI in cm (bare numbers), or
// any unit of that dimension written after the number.
PreloadValue parse_preload_value(std::string_view text, PreloadMeasure measure,
                                 std::string_view field);

void validate_preload_test(const PreloadTestInputs& in, const Thresholds& t);
PreloadTestResult analyse_preload_test(const PreloadTestInputs& in, const Thresholds& t);
Answer describe_preload_test(const PreloadTestInputs& in, const PreloadTestResult& r,
                             const Thresholds& t);

}  // namespace bb
