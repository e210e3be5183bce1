// Synthetic arterial and ventilator signals with known truth, built in the
// tests (no reader involved), and a SignalSource over vectors. Every number a
// test compares against comes from here: synthetic truth.
#pragma once

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>
#include <random>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/source.hpp"

namespace bb::test {

struct SynthSpec {
  double fs = 125.0;
  double duration_s = 120.0;
  double hr = 90.0;   // /min
  double rr = 18.0;   // /min
  double ppv = 0.15;  // fraction: PP(t) = PP0 (1 + ppv/2 sin(2 pi t / Tresp + phase))
  double pp0_mmHg = 40.0;
  double dbp_mmHg = 60.0;
  double first_onset_s = 0.37;  // in diastole at t = 0
  double first_breath_s = 0.6;
  double noise_abp_mmHg = 0.0;
  double noise_paw_cmH2O = 0.0;
  double drift_abp_mmHg = 0.0;     // amplitude of a 0.01 Hz baseline wander
  double flow_offset_L_s = 0.0;    // flow sensor drift (constant offset)
  std::vector<int> ectopic_beats;  // beat numbers that come early (70 % of the interval)
  // Ventilator, volume control with square flow (Bates 2009 single compartment).
  double resistance = 10.0;  // cmH2O/(L/s)
  double elastance = 25.0;   // cmH2O/L
  double peep = 8.0;         // cmH2O
  double vt_L = 0.5;
  double ti_fraction = 1.0 / 3.0;
  double effort_cmH2O = 0.0;  // negative swing before each trigger (spontaneous effort)
};

struct TrueBeat {
  double onset, pp, sbp;
};

struct Synth {
  std::vector<double> abp, paw, flow;  // mmHg, cmH2O, L/s
  std::vector<TrueBeat> beats;         // all complete and incomplete beats with onset in the record
  std::vector<double> breath_starts;   // first sample of each inspiration
  std::vector<double> p0;              // true total PEEP (P0) per breath
};

// Pulse shape: sin^2 rise over 0.12 s, then a quadratic fall to 0 at the next onset.
inline double pulse_shape(double tau, double period) {
  const double rise = 0.12;
  if (tau < rise) {
    const double s = std::sin(0.5 * std::numbers::pi * tau / rise);
    return s * s;
  }
  const double x = (tau - rise) / (period - rise);
  return (1 - x) * (1 - x);
}

inline Synth make_synth(const SynthSpec& spec) {
  Synth out;
  const auto n = static_cast<std::size_t>(std::llround(spec.duration_s * spec.fs));
  const double dt = 1.0 / spec.fs;
  const double period = 60.0 / spec.hr;
  const double t_resp = 60.0 / spec.rr;
  // Beat onsets.
  std::vector<double> onsets;
  double t = spec.first_onset_s;
  for (int k = 0; t < spec.duration_s + 2 * period; ++k) {
    onsets.push_back(t);
    const bool early = std::find(spec.ectopic_beats.begin(), spec.ectopic_beats.end(), k + 1) !=
                       spec.ectopic_beats.end();
    const bool after_early = std::find(spec.ectopic_beats.begin(), spec.ectopic_beats.end(), k) !=
                             spec.ectopic_beats.end();
    t += early ? 0.7 * period : after_early ? 1.3 * period : period;
  }
  for (double onset : onsets) {
    const double pp =
        spec.pp0_mmHg *
        (1 +
         0.5 * spec.ppv * std::sin(2 * std::numbers::pi * (onset - spec.first_breath_s) / t_resp));
    out.beats.push_back({onset, pp, spec.dbp_mmHg + pp});
  }
  std::mt19937 rng(12345);
  std::normal_distribution<double> noise(0.0, 1.0);
  out.abp.resize(n);
  std::size_t k = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const double ti = static_cast<double>(i) * dt;
    while (k + 1 < onsets.size() && onsets[k + 1] <= ti) ++k;
    double p = spec.dbp_mmHg;
    if (ti >= onsets[0]) {
      const double beat_period = onsets[k + 1] - onsets[k];
      p += out.beats[k].pp * pulse_shape(ti - onsets[k], beat_period);
    }
    p += spec.drift_abp_mmHg * std::sin(2 * std::numbers::pi * 0.01 * ti);
    p += spec.noise_abp_mmHg * noise(rng);
    out.abp[i] = p;
  }
  out.beats.erase(std::remove_if(out.beats.begin(), out.beats.end(),
                                 [&](const TrueBeat& b) { return b.onset >= spec.duration_s; }),
                  out.beats.end());
  // Ventilator: square inspiratory flow, passive exponential expiration, volume by
  // the trapezoidal rule so that Paw = R V' + E V + PEEP holds at every sample.
  out.paw.resize(n);
  out.flow.resize(n);
  const double ti_s = spec.ti_fraction * t_resp;
  const double f_insp = spec.vt_L / ti_s;
  const double tau = spec.resistance / spec.elastance;
  double v = 0, f_prev = 0;
  bool was_insp = false;
  for (std::size_t i = 0; i < n; ++i) {
    const double ti = static_cast<double>(i) * dt;
    const double phase = std::fmod(ti - spec.first_breath_s + 100 * t_resp, t_resp);
    const bool breathing = ti >= spec.first_breath_s;
    const bool insp = breathing && phase < ti_s;
    double f;
    if (insp) {
      f = f_insp;
      v += 0.5 * (f_prev + f) * dt;
    } else {
      v = (v + 0.5 * f_prev * dt) / (1 + 0.5 * dt / tau);  // implicit trapezoid of f = -v / tau
      f = -v / tau;
    }
    if (insp && !was_insp) {
      out.breath_starts.push_back(ti);
      out.p0.push_back(spec.peep + spec.elastance * (v - 0.5 * (f_prev + f) * dt));
    }
    was_insp = insp;
    f_prev = f;
    double p = spec.peep + spec.resistance * f + spec.elastance * v;
    const double to_next = t_resp - phase;
    if (breathing && spec.effort_cmH2O > 0 && to_next < 0.3) {
      p -= spec.effort_cmH2O * std::sin(std::numbers::pi * (0.3 - to_next) / 0.3);
    }
    out.paw[i] = p + spec.noise_paw_cmH2O * noise(rng);
    out.flow[i] = f + spec.flow_offset_L_s;
  }
  return out;
}

