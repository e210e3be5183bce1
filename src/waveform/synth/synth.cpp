// Synthetic arterial + airway records with known truth (see synth.hpp for the
// model and why the per-breath PPV equals the requested value exactly).
#include <algorithm>
#include <cmath>
#include <deque>
#include <limits>
#include <numbers>
#include <random>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/synth.hpp"

namespace bb::wave {

namespace {

constexpr double kSynthNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kPi = std::numbers::pi;
constexpr double kEctopicTiming = 0.65;  // premature beat at 0.65 of the interval
constexpr double kEctopicPulse = 0.5;    // its pulse pressure, x PP0
constexpr double kDiastolicFlat = 0.08;  // last fraction of each interval held at diastole
constexpr double kMaxPhase = 0.25;       // breath phase of the largest pulse pressure

// Pulse shape, 0 at onset, 1 on the flat systolic top, 0 again before the next onset.
double pulse_shape(double tau, double interval, double plateau) {
  const double rise = std::min(0.09, 0.25 * interval);
  if (tau < rise) {
    const double s = std::sin(0.5 * kPi * tau / rise);
    return s * s;
  }
  if (tau < rise + plateau) return 1.0;
  const double decay = (1.0 - kDiastolicFlat) * interval - rise - plateau;
  const double u = (tau - rise - plateau) / decay;
  if (u >= 1.0) return 0.0;
  constexpr double k = 2.5;
  double s = (std::exp(-k * u) - std::exp(-k)) / (1.0 - std::exp(-k));
  if (u > 0.15 && u < 0.35) s += 0.06 * std::sin(kPi * (u - 0.15) / 0.2);  // dicrotic wave
  return s;
}

// Normal deviates, one stream per channel so chunking does not change them.
class Gaussian {
 public:
  explicit Gaussian(std::uint64_t seed) : engine_(seed) {}
  double operator()() {
    if (has_spare_) {
      has_spare_ = false;
      return spare_;
    }
    const double u1 = (static_cast<double>(engine_() >> 11) + 1.0) * 0x1.0p-53;
    const double u2 = static_cast<double>(engine_() >> 11) * 0x1.0p-53;
    const double r = std::sqrt(-2.0 * std::log(u1));
    spare_ = r * std::sin(2.0 * kPi * u2);
    has_spare_ = true;
    return r * std::cos(2.0 * kPi * u2);
  }

 private:
  std::mt19937_64 engine_;
  double spare_ = 0.0;
  bool has_spare_ = false;
};

double uniform01(std::mt19937_64& engine) {
  return static_cast<double>(engine() >> 11) * 0x1.0p-53;
}

struct Beat {
  double onset = 0.0;
  double next_onset = std::numeric_limits<double>::infinity();
  double pp = 0.0;  // mmHg
  bool ectopic = false;
  long breath = 0;
};

void require(bool ok, const char* field, double value, const char* expected) {
  if (ok) return;
  throw InputError(field, std::to_string(value), "is outside the range the generator supports",
                   expected);
}

}  // namespace

void validate(const SynthParams& p) {
  const double seconds = in_seconds(p.duration);
  require(seconds > 0.0 && seconds <= 31.0 * 86400.0, "--duration", seconds,
          "0 < duration <= 31 days");
  require(p.fs >= 10.0 && p.fs <= 10000.0, "--fs", p.fs, "10 to 10000 samples/s");
  const double hr = in_per_min(p.heart_rate);
  require(hr >= 20.0 && hr <= 200.0, "--hr", hr, "20 to 200 /min");
  const double rr = in_per_min(p.respiratory_rate);
  require(rr >= 4.0 && rr <= 60.0, "--rr", rr, "4 to 60 /min");
  const double ppv = in_percent(p.ppv);
  require(ppv >= 0.0 && ppv <= 80.0, "--ppv", ppv, "0 to 80 %");
  require(in_mmHg(p.pulse_pressure) > 0.0, "pulse pressure", in_mmHg(p.pulse_pressure), "> 0 mmHg");
  require(in_fraction(p.noise) >= 0.0 && in_fraction(p.noise) <= 1.0, "--noise",
          in_fraction(p.noise), "0 to 1 (a fraction of each signal's swing)");
  require(in_mmHg(p.drift) >= 0.0, "--drift", in_mmHg(p.drift), ">= 0 mmHg");
  require(in_fraction(p.ectopy) >= 0.0 && in_fraction(p.ectopy) <= 0.3, "--ectopy",
          in_fraction(p.ectopy), "0 to 0.3 of beats");
  require(p.gaps >= 0 && p.gaps * in_seconds(p.gap_length) <= 0.5 * seconds, "--gaps", p.gaps,
          "gaps covering at most half the record");
  require(in_seconds(p.gap_length) > 0.0, "gap length", in_seconds(p.gap_length), "> 0 s");
  require(in_cmH2O(p.peep) >= 0.0 && in_cmH2O(p.peep) <= 30.0, "--peep", in_cmH2O(p.peep),
          "0 to 30 cmH2O");
  require(in_mL(p.tidal_volume) > 0.0 && in_mL(p.tidal_volume) <= 2000.0, "--vt",
          in_mL(p.tidal_volume), "0 to 2000 mL");
  require(in_cmH2O_per_L_per_s(p.resistance) > 0.0, "--resistance",
          in_cmH2O_per_L_per_s(p.resistance), "> 0 cmH2O/(L/s)");
  require(in_cmH2O_per_L(p.elastance) > 0.0, "--elastance", in_cmH2O_per_L(p.elastance),
          "> 0 cmH2O/L");
  const double fi = in_fraction(p.inspiratory_fraction);
  require(fi >= 0.1 && fi <= 0.9, "inspiratory fraction", fi, "0.1 to 0.9 of the breath");
}

struct SyntheticRecord::State {
  SynthParams p;
  std::vector<ChannelInfo> channels;
  SynthTruth truth;
  std::int64_t total = 0;  // samples per channel
  std::int64_t position = 0;

