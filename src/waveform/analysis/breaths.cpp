// Breath detection and per-breath measurements. See
// include/breathbeat/waveform/breaths.hpp and docs/waveform-analysis.md.
#include "breathbeat/waveform/breaths.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "stats.hpp"

namespace bb::wave {

const char* to_string(BreathSignal signal) {
  switch (signal) {
    case BreathSignal::airway_pressure:
      return "airway_pressure";
    case BreathSignal::flow:
      return "flow";
    case BreathSignal::respiration:
      return "respiration";
  }
  return "unknown";
}

BreathSettings breath_settings(const Thresholds& t, double fs, BreathSignal signal,
                               bool has_pressure, bool has_flow) {
  BreathSettings s;
  s.fs = fs;
  s.signal = signal;
  s.has_pressure = has_pressure;
  s.has_flow = has_flow;
  s.smoothing_s = in_seconds(t.get<Time>("waveform.breath_smoothing"));
  s.learning_s = in_seconds(t.get<Time>("waveform.breath_learning"));
  s.trigger_fraction = in_fraction(t.get<Ratio>("waveform.breath_trigger_fraction"));
  s.rearm_fraction = in_fraction(t.get<Ratio>("waveform.breath_rearm_fraction"));
  s.start_fraction = in_fraction(t.get<Ratio>("waveform.breath_start_fraction"));
  s.min_breath_s = in_seconds(t.get<Time>("waveform.breath_min_duration"));
  s.max_breath_s = in_seconds(t.get<Time>("waveform.breath_max_duration"));
  s.peep_span_s = in_seconds(t.get<Time>("waveform.peep_span"));
  s.constant_flow_tolerance = in_fraction(t.get<Ratio>("waveform.constant_flow_tolerance"));
  return s;
}

namespace {

int breath_samples_for(double seconds, double fs) {
  return std::max(1, static_cast<int>(std::lround(seconds * fs)));
}

std::size_t breath_ring_size_for(int samples) {
  std::size_t size = 1;
  while (size < static_cast<std::size_t>(samples)) size <<= 1;
  return size;
}

// Detection levels for the marking signal, from its low and high envelope.
struct Levels {
  double trigger = 0, rearm = 0, start = 0;
};

}  // namespace

struct BreathDetector::State {
  BreathSettings cfg;
  int S, D, min_breath, max_breath, peep_span, learn_n;
  double inv_S;  // 1 / S
  std::size_t mask;
  std::vector<double> ring_paw, ring_flow, ring_drive, ring_smooth;

  bool started = false;
  double t0 = 0;
  std::int64_t n = 0;
  std::vector<double> box;
  int box_i = 0;
  double box_sum = 0;
  double last_valid = 0;
  bool have_valid = false;

  bool learning = true;
  std::vector<double> learn_paw, learn_flow, learn_resp;
  double lo = 0, hi = 0;
  bool levels_known = false;

  bool armed = false;
  std::int64_t prev_start = -1;
  std::int64_t count = 0;

  // Scratch for one breath (bounded by the longest breath).
  std::vector<double> paw, flow, volume, centred_flow, si_t, si_p, scratch;
  // Latest sample index where any channel was missing (NaN), -1 when none.
  std::int64_t last_missing = -1;
  Levels current;  // detection levels for the present lo and hi

  explicit State(const BreathSettings& s)
      : cfg(s),
        S(breath_samples_for(s.smoothing_s, s.fs) | 1),
        D((S - 1) / 2),
        min_breath(breath_samples_for(s.min_breath_s, s.fs)),
        max_breath(breath_samples_for(s.max_breath_s, s.fs)),
        peep_span(breath_samples_for(s.peep_span_s, s.fs)),
        learn_n(breath_samples_for(s.learning_s, s.fs)),
        inv_S(1.0 / S),
        box(S, 0.0) {
    const std::size_t size =
        breath_ring_size_for(max_breath + breath_samples_for(2.0, s.fs) + S + 16);
    mask = size - 1;
    if (cfg.has_pressure) ring_paw.assign(size, 0.0);
    if (cfg.has_flow) ring_flow.assign(size, 0.0);
    ring_drive.assign(size, 0.0);
    ring_smooth.assign(size, 0.0);
  }

  double time_of(std::int64_t i) const { return t0 + static_cast<double>(i) / cfg.fs; }
  bool flow_marks() const { return cfg.signal == BreathSignal::flow; }

