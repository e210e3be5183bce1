// Slope-sum-function pulse onsets (Zong et al., Computers in Cardiology
// 2003;30:259) and beat rejection. See include/breathbeat/waveform/beats.hpp.
#include "breathbeat/waveform/beats.hpp"

#include <algorithm>
#include <cmath>
#include <deque>
#include <limits>
#include <numeric>

#include "stats.hpp"

namespace bb::wave {

const char* to_string(BeatVerdict verdict) {
  switch (verdict) {
    case BeatVerdict::accepted:
      return "accepted";
    case BeatVerdict::gap:
      return "gap";
    case BeatVerdict::out_of_range:
      return "out_of_range";
    case BeatVerdict::clipping:
      return "clipping";
    case BeatVerdict::damping:
      return "damping";
    case BeatVerdict::ectopic:
      return "ectopic";
  }
  return "unknown";
}

std::int64_t BeatCounts::total() const {
  return std::accumulate(by_verdict.begin(), by_verdict.end(), std::int64_t{0});
}

BeatSettings beat_settings(const Thresholds& t, double fs) {
  BeatSettings s;
  s.fs = fs;
  s.lowpass_boxcar_s = in_seconds(t.get<Time>("waveform.abp_lowpass_boxcar"));
  s.ssf_window_s = in_seconds(t.get<Time>("waveform.ssf_window"));
  s.threshold_fraction = in_fraction(t.get<Ratio>("waveform.ssf_threshold_fraction"));
  s.initial_factor = t.number("waveform.ssf_initial_factor");
  s.learning_s = in_seconds(t.get<Time>("waveform.ssf_learning"));
  s.refractory_s = in_seconds(t.get<Time>("waveform.beat_refractory"));
  s.max_interval_s = in_seconds(t.get<Time>("waveform.beat_max_interval"));
  s.ectopy_deviation = in_fraction(t.get<Ratio>("waveform.ectopy_interval_deviation"));
  s.ectopy_history = static_cast<int>(t.number("waveform.ectopy_history"));
  s.pressure_min_mmHg = in_mmHg(t.get<Pressure>("waveform.abp_min"));
  s.pressure_max_mmHg = in_mmHg(t.get<Pressure>("waveform.abp_max"));
  s.pulse_pressure_min_mmHg = in_mmHg(t.get<Pressure>("waveform.pulse_pressure_min"));
  s.pulse_pressure_relative_min = in_fraction(t.get<Ratio>("waveform.pulse_pressure_relative_min"));
  s.flat_top_s = in_seconds(t.get<Time>("waveform.flat_top"));
  return s;
}

namespace {

int samples_for(double seconds, double fs) {
  return std::max(1, static_cast<int>(std::lround(seconds * fs)));
}

// Low-pass (two cascaded moving averages of L samples: Zong 2003 uses L = 5 at
// 125 Hz) followed by the slope sum over W samples. The output at raw index n
// belongs to index n - (L - 1) (linear phase, delay compensated by the caller).
struct SsfFilter {
  int L = 1;
  int W = 1;
  double inv_L = 1.0;  // 1 / L
  std::vector<double> box1, box2, rises;
  int i1 = 0, i2 = 0, j = 0;
  double sum1 = 0, sum2 = 0, ssf = 0, y_prev = 0;
  bool ready = false;

  SsfFilter(int l, int w) : L(l), W(w), inv_L(1.0 / l), box1(l), box2(l), rises(w) {}

  void reset(double x0) {
    std::fill(box1.begin(), box1.end(), x0);
    std::fill(box2.begin(), box2.end(), x0);
    std::fill(rises.begin(), rises.end(), 0.0);
    sum1 = sum2 = L * x0;
    ssf = 0;
    y_prev = x0;
    ready = true;
  }

  // One sample; returns the filtered value (ssf is updated).
  double step(double x) {
    sum1 += x - box1[i1];
    box1[i1] = x;
    if (++i1 == L) i1 = 0;
    const double y1 = sum1 * inv_L;
    sum2 += y1 - box2[i2];
    box2[i2] = y1;
    if (++i2 == L) i2 = 0;
    const double y = sum2 * inv_L;
    const double rise = std::max(0.0, y - y_prev);
    y_prev = y;
    ssf += rise - rises[j];
    rises[j] = rise;
    if (++j == W) j = 0;
    if (ssf < 0) ssf = 0;  // rounding
    return y;
  }
};

std::size_t ring_size_for(int samples) {
  std::size_t size = 1;
  while (size < static_cast<std::size_t>(samples)) size <<= 1;
  return size;
}

}  // namespace

struct BeatDetector::State {
  BeatSettings cfg;
  int L, W, refractory, max_interval, flat_top, learn_n;
  SsfFilter filter;
  std::size_t mask;
  std::vector<double> ring_raw, ring_y;

  bool started = false;
  double t0 = 0;
  std::int64_t n = 0;  // raw samples processed by the detector
  double last_valid = 0;
  std::int64_t first_valid = -1;

  bool learning = true;
  std::vector<double> learn_buf;

