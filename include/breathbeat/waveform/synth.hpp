// Synthetic records whose true values are known: arterial pressure, airway
// pressure, flow (and optionally volume) from a volume-controlled ventilator
// with square-wave inspiratory flow and a single-compartment lung.
//
// Ventilation: the equation of motion of the respiratory system,
//   Paw = R * V' + E * V + PEEP,
// holds exactly at every sample (V is the volume above the relaxed volume at
// PEEP). Inspiration delivers a constant flow VT / Ti; expiration is passive
// (Paw = PEEP, V decays with time constant R / E). So R and E are recoverable.
//
// Arterial pressure: beats at the heart rate, each a pulse over a diastolic
// level. Pulse pressure is modulated by respiration and scaled breath by
// breath so that, among the normal beats whose onset falls in a breath, the
// largest pulse pressure is PP0 * (1 + PPV/2) and the smallest PP0 * (1 - PPV/2):
//   PPV = (PPmax - PPmin) / ((PPmax + PPmin) / 2)
// (Michard F et al. Am J Respir Crit Care Med 2000;162:134-138) equals the
// requested value exactly, by construction, for every breath with at least two
// normal beats. The extremes fall mid-breath, and every beat's pulse pressure
// lies within [PP0 (1 - PPV/2), PP0 (1 + PPV/2)], so assigning boundary beats
// to the neighbouring breath does not change any breath's PPV. Each pulse has
// a flat top at least 1.2 samples wide and a flat diastolic end, so sampling
// catches the exact systolic and diastolic values.
//
// Generated chunk by chunk: a record of any length takes bounded memory.
#pragma once

#include <cstdint>
#include <memory>
#include <vector>

#include "breathbeat/units.hpp"
#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

struct SynthParams {
  Time duration = minutes(10);
  double fs = 125.0;  // samples per second, every channel
  Frequency heart_rate = per_min(90);
  Frequency respiratory_rate = per_min(18);
  Ratio ppv = percent(15);
  Pressure diastolic = mmHg(60);
  Pressure pulse_pressure = mmHg(40);  // PP0: the unmodulated pulse pressure
  // White Gaussian noise, SD as a fraction of each signal's swing (pulse
  // pressure, airway driving pressure, peak flow, tidal volume).
  Ratio noise = fraction(0.0);
  // Slow baseline wander of arterial pressure: amplitude (two slow sines).
  Pressure drift = mmHg(0.0);
  // A constant offset added to the flow channel only (sensor drift); the
  // airway pressure still follows the true flow.
  Flow flow_offset = L_per_min(0.0);
  // Fraction of beats that are premature (ectopic): at 0.65 of the interval,
  // pulse pressure x 0.5, followed by a compensatory pause.
  Ratio ectopy = fraction(0.0);
  // Gaps: stretches where arterial pressure is missing (NaN), e.g. a flush.
  int gaps = 0;
  Time gap_length = seconds(4);
  Pressure peep = cmH2O(5);
  Volume tidal_volume = mL(450);
  Resistance resistance = cmH2O_per_L_per_s(10);
  Elastance elastance = cmH2O_per_L(25);
  Ratio inspiratory_fraction = fraction(1.0 / 3.0);  // Ti / Ttot
  bool volume_channel = false;
  bool keep_truth = false;  // record every beat and breath (tests; grows with length)
  std::uint64_t seed = 1;
};

// Checks ranges (positive rates, ppv below 100 %, ...); throws InputError.
void validate(const SynthParams& params);

struct SynthBeat {
  double onset = 0.0;  // seconds from the start
  double peak = 0.0;   // start of the flat systolic top
  Pressure systolic = mmHg(0);
  Pressure diastolic = mmHg(0);
  Pressure pulse_pressure = mmHg(0);
  bool ectopic = false;
  bool in_gap = false;  // some of its samples are NaN
  long breath = -1;     // index of the breath its onset falls in
};

struct SynthBreath {
  double start = 0.0;  // start of inspiration, seconds
  Time ti = seconds(0);
  Time te = seconds(0);
  Volume tidal_volume = mL(0);
  Pressure peak_pressure = cmH2O(0);         // Paw at the end of the inspiratory flow
  Pressure total_peep = cmH2O(0);            // PEEP + E x volume left from the last breath
  Pressure mean_airway_pressure = cmH2O(0);  // time average over the breath
  int normal_beats = 0;
  bool ppv_defined = false;  // at least two normal beats, none in a gap
  Ratio ppv = fraction(0);   // true per-breath PPV when defined
};

struct SynthTruth {
  Ratio ppv = fraction(0);
  Frequency heart_rate = per_min(0);
  Frequency respiratory_rate = per_min(0);
  Resistance resistance = cmH2O_per_L_per_s(0);
  Elastance elastance = cmH2O_per_L(0);
  Pressure peep = cmH2O(0);
  Volume tidal_volume = mL(0);
  std::vector<std::pair<double, double>> gaps;  // [start, end) seconds
  std::vector<SynthBeat> beats;                 // with keep_truth
  std::vector<SynthBreath> breaths;             // with keep_truth
};

// A synthetic record as a signal source. Channels: ABP (mmHg), Paw (cmH2O),
// Flow (L/min), and Volume (mL) when asked.
class SyntheticRecord final : public SignalSource {
 public:
  explicit SyntheticRecord(const SynthParams& params);
  ~SyntheticRecord() override;
  SyntheticRecord(const SyntheticRecord&) = delete;
  SyntheticRecord& operator=(const SyntheticRecord&) = delete;

  const std::vector<ChannelInfo>& channels() const override;
  std::optional<double> duration() const override;
  void seek(double seconds) override;
  bool next(Chunk& chunk, double max_seconds) override;

  // The known values; beats and breaths (with keep_truth) up to what has been
  // generated, each complete once the chunk covering its end was produced.
  const SynthTruth& truth() const;

 private:
  struct State;
  std::unique_ptr<State> state_;
};

}  // namespace bb::wave