  Levels levels() const {
    Levels l;
    const double swing = hi - lo;
    if (flow_marks()) {  // hi: inspiratory peak (> 0), lo: expiratory peak (< 0)
      l.trigger = cfg.trigger_fraction * hi;
      l.rearm = 0.0;  // expiration (or no flow) re-arms
      l.start = 0.0;
      return l;
    }
    l.trigger = lo + cfg.trigger_fraction * swing;
    l.rearm = lo + cfg.rearm_fraction * swing;
    l.start = lo + cfg.start_fraction * swing;
    return l;
  }

  // ---- learning: first levels from robust extremes of the first stretch ----
  void end_learning(std::vector<Breath>& out) {
    const std::vector<double>& drive = marking(learn_paw, learn_flow, learn_resp);
    std::vector<double> valid;
    valid.reserve(drive.size());
    for (double x : drive) {
      if (!std::isnan(x)) valid.push_back(x);
    }
    if (valid.size() > 10) {
      std::vector<double> copy = valid;
      lo = quantile_of(copy, 0.05);
      hi = quantile_of(valid, 0.95);
      levels_known = hi > lo && (!flow_marks() || (hi > 0 && lo < 0));
      current = levels();
    }
    learning = false;
    std::vector<double> paw_in, flow_in, resp_in;
    paw_in.swap(learn_paw);
    flow_in.swap(learn_flow);
    resp_in.swap(learn_resp);
    const std::size_t count_in = marking(paw_in, flow_in, resp_in).size();
    for (std::size_t i = 0; i < count_in; ++i) {
      process(paw_in.empty() ? 0.0 : paw_in[i], flow_in.empty() ? 0.0 : flow_in[i],
              resp_in.empty() ? 0.0 : resp_in[i], out);
    }
    if (!levels_known) learning = true;  // flat or missing: learn again
  }

  const std::vector<double>& marking(const std::vector<double>& p, const std::vector<double>& f,
                                     const std::vector<double>& r) const {
    switch (cfg.signal) {
      case BreathSignal::airway_pressure:
        return p;
      case BreathSignal::flow:
        return f;
      case BreathSignal::respiration:
        return r;
    }
    return p;
  }

  // ---- one sample of each channel ----
  void process(double p, double f, double r, std::vector<Breath>& out) {
    const std::size_t k = n & mask;
    if (cfg.has_pressure) ring_paw[k] = p;
    if (cfg.has_flow) ring_flow[k] = f;
    double x = cfg.signal == BreathSignal::airway_pressure ? p : flow_marks() ? f : r;
    ring_drive[k] = x;
    if (std::isnan(x) || (cfg.has_pressure && std::isnan(p)) || (cfg.has_flow && std::isnan(f)))
      last_missing = n;
    if (std::isnan(x)) {
      x = have_valid ? last_valid : 0.0;
    } else if (!have_valid) {
      have_valid = true;
      std::fill(box.begin(), box.end(), x);
      box_sum = S * x;
    }
    if (!std::isnan(ring_drive[k])) last_valid = x;
    box_sum += x - box[box_i];
    box[box_i] = x;
    if (++box_i == S) box_i = 0;
    const std::int64_t m = n - D;
    ++n;
    if (m < 0 || !have_valid) return;
    const double s = box_sum * inv_S;
    ring_smooth[m & mask] = s;
    if (levels_known) detect(m, s, out);
  }

  void detect(std::int64_t m, double s, std::vector<Breath>& out) {
    const Levels& l = current;
    if (s <= l.rearm) armed = true;
    if (!armed || s < l.trigger) return;
    if (prev_start >= 0 && m - prev_start < min_breath) return;
    armed = false;
    register_start(find_start(m, l.start), out);
  }

  // The last sample at or below the start level before the trigger.
  std::int64_t find_start(std::int64_t m, double start_level) const {
    const std::int64_t oldest = std::max<std::int64_t>(0, n - static_cast<std::int64_t>(mask) + S);
    const std::int64_t lo_index = std::max<std::int64_t>({prev_start + 1, m - max_breath, oldest});
    for (std::int64_t i = m; i >= lo_index; --i) {
      if (ring_smooth[i & mask] <= start_level) return std::min(i + 1, m);
    }
    return m;
  }

  void register_start(std::int64_t start, std::vector<Breath>& out) {
    if (prev_start >= 0) {
      out.push_back(complete(prev_start, start));
      ++count;
    }
    prev_start = start;
  }

