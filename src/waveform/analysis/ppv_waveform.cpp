// Per-breath PPV/SPV, stream quantiles and the signal-checkable PPV gates.
// See include/breathbeat/waveform/ppv_waveform.hpp.
#include "breathbeat/waveform/ppv_waveform.hpp"

#include <algorithm>
#include <cmath>

#include "breathbeat/haemodynamics.hpp"

namespace bb::wave {

const char* to_string(CycleSource s) {
  switch (s) {
    case CycleSource::breaths:
      return "breaths";
    case CycleSource::set_rate:
      return "set_rate";
    case CycleSource::pulse_modulation:
      return "pulse_modulation";
  }
  return "breaths";
}

std::optional<PulseModulation> find_pulse_modulation(std::span<const Beat> beats, Frequency low,
                                                     Frequency high, int min_beats) {
  // Accepted beats: pulse pressure sampled at the onset.
  double mean = 0, first = 0, last = 0;
  int n = 0;
  for (const Beat& b : beats) {
    if (b.verdict != BeatVerdict::accepted) continue;
    const double t = in_seconds(b.onset);
    if (n == 0) first = t;
    last = t;
    mean += in_mmHg(b.pulse_pressure);
    ++n;
  }
  if (n < std::max(min_beats, 3) || !(last > first)) return std::nullopt;
  mean /= n;
  double variance = 0;
  for (const Beat& b : beats) {
    if (b.verdict != BeatVerdict::accepted) continue;
    const double d = in_mmHg(b.pulse_pressure) - mean;
    variance += d * d;
  }
  variance /= (n - 1);
  if (!(variance > 0)) return std::nullopt;
  const double span = last - first;
  // The beats sample the pulse pressure at about the heart rate: a modulation
  // faster than half of it cannot be told from its alias.
  const double f_low = (in_per_min(low) / 60.0);
  const double f_high = std::min((in_per_min(high) / 60.0), 0.5 * (n - 1) / span);
  if (!(f_high > f_low)) return std::nullopt;
  const double step = 1.0 / (8.0 * span);  // 8 points per independent frequency
  PulseModulation best;
  best.beats = n;
  best.power = -1;
  for (double f = f_low; f <= f_high + 1e-12; f += step) {
    const double w = 2.0 * M_PI * f;
    double s2 = 0, c2 = 0;
    for (const Beat& b : beats) {
      if (b.verdict != BeatVerdict::accepted) continue;
      const double t = in_seconds(b.onset) - first;
      s2 += std::sin(2 * w * t);
      c2 += std::cos(2 * w * t);
    }
    const double tau = std::atan2(s2, c2) / (2 * w);
    double yc = 0, ys = 0, cc = 0, ss = 0;
    for (const Beat& b : beats) {
      if (b.verdict != BeatVerdict::accepted) continue;
      const double t = in_seconds(b.onset) - first - tau;
      const double y = in_mmHg(b.pulse_pressure) - mean;
      const double c = std::cos(w * t), si = std::sin(w * t);
      yc += y * c;
      ys += y * si;
      cc += c * c;
      ss += si * si;
    }
    double p = 0;
    if (cc > 0) p += yc * yc / cc;
    if (ss > 0) p += ys * ys / ss;
    p /= 2 * variance;
    if (p > best.power) {
      best.power = p;
      best.rate = hertz(f);
    }
  }
  if (best.power < 0) return std::nullopt;
  const double independent = std::max(1.0, (f_high - f_low) * span);
  best.false_alarm = 1.0 - std::pow(1.0 - std::exp(-best.power), independent);
  return best;
}

void cycle_ppv(std::span<const Beat> beats, Time start, Time end, Time period, int min_beats,
               std::vector<BreathPpv>& out) {
  const double t0 = in_seconds(start), t1 = in_seconds(end), p = in_seconds(period);
  if (!(p > 0)) return;
  std::size_t i = 0;
  for (double cs = t0; cs + p <= t1 + 1e-9; cs += p) {
    const double ce = cs + p;
    while (i < beats.size() && in_seconds(beats[i].onset) < cs) ++i;
    std::size_t j = i;
    while (j < beats.size() && in_seconds(beats[j].onset) < ce) ++j;
    out.push_back(breath_ppv(beats.subspan(i, j - i), min_beats));
    i = j;
  }
}

BreathPpv breath_ppv(std::span<const Beat> beats, int min_beats) {
  BreathPpv r;
  r.beats = static_cast<int>(beats.size());
  Pressure pp_max, pp_min, sbp_max, sbp_min;
  for (const Beat& b : beats) {
    if (b.verdict != BeatVerdict::accepted) continue;
    if (r.beats_accepted == 0) {
      pp_max = pp_min = b.pulse_pressure;
      sbp_max = sbp_min = b.systolic;
    }
    pp_max = std::max(pp_max, b.pulse_pressure);
    pp_min = std::min(pp_min, b.pulse_pressure);
    sbp_max = std::max(sbp_max, b.systolic);
    sbp_min = std::min(sbp_min, b.systolic);
    ++r.beats_accepted;
  }
  if (r.beats_accepted < r.beats || r.beats_accepted < min_beats) return r;
  r.ppv = pulse_pressure_variation(pp_max, pp_min);
  r.spv = systolic_pressure_variation(sbp_max, sbp_min);
  return r;
}

StreamQuantiles::StreamQuantiles(double low, double high, int bins)
    : low_(low),
      high_(high),
      width_((high - low) / bins),
      bins_(static_cast<std::size_t>(bins), 0) {}

void StreamQuantiles::add(double v) {
  if (std::isnan(v)) return;
  auto i = static_cast<std::int64_t>(std::floor((v - low_) / width_));
  i = std::clamp<std::int64_t>(i, 0, static_cast<std::int64_t>(bins_.size()) - 1);
  ++bins_[static_cast<std::size_t>(i)];
  ++count_;
}

std::optional<double> StreamQuantiles::quantile(double q) const {
  if (count_ == 0) return std::nullopt;
  // Rank as in linear interpolation between order statistics, then linear
  // within the bin holding that rank.
  const double rank = q * static_cast<double>(count_ - 1) + 0.5;
  double seen = 0;
  for (std::size_t i = 0; i < bins_.size(); ++i) {
    const auto in_bin = static_cast<double>(bins_[i]);
    if (in_bin == 0) continue;
    if (seen + in_bin >= rank) {
      const double within = (rank - seen) / in_bin;
      return low_ + (static_cast<double>(i) + within) * width_;
    }
    seen += in_bin;
  }
  return high_;
}

std::vector<Gate> signal_ppv_gates(const SignalConditions& c, const StatedConditions& stated,
                                   const Thresholds& t) {
  PpvConditions pc;
  const double ectopic_max = in_fraction(t.get<Ratio>("waveform.ectopic_share_max"));
  const double cv_max = in_fraction(t.get<Ratio>("waveform.breath_timing_cv_max"));
  const double swing_max = in_fraction(t.get<Ratio>("waveform.swing_share_max"));
  GateSignals rhythm_seen, passive_seen;
  rhythm_seen.examined = passive_seen.examined = true;
  if (c.beats > 0) {
    const double share = static_cast<double>(c.beats_ectopic) / static_cast<double>(c.beats);
    pc.regular_rhythm = share <= ectopic_max;
    rhythm_seen.ectopic_beats = SignalCount{c.beats_ectopic, c.beats};
  }
  if (c.breaths > 0 && c.breath_timing_cv) {
    const bool irregular = *c.breath_timing_cv > cv_max;
    const bool swings = c.pressure_known && static_cast<double>(c.breaths_with_swing) >
                                                swing_max * static_cast<double>(c.breaths);
    passive_seen.breath_timing_cv = *c.breath_timing_cv;
    if (c.pressure_known)
      passive_seen.breaths_with_swing = SignalCount{c.breaths_with_swing, c.breaths};
    if (irregular || swings)
      pc.passive = false;
    else if (c.pressure_known)
      pc.passive = true;
  }
  // The signals can show effort or an arrhythmia, never prove their absence;
  // a stated condition is known, and a failure the signals show wins over it.
  auto merge = [](std::optional<bool>& from_signals, std::optional<bool> said, bool& only_signals,
                  GateBasis& basis) {
    only_signals = true;
    basis = from_signals ? GateBasis::seen_in_signals : GateBasis::not_given;
    if (!said) return;
    if (from_signals == false && *said) {
      basis = GateBasis::stated_contradicted;
      return;
    }
    only_signals = false;
    basis = GateBasis::stated;
    from_signals = *said;
  };
  GateBasis passive_basis = GateBasis::not_given, rhythm_basis = GateBasis::not_given;
  merge(pc.passive, stated.passive, pc.passive_from_signals, passive_basis);
  merge(pc.regular_rhythm, stated.regular_rhythm, pc.rhythm_from_signals, rhythm_basis);
  pc.closed_chest = stated.closed_chest;
  pc.intra_abdominal_hypertension = stated.intra_abdominal_hypertension;
  pc.rv_failure = stated.rv_failure;
  pc.vt_per_kg = c.vt_per_kg;
  pc.hr = c.hr;
  pc.rr = c.rr;
  pc.crs = c.crs;
  std::vector<Gate> gates = ppv_gates(pc, t);
  for (Gate& g : gates) {
    if (g.key == "regular_rhythm") {
      g.signals = rhythm_seen;
      g.basis = rhythm_basis;
    }
    if (g.key == "passive_ventilation") {
      g.signals = passive_seen;
      g.basis = passive_basis;
    }
    if (g.key == "vt_per_kg_pbw" && c.vt_per_kg) g.signals.source = GateValueFrom::vt_from_flow;
    if (g.key == "vt_per_kg_pbw" && !c.vt_per_kg && stated.pbw)
      g.signals.source = GateValueFrom::no_vt_in_record;
    if (g.key == "hr_rr_ratio" && c.rr && c.cycles == CycleSource::set_rate)
      g.signals.source = GateValueFrom::rr_as_set;
    if (g.key == "hr_rr_ratio" && c.rr && c.cycles == CycleSource::pulse_modulation) {
      // A rate found in the pulse pressure is an estimate: it can fail the
      // condition, not prove it.
      g.signals.source = GateValueFrom::rr_from_pulse_modulation;
      if (g.state == GateState::met) g.state = GateState::not_contradicted;
    }
  }
  return gates;
}

}  // namespace bb::wave