  double base = std::numeric_limits<double>::infinity();
  std::deque<double> maxima;
  bool tracking = false;
  std::int64_t track_end = 0;
  double track_max = 0;
  double prev_ssf = 0;
  std::int64_t refractory_until = 0;
  std::int64_t last_crossing = 0;

  std::int64_t prev_onset = -1;
  std::int64_t prev_prev_onset = -1;
  bool prev_beat_gap = false;
  std::deque<double> intervals;
  std::deque<double> pulse_pressures;
  BeatCounts counts;
  mutable std::vector<double> scratch;  // for medians of the short histories above

  explicit State(const BeatSettings& s)
      : cfg(s),
        L(samples_for(s.lowpass_boxcar_s, s.fs)),
        W(samples_for(s.ssf_window_s, s.fs)),
        refractory(samples_for(s.refractory_s, s.fs)),
        max_interval(samples_for(s.max_interval_s, s.fs)),
        flat_top(samples_for(s.flat_top_s, s.fs)),
        learn_n(samples_for(s.learning_s, s.fs)),
        filter(L, W) {
    const std::size_t size = ring_size_for(max_interval + samples_for(1.0, s.fs) + W + 2 * L + 16);
    mask = size - 1;
    ring_raw.assign(size, 0.0);
    ring_y.assign(size, 0.0);
    learn_buf.reserve(learn_n);
  }

  double time_of(std::int64_t i) const { return t0 + static_cast<double>(i) / cfg.fs; }

  // ---- learning: the first threshold base from the mean SSF (Zong 2003) ----
  void end_learning(std::vector<Beat>& out) {
    SsfFilter learner(L, W);
    double sum = 0;
    std::int64_t count = 0;
    for (double x : learn_buf) {
      if (std::isnan(x)) continue;
      if (!learner.ready) learner.reset(x);
      learner.step(x);
      sum += learner.ssf;
      ++count;
    }
    const double mean = count > 0 ? sum / static_cast<double>(count) : 0.0;
    if (mean > 0) base = cfg.initial_factor * mean;
    learning = false;
    std::vector<double> replay;
    replay.swap(learn_buf);
    for (double x : replay) process(x, out);
    if (!(mean > 0)) {  // flat or missing: learn again on what follows
      learning = true;
      learn_buf.clear();
    }
  }

  // ---- one raw sample ----
  void process(double x, std::vector<Beat>& out) {
    ring_raw[n & mask] = x;
    if (std::isnan(x)) {
      if (first_valid < 0) {
        ++n;
        return;
      }
      x = last_valid;
    } else {
      last_valid = x;
      if (first_valid < 0) {
        first_valid = n;
        filter.reset(x);
        last_crossing = n;
      }
    }
    const double y = filter.step(x);
    const std::int64_t m = n - (L - 1);
    ++n;
    if (m < first_valid) return;
    ring_y[m & mask] = y;
    detect(m, out);
  }

  void detect(std::int64_t m, std::vector<Beat>& out) {
    const double ssf = filter.ssf;
    if (tracking) {
      track_max = std::max(track_max, ssf);
      if (m >= track_end) {
        tracking = false;
        update_base(track_max);
      }
    }
    const double threshold = cfg.threshold_fraction * base;
    const bool crossing = ssf >= threshold && prev_ssf < threshold;
    prev_ssf = ssf;
    if (m - last_crossing > max_interval && std::isfinite(base)) {
      base *= 0.5;  // nothing for longer than the longest interval: lower the bar
      last_crossing = m;
    }
    if (!crossing || m < refractory_until) return;
    last_crossing = m;
    refractory_until = m + refractory;
    tracking = true;
    track_end = m + W;
    track_max = ssf;
    register_onset(find_onset(m), out);
  }

  void update_base(double maximum) {
    maxima.push_back(maximum);
    if (maxima.size() > 5) maxima.pop_front();
    scratch.assign(maxima.begin(), maxima.end());
    base = median_of(scratch);
  }

  // The foot of the upstroke: the lowest filtered pressure in the SSF window
  // (plus the filter length) before the threshold crossing.
  std::int64_t find_onset(std::int64_t m) const {
    std::int64_t lo = std::max<std::int64_t>({m - W - L, first_valid, prev_onset + 1});
    std::int64_t best = m;
    double best_y = ring_y[m & mask];
    for (std::int64_t i = m - 1; i >= lo; --i) {
      const double y = ring_y[i & mask];
      if (y < best_y) {
        best_y = y;
        best = i;
      }
    }
    return best;
  }

  void register_onset(std::int64_t onset, std::vector<Beat>& out) {
    if (prev_onset >= 0) out.push_back(complete_beat(prev_onset, onset));
    prev_prev_onset = prev_onset;
    prev_onset = onset;
  }

