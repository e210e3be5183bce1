// Breaths from airway pressure (preferred: the rise above PEEP), from flow
// (sign changes) or from a respiration channel (troughs), streamed chunk by
// chunk. Per breath: start of inspiration, Ti, Te, RR, Ppeak, PEEP, mean
// airway pressure (time average over the whole breath), VT (flow integrated
// with per-breath drift correction), negative pressure swings (effort), and,
// with pressure and flow, the equation-of-motion fit and the stress index
// (mechanics_fit.hpp). Methods: docs/waveform-analysis.md.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/waveform/mechanics_fit.hpp"

namespace bb::wave {

// Which signal marks the breaths.
enum class BreathSignal { airway_pressure, flow, respiration };
const char* to_string(BreathSignal signal);

struct Breath {
  Time start;     // start of inspiration, from the start of the record
  Time duration;  // to the next start (Ttot)
  Time ti;
  Time te;
  Frequency rate;    // 60 / Ttot
  bool gap = false;  // missing samples or longer than the longest breath: no measurements
  std::optional<Pressure> ppeak;
  std::optional<Pressure> peep;  // end-expiratory pressure
  std::optional<Pressure> mean_airway_pressure;
  std::optional<Pressure> negative_swing;  // expiratory level - lowest pressure (effort), >= 0
  std::optional<Volume> vt;
  std::optional<EquationOfMotionFit> fit;
  std::optional<StressIndexFit> stress_index;
};

struct BreathSettings {
  double fs = 125.0;
  BreathSignal signal = BreathSignal::airway_pressure;
  bool has_pressure = false;             // airway pressure given (cmH2O)
  bool has_flow = false;                 // flow given (L/s), same rate
  double smoothing_s = 0.05;             // moving average before detection
  double learning_s = 15.0;              // first levels from this stretch
  double trigger_fraction = 0.5;         // rise through this fraction of the swing starts a breath
  double rearm_fraction = 0.25;          // fall below this fraction re-arms the detector
  double start_fraction = 0.1;           // the start is the last sample at or below this fraction
  double min_breath_s = 1.0;             // RR 60/min
  double max_breath_s = 30.0;            // RR 2/min; longer: apnoea or gap
  double peep_span_s = 0.2;              // PEEP = mean over the last stretch of expiration
  double constant_flow_tolerance = 0.1;  // stress index: flow within 10 % of its median
};
BreathSettings breath_settings(const Thresholds& t, double fs, BreathSignal signal,
                               bool has_pressure, bool has_flow);

class BreathDetector {
 public:
  explicit BreathDetector(const BreathSettings& settings);
  ~BreathDetector();
  BreathDetector(BreathDetector&&) noexcept;
  BreathDetector& operator=(BreathDetector&&) noexcept;

  // Samples of the same stretch: pressure in cmH2O, flow in L/s, respiration
  // in its own unit; pass empty spans for channels not given. The marking
  // signal's span sets the count. Completed breaths are appended to `out`.
  void push(std::span<const double> pressure, std::span<const double> flow,
            std::span<const double> respiration, double start_time, std::vector<Breath>& out);
  void finish(std::vector<Breath>& out);
  std::int64_t count() const;

 private:
  struct State;
  std::unique_ptr<State> s_;
};

}  // namespace bb::wave