// True per-breath PPV (Michard et al., AJRCCM 2000;162:134) from the true
// pulse pressures of the beats whose onsets fall in each complete breath.
inline std::vector<double> true_breath_ppv(const Synth& s, int min_beats = 3) {
  std::vector<double> out;
  for (std::size_t j = 0; j + 1 < s.breath_starts.size(); ++j) {
    double hi = -1, lo = std::numeric_limits<double>::infinity();
    int count = 0;
    for (const TrueBeat& b : s.beats) {
      if (b.onset < s.breath_starts[j] || b.onset >= s.breath_starts[j + 1]) continue;
      hi = std::max(hi, b.pp);
      lo = std::min(lo, b.pp);
      ++count;
    }
    if (count >= min_beats) out.push_back((hi - lo) / ((hi + lo) / 2));
  }
  return out;
}

inline double median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const std::size_t m = v.size() / 2;
  return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}

// A record held in memory, served in chunks.
class VectorSource : public wave::SignalSource {
 public:
  VectorSource(std::vector<wave::ChannelInfo> channels, std::vector<std::vector<double>> data)
      : channels_(std::move(channels)), data_(std::move(data)) {}
  const std::vector<wave::ChannelInfo>& channels() const override { return channels_; }
  std::optional<double> duration() const override {
    return static_cast<double>(data_[0].size()) / channels_[0].fs;
  }
  void seek(double seconds) override { position_ = seconds; }
  bool prefers_one_thread() const override { return one_thread; }
  bool next(wave::Chunk& chunk, double max_seconds) override {
    if (fail_at_chunk >= 0 && chunks_served_++ == fail_at_chunk)
      throw InputError("record", "test", "made to fail here", "nothing");
    const double total = *duration();
    if (position_ >= total - 1e-12) return false;
    const double end = std::min(total, position_ + max_seconds);
    chunk.start_time = position_;
    chunk.duration = end - position_;
    chunk.samples.resize(data_.size());
    for (std::size_t c = 0; c < data_.size(); ++c) {
      const auto from = static_cast<std::size_t>(std::llround(position_ * channels_[c].fs));
      const auto to = static_cast<std::size_t>(std::llround(end * channels_[c].fs));
      chunk.samples[c].assign(
          data_[c].begin() + static_cast<std::ptrdiff_t>(from),
          data_[c].begin() + static_cast<std::ptrdiff_t>(std::min(to, data_[c].size())));
    }
    position_ = end;
    return true;
  }

  bool one_thread = false;  // as a reader that wants the analysis in one thread
  int fail_at_chunk = -1;   // throw an InputError when asked for this chunk

 private:
  std::vector<wave::ChannelInfo> channels_;
  std::vector<std::vector<double>> data_;
  double position_ = 0;
  int chunks_served_ = 0;
};

inline VectorSource source_of(const Synth& s, double fs, bool with_flow = true) {
  std::vector<wave::ChannelInfo> ch{{"ABP", "mmHg", fs, wave::Role::arterial_pressure},
                                    {"Paw", "cmH2O", fs, wave::Role::airway_pressure}};
  std::vector<std::vector<double>> data{s.abp, s.paw};
  if (with_flow) {
    ch.push_back({"Flow", "L/s", fs, wave::Role::flow});
    data.push_back(s.flow);
  }
  return VectorSource(ch, data);
}

}  // namespace bb::test