  Breath complete(std::int64_t p, std::int64_t o) {
    Breath b;
    const std::int64_t len = o - p;
    b.start = seconds(time_of(p));
    b.duration = seconds(static_cast<double>(len) / cfg.fs);
    b.rate = hertz(cfg.fs / static_cast<double>(len));
    b.ti = b.duration;
    b.te = seconds(0.0);
    const std::int64_t oldest = n - static_cast<std::int64_t>(mask) + 2;
    b.gap = len > max_breath || p < oldest || has_gap(p, o);
    update_levels(p, o);
    if (b.gap) return b;
    const std::int64_t insp_end = inspiration_end(p, o);
    b.ti = seconds(static_cast<double>(insp_end - p) / cfg.fs);
    b.te = b.duration - b.ti;
    if (cfg.has_pressure) measure_pressure(p, o, insp_end, b);
    if (cfg.has_flow) measure_flow(p, o, insp_end, b);
    return b;
  }

  bool has_gap(std::int64_t p, std::int64_t o) const {
    if (last_missing < p) return false;  // nothing missing since the breath began
    for (std::int64_t i = p; i < o; ++i) {
      const std::size_t k = i & mask;
      if (std::isnan(ring_drive[k])) return true;
      if (cfg.has_pressure && std::isnan(ring_paw[k])) return true;
      if (cfg.has_flow && std::isnan(ring_flow[k])) return true;
    }
    return false;
  }

  // Envelope follows the breaths: halfway to this breath's extremes.
  void update_levels(std::int64_t p, std::int64_t o) {
    double b_lo = std::numeric_limits<double>::infinity(), b_hi = -b_lo;
    const std::int64_t from = std::max<std::int64_t>(p, o - max_breath);
    for (std::int64_t i = from; i < o; ++i) {
      const double s = ring_smooth[i & mask];
      b_lo = std::min(b_lo, s);
      b_hi = std::max(b_hi, s);
    }
    if (!(b_hi > b_lo)) return;
    if (flow_marks() && !(b_hi > 0 && b_lo < 0)) return;
    hi = 0.5 * (hi + b_hi);
    lo = 0.5 * (lo + b_lo);
    current = levels();
  }

  // End of inspiration: flow turns negative after its peak; without flow, the
  // pressure falls through half its swing after the peak (airway pressure) or
  // the signal peaks (respiration).
  std::int64_t inspiration_end(std::int64_t p, std::int64_t o) const {
    if (cfg.has_flow) {
      const std::int64_t peak = argmax(ring_flow, p, o);
      for (std::int64_t i = peak; i < o; ++i) {
        if (ring_flow[i & mask] <= 0.0) return i;
      }
      return o;
    }
    const std::int64_t peak = argmax(ring_smooth, p, o);
    if (cfg.signal != BreathSignal::airway_pressure) return peak;
    const double peak_value = ring_smooth[peak & mask];
    const double base = ring_smooth[p & mask];
    const double half = base + 0.5 * (peak_value - base);
    for (std::int64_t i = peak; i < o; ++i) {
      if (ring_smooth[i & mask] < half) return i;
    }
    return o;
  }

  std::int64_t argmax(const std::vector<double>& ring, std::int64_t p, std::int64_t o) const {
    std::int64_t best = p;
    for (std::int64_t i = p; i < o; ++i) {
      if (ring[i & mask] > ring[best & mask]) best = i;
    }
    return best;
  }

  void measure_pressure(std::int64_t p, std::int64_t o, std::int64_t insp_end, Breath& b) {
    paw.clear();
    for (std::int64_t i = p; i < o; ++i) paw.push_back(ring_paw[i & mask]);
    double sum = 0, peak = -std::numeric_limits<double>::infinity();
    for (double v : paw) {
      sum += v;
      peak = std::max(peak, v);
    }
    const std::size_t span = std::min<std::size_t>(paw.size(), static_cast<std::size_t>(peep_span));
    scratch.assign(paw.end() - static_cast<std::ptrdiff_t>(span), paw.end());
    const double peep = median_of(scratch);
    // Effort: how far pressure dips below the expiratory level (median of
    // expiration), which a short dip hardly moves.
    const std::int64_t exp_from = std::min(o - 1, std::max(p, insp_end));
    scratch.clear();
    double lowest = std::numeric_limits<double>::infinity();
    for (std::int64_t i = exp_from; i < o; ++i) {
      const double v =
          cfg.signal == BreathSignal::airway_pressure ? ring_smooth[i & mask] : ring_paw[i & mask];
      scratch.push_back(v);
      lowest = std::min(lowest, v);
    }
    const double expiratory_level = median_of(scratch);
    b.ppeak = cmH2O(peak);
    b.peep = cmH2O(peep);
    b.mean_airway_pressure = cmH2O(sum / static_cast<double>(paw.size()));
    b.negative_swing = cmH2O(std::max(0.0, expiratory_level - lowest));
  }