  Beat complete_beat(std::int64_t p, std::int64_t o) {
    const std::int64_t oldest = n - static_cast<std::int64_t>(mask) + 2;
    const std::int64_t from = std::max(p, oldest);
    bool gap = (o - p) > max_interval || from > p;
    double sum = 0, y_max = -std::numeric_limits<double>::infinity();
    double raw_max = -std::numeric_limits<double>::infinity();
    double raw_min = std::numeric_limits<double>::infinity();
    std::int64_t i_max = from;
    for (std::int64_t i = from; i < o; ++i) {
      const double y = ring_y[i & mask];
      const double raw = ring_raw[i & mask];
      sum += y;
      if (y > y_max) {
        y_max = y;
        i_max = i;
      }
      if (std::isnan(raw)) {
        gap = true;
        continue;
      }
      raw_max = std::max(raw_max, raw);
      raw_min = std::min(raw_min, raw);
    }
    const double dia = ring_y[from & mask];
    Beat b;
    b.onset = seconds(time_of(p));
    b.duration = seconds(static_cast<double>(o - p) / cfg.fs);
    b.systolic_time = seconds(time_of(i_max));
    b.systolic = mmHg(y_max);
    b.diastolic = mmHg(dia);
    b.pulse_pressure = mmHg(y_max - dia);
    b.mean = mmHg(sum / static_cast<double>(std::max<std::int64_t>(1, o - from)));
    if (prev_prev_onset >= 0)
      b.interval = seconds(static_cast<double>(p - prev_prev_onset) / cfg.fs);
    b.verdict = judge(gap, raw_min, raw_max, longest_flat_top(from, o, raw_max), y_max - dia, b);
    remember(b);
    prev_beat_gap = b.verdict == BeatVerdict::gap;
    ++counts.by_verdict[static_cast<int>(b.verdict)];
    return b;
  }

  int longest_flat_top(std::int64_t from, std::int64_t to, double raw_max) const {
    int run = 0, longest = 0;
    for (std::int64_t i = from; i < to; ++i) {
      run = ring_raw[i & mask] == raw_max ? run + 1 : 0;
      longest = std::max(longest, run);
    }
    return longest;
  }

  BeatVerdict judge(bool gap, double raw_min, double raw_max, int flat, double pp,
                    const Beat& b) const {
    if (gap) return BeatVerdict::gap;
    if (raw_max > cfg.pressure_max_mmHg || raw_min < cfg.pressure_min_mmHg)
      return BeatVerdict::out_of_range;
    if (flat >= flat_top) return BeatVerdict::clipping;
    if (pp < cfg.pulse_pressure_min_mmHg) return BeatVerdict::damping;
    if (pulse_pressures.size() >= 3) {
      scratch.assign(pulse_pressures.begin(), pulse_pressures.end());
      if (pp < cfg.pulse_pressure_relative_min * median_of(scratch)) return BeatVerdict::damping;
    }
    if (b.interval && !prev_beat_gap && intervals.size() >= 3) {
      scratch.assign(intervals.begin(), intervals.end());
      const double med = median_of(scratch);
      if (std::abs(in_seconds(*b.interval) - med) > cfg.ectopy_deviation * med)
        return BeatVerdict::ectopic;
    }
    return BeatVerdict::accepted;
  }

  void remember(const Beat& b) {
    const auto history = static_cast<std::size_t>(std::max(3, cfg.ectopy_history));
    if (b.interval && b.verdict != BeatVerdict::gap && !prev_beat_gap) {
      intervals.push_back(in_seconds(*b.interval));
      if (intervals.size() > history) intervals.pop_front();
    }
    if (b.verdict == BeatVerdict::accepted || b.verdict == BeatVerdict::damping ||
        b.verdict == BeatVerdict::ectopic) {
      pulse_pressures.push_back(in_mmHg(b.pulse_pressure));
      if (pulse_pressures.size() > history) pulse_pressures.pop_front();
    }
  }
};

BeatDetector::BeatDetector(const BeatSettings& settings) : s_(std::make_unique<State>(settings)) {}
BeatDetector::~BeatDetector() = default;
BeatDetector::BeatDetector(BeatDetector&&) noexcept = default;
BeatDetector& BeatDetector::operator=(BeatDetector&&) noexcept = default;

void BeatDetector::push(std::span<const double> mmHg, double start_time, std::vector<Beat>& out) {
  State& s = *s_;
  if (!s.started) {
    s.started = true;
    s.t0 = start_time;
  }
  for (double x : mmHg) {
    if (!s.learning) {
      s.process(x, out);
      continue;
    }
    s.learn_buf.push_back(x);
    if (static_cast<int>(s.learn_buf.size()) >= s.learn_n) s.end_learning(out);
  }
}

void BeatDetector::finish(std::vector<Beat>& out) {
  if (s_->learning && !s_->learn_buf.empty()) s_->end_learning(out);
}

const BeatCounts& BeatDetector::counts() const {
  return s_->counts;
}

std::vector<Beat> detect_beats(std::span<const double> mmHg, const BeatSettings& settings) {
  BeatDetector detector(settings);
  std::vector<Beat> beats;
  detector.push(mmHg, 0.0, beats);
  detector.finish(beats);
  return beats;
}

}  // namespace bb::wave