  // Ventilation, in L, L/s, cmH2O, s.
  double breath_period = 0.0, ti = 0.0, te = 0.0, flow = 0.0, vt = 0.0, tau = 0.0, q = 0.0;
  double resistance = 0.0, elastance = 0.0, peep = 0.0;
  // Circulation, in mmHg and s.
  double beat_period = 0.0, pp0 = 0.0, half_swing = 0.0, plateau = 0.0;

  std::mt19937_64 beat_rng;
  std::vector<Gaussian> noise;
  std::deque<Beat> beats;  // scheduled, not yet fully behind the position
  double last_normal_onset = 0.0;
  long finalized_breaths = 0;  // breaths whose beats have their pulse pressures

  explicit State(const SynthParams& params) : p(params) {
    validate(p);
    total = static_cast<std::int64_t>(std::llround(in_seconds(p.duration) * p.fs));
    breath_period = 60.0 / in_per_min(p.respiratory_rate);
    ti = in_fraction(p.inspiratory_fraction) * breath_period;
    te = breath_period - ti;
    vt = in_litre(p.tidal_volume);
    flow = vt / ti;
    resistance = in_cmH2O_per_L_per_s(p.resistance);
    elastance = in_cmH2O_per_L(p.elastance);
    peep = in_cmH2O(p.peep);
    tau = resistance / elastance;
    q = std::exp(-te / tau);
    beat_period = 60.0 / in_per_min(p.heart_rate);
    pp0 = in_mmHg(p.pulse_pressure);
    half_swing = 0.5 * in_fraction(p.ppv);
    plateau = std::max(0.012, 1.2 / p.fs);
    make_channels();
    make_truth_summary();
    make_gaps();
    restart();
  }

  void make_channels() {
    channels.push_back({"ABP", "mmHg", p.fs, Role::arterial_pressure, std::nullopt, std::nullopt});
    channels.push_back({"Paw", "cmH2O", p.fs, Role::airway_pressure, std::nullopt, std::nullopt});
    channels.push_back({"Flow", "L/min", p.fs, Role::flow, std::nullopt, std::nullopt});
    if (p.volume_channel)
      channels.push_back({"Volume", "mL", p.fs, Role::volume, std::nullopt, std::nullopt});
  }

  void make_truth_summary() {
    truth.ppv = p.ppv;
    truth.heart_rate = p.heart_rate;
    truth.respiratory_rate = p.respiratory_rate;
    truth.resistance = p.resistance;
    truth.elastance = p.elastance;
    truth.peep = p.peep;
    truth.tidal_volume = p.tidal_volume;
  }

  void make_gaps() {
    std::mt19937_64 rng(p.seed ^ 0x9E3779B97F4A7C15ull);
    const double length = in_seconds(p.gap_length);
    const double span = in_seconds(p.duration);
    for (int i = 0; i < p.gaps; ++i) {
      const double start = 0.1 * span + uniform01(rng) * std::max(0.0, 0.8 * span - length);
      truth.gaps.emplace_back(start, start + length);
    }
    std::sort(truth.gaps.begin(), truth.gaps.end());
  }

  void restart() {
    position = 0;
    beat_rng.seed(p.seed);
    noise.clear();
    for (std::size_t c = 0; c < channels.size(); ++c) noise.emplace_back(p.seed * 7919 + c + 1);
    beats.clear();
    truth.beats.clear();
    truth.breaths.clear();
    finalized_breaths = 0;
    last_normal_onset = 0.25 * beat_period - beat_period;
  }

  long breath_of(double t) const { return static_cast<long>(std::floor(t / breath_period)); }