  void measure_flow(std::int64_t p, std::int64_t o, std::int64_t insp_end, Breath& b) {
    flow.clear();
    for (std::int64_t i = p; i < o; ++i) flow.push_back(ring_flow[i & mask]);
    volume.assign(flow.size(), 0.0);
    integrate_volume(flow, cfg.fs, true, volume);
    const auto end_index =
        static_cast<std::size_t>(std::min<std::int64_t>(insp_end - p, o - p - 1));
    b.vt = litre(*std::max_element(volume.begin(),
                                   volume.begin() + static_cast<std::ptrdiff_t>(end_index) + 1));
    if (!cfg.has_pressure) return;
    // Drift-corrected flow, consistent with the volume, for the fit.
    centred_flow.assign(flow.begin(), flow.end());
    b.fit = fit_equation_of_motion(paw, flow_minus_mean(centred_flow), volume);
    b.stress_index = stress_index(p, insp_end);
  }

  // Flow with the same constant offset removed as in integrate_volume.
  std::vector<double>& flow_minus_mean(std::vector<double>& f) const {
    if (f.size() < 2) return f;
    const double dt = 1.0 / cfg.fs;
    double area = 0;
    for (std::size_t i = 1; i < f.size(); ++i) area += 0.5 * (f[i - 1] + f[i]) * dt;
    const double offset = area / (static_cast<double>(f.size() - 1) * dt);
    for (double& v : f) v -= offset;
    return f;
  }

  // Over the longest run of inspiration within tolerance of the median
  // inspiratory flow, at least half of Ti (Ranieri 2000: constant-flow part).
  std::optional<StressIndexFit> stress_index(std::int64_t p, std::int64_t insp_end) {
    const std::int64_t ti = insp_end - p;
    if (ti < 8) return std::nullopt;
    scratch.assign(flow.begin(), flow.begin() + static_cast<std::ptrdiff_t>(ti));
    const double f_med = median_of(scratch);
    if (!(f_med > 0)) return std::nullopt;
    std::int64_t best_from = 0, best_len = 0, run_from = 0, run_len = 0;
    for (std::int64_t i = 0; i < ti; ++i) {
      if (std::abs(flow[i] - f_med) <= cfg.constant_flow_tolerance * f_med) {
        if (run_len == 0) run_from = i;
        if (++run_len > best_len) {
          best_len = run_len;
          best_from = run_from;
        }
      } else {
        run_len = 0;
      }
    }
    if (best_len < 8 || 2 * best_len < ti) return std::nullopt;
    si_t.clear();
    si_p.clear();
    for (std::int64_t i = best_from; i < best_from + best_len; ++i) {
      si_t.push_back(static_cast<double>(i) / cfg.fs);
      si_p.push_back(paw[i]);
    }
    return fit_stress_index(si_t, si_p);
  }
};

BreathDetector::BreathDetector(const BreathSettings& settings)
    : s_(std::make_unique<State>(settings)) {}
BreathDetector::~BreathDetector() = default;
BreathDetector::BreathDetector(BreathDetector&&) noexcept = default;
BreathDetector& BreathDetector::operator=(BreathDetector&&) noexcept = default;

void BreathDetector::push(std::span<const double> pressure, std::span<const double> flow,
                          std::span<const double> respiration, double start_time,
                          std::vector<Breath>& out) {
  State& s = *s_;
  if (!s.started) {
    s.started = true;
    s.t0 = start_time;
  }
  const std::size_t count = s.cfg.signal == BreathSignal::airway_pressure ? pressure.size()
                            : s.cfg.signal == BreathSignal::flow          ? flow.size()
                                                                          : respiration.size();
  auto at = [](std::span<const double> v, std::size_t i) {
    return i < v.size() ? v[i] : std::numeric_limits<double>::quiet_NaN();
  };
  for (std::size_t i = 0; i < count; ++i) {
    const double p = s.cfg.has_pressure ? at(pressure, i) : 0.0;
    const double f = s.cfg.has_flow ? at(flow, i) : 0.0;
    const double r = at(respiration, i);
    if (!s.learning) {
      s.process(p, f, r, out);
      continue;
    }
    s.learn_paw.push_back(p);
    s.learn_flow.push_back(f);
    s.learn_resp.push_back(r);
    if (static_cast<int>(s.learn_paw.size()) >= s.learn_n) s.end_learning(out);
  }
}

void BreathDetector::finish(std::vector<Breath>& out) {
  if (s_->learning && !s_->learn_paw.empty()) s_->end_learning(out);
}

std::int64_t BreathDetector::count() const {
  return s_->count;
}

}  // namespace bb::wave
