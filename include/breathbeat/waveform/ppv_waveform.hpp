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

#include "breathbeat/validity.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
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

// What the signals say about the PPV gates over a stretch of record.
struct SignalConditions {
  std::int64_t beats = 0;  // all beats
  std::int64_t beats_ectopic = 0;
  std::int64_t breaths = 0;
  std::int64_t breaths_with_swing = 0;     // negative pressure swing beyond the threshold
  std::optional<double> breath_timing_cv;  // SD/mean of breath durations
  std::optional<Frequency> hr;
  std::optional<Frequency> rr;
  std::optional<Compliance> crs;  // from the equation-of-motion fit
  bool pressure_known = false;    // airway pressure was available (swings checkable)
};

// Gates (haemodynamics ppv_gates) from what the signals show: regular rhythm
// from the share of ectopic beats, passive ventilation from breath timing and
// negative swings, HR/RR, compliance. The rest stay unknown.
std::vector<Gate> signal_ppv_gates(const SignalConditions& c, const Thresholds& t);

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
  std::optional<Volume> vt;  // median over breaths
  std::vector<Gate> gates;
  std::optional<Reading> reading;
};

}  // namespace bb::wave