  // Volume at the start of breath k: VT q (1 - q^k) / (1 - q), the residue of
  // incomplete passive expirations (geometric series, V(0) = 0).
  double start_volume(long k) const {
    if (k <= 0 || q == 0.0) return 0.0;
    return vt * q * (1.0 - std::pow(q, static_cast<double>(k))) / (1.0 - q);
  }

  void push_beat(double onset, bool ectopic) {
    if (!beats.empty()) beats.back().next_onset = onset;
    Beat b;
    b.onset = onset;
    b.ectopic = ectopic;
    b.breath = breath_of(onset);
    beats.push_back(b);
  }

  void schedule_next_beat() {
    const double ectopy = in_fraction(p.ectopy);
    if (ectopy > 0.0 && uniform01(beat_rng) < ectopy && !beats.empty()) {
      push_beat(last_normal_onset + kEctopicTiming * beat_period, true);
      last_normal_onset += 2.0 * beat_period;  // compensatory pause
    } else {
      last_normal_onset += beat_period;
    }
    push_beat(last_normal_onset, false);
  }

  // Schedules beats until every breath up to `breath` is complete, then gives
  // those breaths' beats their pulse pressures.
  void prepare_until(long breath) {
    while (beats.empty() || breath_of(beats.back().onset) <= breath) schedule_next_beat();
    while (finalized_breaths <= breath) finalize_breath(finalized_breaths++);
  }

  double modulation(const Beat& b) const {
    const double phase = (b.onset - static_cast<double>(b.breath) * breath_period) / breath_period;
    return std::cos(2.0 * kPi * (phase - kMaxPhase));
  }

  void finalize_breath(long k) {
    double lo = std::numeric_limits<double>::infinity();
    double hi = -lo;
    int normal = 0;
    for (const Beat& b : beats) {
      if (b.breath != k || b.ectopic) continue;
      lo = std::min(lo, modulation(b));
      hi = std::max(hi, modulation(b));
      ++normal;
    }
    const double mid = 0.5 * (hi + lo);
    const double half = 0.5 * (hi - lo);
    bool gap_hit = false;
    for (Beat& b : beats) {
      if (b.breath != k) continue;
      if (b.ectopic) {
        b.pp = kEctopicPulse * pp0;
      } else {
        b.pp = half > 1e-9 ? pp0 * (1.0 + half_swing * (modulation(b) - mid) / half) : pp0;
      }
      gap_hit = record_beat(b) || gap_hit;
    }
    record_breath(k, normal, half > 1e-9 && normal >= 2 && !gap_hit);
  }

  bool overlaps_gap(double from, double to) const {
    return std::any_of(truth.gaps.begin(), truth.gaps.end(),
                       [&](const auto& g) { return from < g.second && to > g.first; });
  }

  // Returns whether the beat touches a gap.
  bool record_beat(const Beat& b) {
    const double end = std::isfinite(b.next_onset) ? b.next_onset : b.onset + beat_period;
    const bool in_gap = overlaps_gap(b.onset, end);
    if (!p.keep_truth || b.onset >= in_seconds(p.duration)) return in_gap;
    SynthBeat t;
    t.onset = b.onset;
    t.peak = b.onset + std::min(0.09, 0.25 * (end - b.onset));
    t.diastolic = mmHg(in_mmHg(p.diastolic));
    t.pulse_pressure = mmHg(b.pp);
    t.systolic = mmHg(in_mmHg(p.diastolic) + b.pp);
    t.ectopic = b.ectopic;
    t.in_gap = in_gap;
    t.breath = b.breath;
    truth.beats.push_back(t);
    return in_gap;
  }

  void record_breath(long k, int normal, bool ppv_defined) {
    const double start = static_cast<double>(k) * breath_period;
    if (!p.keep_truth || start >= in_seconds(p.duration)) return;
    const double vs = start_volume(k);
    SynthBreath b;
    b.start = start;
    b.ti = seconds(ti);
    b.te = seconds(te);
    b.tidal_volume = litre(vt);
    b.peak_pressure = cmH2O(resistance * flow + elastance * (vs + vt) + peep);
    b.total_peep = cmH2O(peep + elastance * vs);
    // Time average: inspiration (R F + E Vs + PEEP) Ti + E F Ti^2 / 2, expiration PEEP Te.
    const double area = ti * (resistance * flow + elastance * vs + peep) +
                        0.5 * elastance * flow * ti * ti + peep * te;
    b.mean_airway_pressure = cmH2O(area / breath_period);
    b.normal_beats = normal;
    b.ppv_defined = ppv_defined;
    b.ppv = ppv_defined ? p.ppv : fraction(0);
    truth.breaths.push_back(b);
  }

