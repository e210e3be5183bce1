// Arterial pulses from a pressure signal, streamed chunk by chunk.
//
// Pulse onsets by the slope-sum function (Zong W, Heldt T, Moody GB, Mark RG.
// An open-source algorithm to detect onset of arterial blood pressure pulses.
// Computers in Cardiology 2003;30:259): low-pass filter, sum of the positive
// slopes over a 128 ms window, a threshold at 60 % of an adaptive base, and a
// search back from the threshold crossing for the foot of the upstroke.
// A beat runs from one onset to the next; it is reported when the next onset
// is found. Beats are then checked for ectopy (interval against the local
// median) and artefacts (gaps, out-of-range pressure from a flush,
// clipped flat tops, damping). Methods: docs/waveform-analysis.md.
#pragma once

#include <array>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"

namespace bb::wave {

// Why a beat was kept or set aside. Order = order of the checks.
enum class BeatVerdict { accepted, gap, out_of_range, clipping, damping, ectopic };
inline constexpr int kBeatVerdictCount = 6;
const char* to_string(BeatVerdict verdict);  // "accepted", "gap", "out_of_range", ...

struct Beat {
  Time onset;  // from the start of the record
  Time systolic_time;
  Pressure systolic;             // highest pressure of the beat
  Pressure diastolic;            // pressure at the onset (Zong 2003)
  Pressure pulse_pressure;       // systolic - diastolic
  Pressure mean;                 // time average from this onset to the next
  std::optional<Time> interval;  // from the previous onset (none for the first beat)
  Time duration;                 // to the next onset
  BeatVerdict verdict = BeatVerdict::accepted;
};

// Settings of the detector; beat_settings() reads them from
// presets/thresholds/waveform.toml.
struct BeatSettings {
  double fs = 125.0;                // Hz
  double lowpass_boxcar_s = 0.040;  // two cascaded moving averages (Zong 2003: 5 samples at 125 Hz)
  double ssf_window_s = 0.128;      // Zong 2003
  double threshold_fraction = 0.6;  // Zong 2003
  double initial_factor = 3.0;      // x mean SSF over the learning period, Zong 2003
  double learning_s = 10.0;         // Zong 2003
  double refractory_s = 0.3;        // eye-closing period after a detection
  double max_interval_s = 2.0;      // longer: a pause or a gap
  double ectopy_deviation = 0.2;    // fraction of the local median interval
  int ectopy_history = 8;           // beats in the local median
  double pressure_min_mmHg = 0.0;   // below: out of range
  double pressure_max_mmHg = 300.0;          // above: out of range (flush)
  double pulse_pressure_min_mmHg = 5.0;      // below: damped
  double pulse_pressure_relative_min = 0.5;  // below this fraction of the local median PP: damped
  double flat_top_s = 0.060;                 // identical samples at the peak for this long: clipped
};
BeatSettings beat_settings(const Thresholds& t, double fs);

struct BeatCounts {
  std::array<std::int64_t, kBeatVerdictCount> by_verdict{};
  std::int64_t total() const;
  std::int64_t accepted() const { return by_verdict[0]; }
  std::int64_t rejected() const { return total() - accepted(); }
};

// Streaming detector. Memory is fixed by the settings (a few seconds of
// signal), not by the length of the record.
class BeatDetector {
 public:
  explicit BeatDetector(const BeatSettings& settings);
  ~BeatDetector();
  BeatDetector(BeatDetector&&) noexcept;
  BeatDetector& operator=(BeatDetector&&) noexcept;

  // Appends the beats completed by these samples (mmHg, NaN = missing) to
  // `out`. `start_time` is the time of samples[0] on the first call; later
  // calls continue where the previous one ended.
  void push(std::span<const double> mmHg, double start_time, std::vector<Beat>& out);
  // End of the record: nothing more completes (the last onset opens no beat).
  void finish(std::vector<Beat>& out);
  const BeatCounts& counts() const;

 private:
  struct State;
  std::unique_ptr<State> s_;
};

// Convenience for whole signals held in memory (tests, small records).
std::vector<Beat> detect_beats(std::span<const double> mmHg, const BeatSettings& settings);

}  // namespace bb::wave
