// Pulse pressure variation from the signals: beats assigned to breaths,
// per-breath PPV (Michard F et al., Am J Respir Crit Care Med 2000;162:134)
// and SPV (Perel A et al., Anesthesiology 1987;67:498), windows with median
// and spread, HR/RR, and the validity gates the signals can check, judged by
// the haemodynamics module (ppv_gates, read_ppv). Memory is bounded: a window
// keeps its own per-breath values only; record-wide medians come from
// fixed-size histograms. Methods: docs/waveform-analysis.md.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "breathbeat/body.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"
#include "breathbeat/waveform/beats.hpp"
#include "breathbeat/waveform/breaths.hpp"

namespace bb::wave {

// PPV and SPV of one breath from the beats whose onsets fall in it.
struct BreathPpv {
  std::optional<Ratio> ppv;
  std::optional<Pressure> spv;
  int beats = 0;
  int beats_accepted = 0;
};

// (PPmax - PPmin)/((PPmax + PPmin)/2) and SBPmax - SBPmin over the accepted
// beats of one breath; none when fewer than `min_beats` or any beat of the
// breath was rejected (Michard 2000; Perel 1987).
BreathPpv breath_ppv(std::span<const Beat> beats, int min_beats);

// Quantiles of a stream of values in fixed memory: a histogram over
// [low, high) with `bins` bins; values outside are clamped to the ends.
class StreamQuantiles {
 public:
  StreamQuantiles(double low, double high, int bins);
  void add(double v);
  std::int64_t count() const { return count_; }
  // q in [0, 1]; linear within the bin. None when empty.
  std::optional<double> quantile(double q) const;

 private:
  double low_, high_, width_;
  std::vector<std::int64_t> bins_;
  std::int64_t count_ = 0;
};

// Median and p10/p90 of PPV over a set of breaths.
struct PpvSpread {
  Ratio median;
  Ratio p10;
  Ratio p90;
  int breaths = 0;
};

// Where the respiratory cycles of the PPV come from: breaths found in an airway
// pressure, flow or respiration channel; cycles of 60/RR s from a respiratory rate
// the user set (arterial pressure alone); or cycles of the respiratory modulation
// found in the pulse pressure itself (arterial pressure alone, no rate set).
enum class CycleSource { breaths, set_rate, pulse_modulation };
const char* to_string(CycleSource s);  // "breaths", "set_rate", "pulse_modulation"

// What the user states that the signals cannot show (registry fields passive,
// regular_rhythm, closed_chest, iah, rv_failure, sex, height). A stated
// condition is known; a failure the signals show still wins over a stated
// "passive" or "regular" (as for a trial step's waveform).
struct StatedConditions {
  std::optional<bool> passive;
  std::optional<bool> regular_rhythm;
  std::optional<bool> closed_chest;
  std::optional<bool> intra_abdominal_hypertension;
  std::optional<bool> rv_failure;
  std::optional<Mass> pbw;  // predicted body weight, from sex and height
};

// The respiratory modulation of pulse pressure over a stretch of beats.
struct PulseModulation {
  Frequency rate;          // the periodogram's highest peak in the band
  double power = 0;        // normalized power at that peak (Scargle 1982)
  double false_alarm = 1;  // probability of a peak this high from noise alone
  int beats = 0;           // accepted beats used
};

// The highest peak, within [low, high], of the Lomb-Scargle periodogram of the
// accepted beats' pulse pressures sampled at their onsets (Lomb NR, Astrophys
// Space Sci 1976;39:447; Scargle JD, Astrophys J 1982;263:835), normalized by the
// sample variance (Horne JH, Baliunas SL, Astrophys J 1986;302:757; from memory), with
// false-alarm probability 1 - (1 - exp(-P))^M (Scargle 1982), M the independent
// frequencies of the band, (high - low) x the time spanned (Press WH et al., Numerical
// Recipes, 2nd ed. 1992, section 13.8; from memory). The band stops at half the beat
// rate (the beats sample the pulse pressure). None with fewer than `min_beats`
// accepted beats or no variation.
std::optional<PulseModulation> find_pulse_modulation(std::span<const Beat> beats, Frequency low,
                                                     Frequency high, int min_beats);

// PPV and SPV per whole respiratory cycle of length `period` laid from `start`
// up to `end` (a partial last cycle is left out): the beats whose onsets fall in
// each cycle, as breath_ppv (Michard 2000 over one respiratory cycle). Appends to
// `out`; `beats` sorted by onset.
void cycle_ppv(std::span<const Beat> beats, Time start, Time end, Time period, int min_beats,
               std::vector<BreathPpv>& out);

// What the signals say about the PPV gates over a stretch of record.
struct SignalConditions {
  std::int64_t beats = 0;  // all beats
  std::int64_t beats_ectopic = 0;
  std::int64_t breaths = 0;
  std::int64_t breaths_with_swing = 0;     // negative pressure swing beyond the threshold
  std::optional<double> breath_timing_cv;  // SD/mean of breath durations
  std::optional<Frequency> hr;
  std::optional<Frequency> rr;
  std::optional<Compliance> crs;              // from the equation-of-motion fit
  bool pressure_known = false;                // airway pressure was available (swings checkable)
  std::optional<VolumePerMass> vt_per_kg;     // VT from flow over the stated PBW
  CycleSource cycles = CycleSource::breaths;  // rr: measured, set, or found in the pulse pressure
};

// Gates (haemodynamics ppv_gates) from what the signals show: regular rhythm
// from the share of ectopic beats, passive ventilation from breath timing and
// negative swings, HR/RR, compliance, VT per kg PBW; and from what the user
// stated (`stated`): a stated condition is met or failed, a signal failure wins
// over a stated "passive" or "regular". The rest stay unknown.
std::vector<Gate> signal_ppv_gates(const SignalConditions& c, const StatedConditions& stated,
                                   const Thresholds& t);

// One window of the trend.
struct WindowResult {
  Time start;
  Time end;
  std::int64_t beats = 0;
  std::int64_t beats_rejected = 0;
  std::int64_t breaths = 0;
  std::optional<Frequency> heart_rate;
  std::optional<Frequency> respiratory_rate;
  std::optional<Ratio> hr_rr_ratio;
  std::optional<PpvSpread> ppv;
  std::optional<Pressure> spv;  // median over breaths
  std::optional<Pressure> mean_airway_pressure;
  std::optional<Volume> vt;                // median over breaths
  std::optional<VolumePerMass> vt_per_kg;  // vt over the stated PBW
  CycleSource cycles = CycleSource::breaths;
  std::int64_t cycles_analysed = 0;  // respiratory cycles without breaths (set rate, modulation)
  std::optional<PulseModulation> modulation;  // CycleSource::pulse_modulation: what was found
  std::vector<Gate> gates;
  std::optional<Reading> reading;
};

}  // namespace bb::wave