  // Ventilation at time t: volume (L) and flow (L/s).
  void lung_at(double t, double& volume, double& flow_now) const {
    const long k = breath_of(t);
    const double tau_in = t - static_cast<double>(k) * breath_period;
    const double vs = start_volume(k);
    if (tau_in < ti) {
      volume = vs + flow * tau_in;
      flow_now = flow;
      return;
    }
    volume = (vs + vt) * std::exp(-(tau_in - ti) / tau);
    flow_now = -volume / tau;
  }

  double diastolic_at(double t) const {
    const double wander =
        0.6 * std::sin(2.0 * kPi * 0.011 * t) + 0.4 * std::sin(2.0 * kPi * 0.029 * t + 1.0);
    return in_mmHg(p.diastolic) + in_mmHg(p.drift) * wander;
  }

  double abp_at(double t, std::size_t& cursor) const {
    while (cursor + 1 < beats.size() && beats[cursor + 1].onset <= t) ++cursor;
    const Beat& b = beats[cursor];
    if (t < b.onset) return diastolic_at(t);
    return diastolic_at(t) + b.pp * pulse_shape(t - b.onset, b.next_onset - b.onset, plateau);
  }

  void generate(std::int64_t n, Chunk& chunk) {
    const double t_end = static_cast<double>(position + n) / p.fs;
    prepare_until(breath_of(t_end) + 1);
    chunk.samples.resize(channels.size());
    for (auto& s : chunk.samples) s.resize(static_cast<std::size_t>(n));
    const double swing_fraction = in_fraction(p.noise);
    const double sd_abp = swing_fraction * pp0;
    const double sd_paw = swing_fraction * (resistance * flow + elastance * vt);
    const double sd_flow = swing_fraction * flow * 60.0;
    const double sd_volume = swing_fraction * vt * 1000.0;
    const double offset = in_L_per_min(p.flow_offset);
    std::size_t cursor = 0;
    std::size_t gap = 0;
    for (std::int64_t i = 0; i < n; ++i) {
      const double t = static_cast<double>(position + i) / p.fs;
      const auto k = static_cast<std::size_t>(i);
      while (gap < truth.gaps.size() && truth.gaps[gap].second <= t) ++gap;
      const bool in_gap = gap < truth.gaps.size() && t >= truth.gaps[gap].first;
      const double abp = abp_at(t, cursor);
      chunk.samples[0][k] = in_gap ? kSynthNaN : abp + (sd_abp > 0 ? sd_abp * noise_of(0) : 0.0);
      double volume = 0.0, flow_now = 0.0;
      lung_at(t, volume, flow_now);
      const bool expiring = flow_now < 0.0;
      const double paw = expiring ? peep : resistance * flow_now + elastance * volume + peep;
      chunk.samples[1][k] = paw + (sd_paw > 0 ? sd_paw * noise_of(1) : 0.0);
      chunk.samples[2][k] = flow_now * 60.0 + offset + (sd_flow > 0 ? sd_flow * noise_of(2) : 0.0);
      if (p.volume_channel) {
        chunk.samples[3][k] = volume * 1000.0 + (sd_volume > 0 ? sd_volume * noise_of(3) : 0.0);
      }
    }
    chunk.start_time = static_cast<double>(position) / p.fs;
    chunk.duration = static_cast<double>(n) / p.fs;
    position += n;
    drop_past_beats();
  }

  double noise_of(std::size_t channel) { return noise[channel](); }

  void drop_past_beats() {
    const double now = static_cast<double>(position) / p.fs;
    while (beats.size() > 1 && beats[1].onset <= now && beats.front().breath < finalized_breaths) {
      beats.pop_front();
    }
  }
};

SyntheticRecord::SyntheticRecord(const SynthParams& params)
    : state_(std::make_unique<State>(params)) {}
SyntheticRecord::~SyntheticRecord() = default;

const std::vector<ChannelInfo>& SyntheticRecord::channels() const {
  return state_->channels;
}

std::optional<double> SyntheticRecord::duration() const {
  return static_cast<double>(state_->total) / state_->p.fs;
}

void SyntheticRecord::seek(double seconds) {
  State& s = *state_;
  s.restart();
  const auto target = std::min<std::int64_t>(
      s.total, static_cast<std::int64_t>(std::floor(std::max(0.0, seconds) * s.p.fs + 1e-9)));
  Chunk scratch;
  while (s.position < target)
    s.generate(std::min<std::int64_t>(target - s.position, 65536), scratch);
}

bool SyntheticRecord::next(Chunk& chunk, double max_seconds) {
  State& s = *state_;
  if (s.position >= s.total) return false;
  const auto wanted = static_cast<std::int64_t>(std::floor(max_seconds * s.p.fs + 1e-9));
  s.generate(std::clamp<std::int64_t>(wanted, 1, s.total - s.position), chunk);
  return true;
}

const SynthTruth& SyntheticRecord::truth() const {
  return state_->truth;
}

}  // namespace bb::wave
