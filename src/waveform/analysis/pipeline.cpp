// The streaming waveform pipeline. See include/breathbeat/waveform/pipeline.hpp.
#include "breathbeat/waveform/pipeline.hpp"

#include <algorithm>
#include <array>
#include <cmath>
#include <deque>
#include <limits>
#include <sstream>

#include "../background_job.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/mechanics.hpp"
#include "breathbeat/text/strings.hpp"  // format_number
#include "breathbeat/units_parse.hpp"
#include "stats.hpp"

namespace bb::wave {

// ---- channels -------------------------------------------------------------------

namespace {

std::string channel_list(const std::vector<ChannelInfo>& channels) {
  std::string list;
  for (const auto& c : channels) {
    list += (list.empty() ? "" : ", ") + c.name + " (" + to_string(c.role) + ")";
  }
  return list.empty() ? "none" : list;
}

int find_channel(const std::vector<ChannelInfo>& channels, const std::string& name, Role role,
                 const std::string& field) {
  if (!name.empty()) {
    for (std::size_t i = 0; i < channels.size(); ++i) {
      if (channels[i].name == name) return static_cast<int>(i);
    }
    for (std::size_t i = 0; i < channels.size(); ++i) {
      if (equals_ci(channels[i].name, name)) return static_cast<int>(i);
    }
    throw InputError(field, name, "no channel of that name in the record",
                     "one of the channels: " + channel_list(channels));
  }
  for (std::size_t i = 0; i < channels.size(); ++i) {
    if (channels[i].role == role) return static_cast<int>(i);
  }
  return -1;
}

// A channel the file marks as uncalibrated cannot give pressures or flows.
void refuse_uncalibrated(const std::vector<ChannelInfo>& channels, int index,
                         const std::string& field) {
  if (index < 0) return;
  const ChannelInfo& c = channels[static_cast<std::size_t>(index)];
  if (!c.uncalibrated) return;
  throw InputError(field, c.name,
                   "channel " + c.name +
                       " is uncalibrated (ADC gain 0 or not given): its values are raw ADC "
                       "units, not pressures or flows",
                   "a calibrated channel: the header's gain in ADC units per " +
                       (c.unit.empty() ? std::string("physical unit") : c.unit) +
                       ", or another channel chosen by name",
                   c.uncalibrated);
}

// Factor from the channel's unit to `target` (a unit of `dimension`).
double channel_factor(const ChannelInfo& c, Dimension dimension, std::string_view target,
                      const std::string& field) {
  const std::string what = "unit of channel " + c.name;
  if (c.unit.empty()) {
    throw InputError(field, c.name, "channel has no unit",
                     "a unit among " + accepted_units(dimension), c.declared);
  }
  try {
    return unit_factor(c.unit, dimension, Field{what, ""}) /
           unit_factor(target, dimension, Field{what, ""});
  } catch (const InputError&) {
    throw InputError(field, c.name + " [" + c.unit + "]", "channel unit does not fit its role",
                     "a unit among " + accepted_units(dimension), c.declared);
  }
}

}  // namespace

ChannelChoice choose_channels(const std::vector<ChannelInfo>& channels, const PipelineOptions& o) {
  ChannelChoice c;
  c.abp = find_channel(channels, o.abp, Role::arterial_pressure, "abp");
  c.paw = find_channel(channels, o.paw, Role::airway_pressure, "paw");
  c.flow = find_channel(channels, o.flow, Role::flow, "flow");
  c.resp = find_channel(channels, o.resp, Role::respiration, "resp");
  if (c.abp < 0) {
    throw InputError("abp", "",
                     "no arterial pressure channel; channels are: " + channel_list(channels),
                     "a record with an arterial pressure channel, or that channel's name");
  }
  // No airway pressure, flow or respiration channel: arterial pressure alone
  // (beats always; PPV over cycles of a set rate or of the pulse-pressure modulation).
  // Pressures and flow are read in physical units; a respiration channel is
  // used for breath timing only, so its scale does not matter.
  refuse_uncalibrated(channels, c.abp, "abp");
  refuse_uncalibrated(channels, c.paw, "paw");
  refuse_uncalibrated(channels, c.flow, "flow");
  return c;
}

// ---- the engine: beats to breaths to windows --------------------------------------

namespace {

// Running mean and SD (Welford).
struct Running {
  std::int64_t n = 0;
  double mean = 0, m2 = 0;
  void add(double x) {
    ++n;
    const double d = x - mean;
    mean += d / static_cast<double>(n);
    m2 += d * (x - mean);
  }
  std::optional<double> cv() const {
    if (n < 3 || mean <= 0) return std::nullopt;
    return std::sqrt(m2 / static_cast<double>(n - 1)) / mean;
  }
};

// What a stretch of record (one window, or the whole record) accumulates.
struct Tally {
  std::int64_t beats = 0, beats_rejected = 0, beats_ectopic = 0;
  double interval_sum = 0;
  std::int64_t intervals = 0;
  std::int64_t breaths = 0, breaths_with_swing = 0;
  double breath_time = 0;
  Running timing;
  double paw_time_sum = 0, paw_time = 0;

  void add_beat(const Beat& b) {
    ++beats;
    if (b.verdict != BeatVerdict::accepted) ++beats_rejected;
    if (b.verdict == BeatVerdict::ectopic) ++beats_ectopic;
    if (b.verdict == BeatVerdict::accepted && b.interval) {
      interval_sum += in_seconds(*b.interval);
      ++intervals;
    }
  }
  void add_breath(const Breath& br, double swing_cmH2O) {
    ++breaths;
    if (br.gap) return;
    const double d = in_seconds(br.duration);
    breath_time += d;
    timing.add(d);
    if (br.negative_swing && in_cmH2O(*br.negative_swing) > swing_cmH2O) ++breaths_with_swing;
    if (br.mean_airway_pressure) {
      paw_time_sum += in_cmH2O(*br.mean_airway_pressure) * d;
      paw_time += d;
    }
  }
  std::optional<Frequency> hr() const {
    if (intervals == 0 || interval_sum <= 0) return std::nullopt;
    return hertz(static_cast<double>(intervals) / interval_sum);
  }
  std::optional<Frequency> rr() const {
    const std::int64_t whole = timing.n;
    if (whole == 0 || breath_time <= 0) return std::nullopt;
    return hertz(static_cast<double>(whole) / breath_time);
  }
  std::optional<Pressure> mean_paw() const {
    if (paw_time <= 0) return std::nullopt;
    return cmH2O(paw_time_sum / paw_time);
  }
  SignalConditions conditions(bool pressure_known, std::optional<Compliance> crs) const {
    SignalConditions c;
    c.beats = beats;
    c.beats_ectopic = beats_ectopic;
    c.breaths = timing.n;
    c.breaths_with_swing = breaths_with_swing;
    c.breath_timing_cv = timing.cv();
    c.hr = hr();
    c.rr = rr();
    c.crs = crs;
    c.pressure_known = pressure_known;
    return c;
  }
};

struct WindowAcc {
  Tally tally;
  std::vector<double> ppv, spv, vt, elastance;  // per breath, bounded by the window
  std::vector<Beat> beats;  // without breaths only: the window's beats, for its cycles
};

// The settings of the PPV's respiratory cycles and of the stated conditions.
struct CycleSettings {
  CycleSource source = CycleSource::breaths;
  std::optional<Frequency> set_rr;
  StatedConditions stated;
};

class Engine {
 public:
  Engine(const PipelineOptions& o, const Thresholds& t, double origin, double window, bool pressure,
         CycleSettings cycles)
      : o_(o),
        t_(t),
        origin_(origin),
        window_(window),
        pressure_(pressure),
        cycles_(std::move(cycles)),
        rr_low_(t.get<Frequency>("waveform.modulation_rr_min")),
        rr_high_(t.get<Frequency>("waveform.modulation_rr_max")),
        false_alarm_max_(in_fraction(t.get<Ratio>("waveform.modulation_false_alarm_max"))),
        modulation_min_beats_(static_cast<int>(t.number("waveform.modulation_min_beats"))),
        rate_mismatch_(in_fraction(t.get<Ratio>("waveform.set_rate_mismatch"))),
        min_beats_(static_cast<int>(t.number("waveform.min_beats_per_breath"))),
        min_breaths_(static_cast<int>(t.number("ppv.min_breaths"))),
        swing_(in_cmH2O(t.get<Pressure>("waveform.negative_swing"))),
        min_r2_(t.number("waveform.eom_min_r_squared")),
        margin_(in_seconds(t.get<Time>("waveform.breath_max_duration")) +
                in_seconds(t.get<Time>("waveform.breath_learning")) + 5.0) {}

  void add_beat(const Beat& b) {
    if (o_.on_beat) o_.on_beat(b);
    const double onset = in_seconds(b.onset);
    if (WindowAcc* w = window_at(onset)) {
      w->tally.add_beat(b);
      if (cycles_.source != CycleSource::breaths) w->beats.push_back(b);
    }
    whole_.add_beat(b);
    if (b.verdict == BeatVerdict::accepted) {
      sbp_.add(in_mmHg(b.systolic));
      dbp_.add(in_mmHg(b.diastolic));
      map_.add(in_mmHg(b.mean));
      pp_.add(in_mmHg(b.pulse_pressure));
    }
    last_beat_onset_ = std::max(last_beat_onset_, onset);
    beats_.push_back(b);
  }

  void add_breath(const Breath& b) { breaths_.push_back(b); }

  // Pairs completed breaths with their beats, then closes finished windows.
  void advance(double now, bool final) {
    while (!breaths_.empty()) {
      const Breath& br = breaths_.front();
      const double start = in_seconds(br.start);
      const double end = start + in_seconds(br.duration);
      if (!final && last_beat_onset_ < end && now - end < margin_) break;
      while (!beats_.empty() && in_seconds(beats_.front().onset) < start) beats_.pop_front();
      std::vector<Beat> in_breath;
      while (!beats_.empty() && in_seconds(beats_.front().onset) < end) {
        in_breath.push_back(beats_.front());
        beats_.pop_front();
      }
      const BreathPpv p = br.gap ? BreathPpv{} : breath_ppv(in_breath, min_beats_);
      take_breath(br, p);
      breaths_.pop_front();
    }
    const double horizon = final ? std::numeric_limits<double>::infinity() : now - margin_;
    if (breaths_.empty()) {
      while (!beats_.empty() && in_seconds(beats_.front().onset) < horizon - margin_)
        beats_.pop_front();
    }
    while (!windows_.empty() &&
           origin_ + static_cast<double>(first_window_ + 1) * window_ <= horizon)
      close_window(now, final);
  }

  void finish(double end_time) {
    advance(end_time, true);
    while (!windows_.empty()) close_window(end_time, true);
  }

  RecordSummary summary(RecordSummary s) const {
    s.heart_rate = whole_.hr();
    s.respiratory_rate = whole_.rr();
    s.cycles = cycles_.source;
    s.cycles_analysed = cycles_analysed_;
    s.windows_without_modulation = windows_without_modulation_;
    s.windows_rate_mismatch = windows_rate_mismatch_;
    if (auto v = mismatch_rr_.quantile(0.5)) s.mismatch_rate = per_min(*v);
    if (cycles_.source == CycleSource::set_rate) s.respiratory_rate = cycles_.set_rr;
    if (cycles_.source == CycleSource::pulse_modulation) {
      s.respiratory_rate.reset();
      if (auto v = modulation_rr_.quantile(0.5)) s.respiratory_rate = per_min(*v);
    }
    if (s.heart_rate && s.respiratory_rate) {
      s.hr_rr_ratio = heart_rate_to_respiratory_rate_ratio(*s.heart_rate, *s.respiratory_rate);
    }
    s.breaths = whole_.breaths;
    s.breaths_with_ppv = ppv_.count();
    s.min_breaths = min_breaths_;
    if (auto v = sbp_.quantile(0.5)) s.sbp = mmHg(*v);
    if (auto v = dbp_.quantile(0.5)) s.dbp = mmHg(*v);
    if (auto v = map_.quantile(0.5)) s.map = mmHg(*v);
    if (auto v = pp_.quantile(0.5)) s.pulse_pressure = mmHg(*v);
    // The same minimum number of breaths as a typed PPV (ppv.min_breaths).
    if (static_cast<int>(ppv_.count()) >= min_breaths_) {
      s.ppv = PpvSpread{fraction(*ppv_.quantile(0.5)), fraction(*ppv_.quantile(0.1)),
                        fraction(*ppv_.quantile(0.9)), static_cast<int>(ppv_.count())};
    }
    if (auto v = spv_.quantile(0.5)) s.spv = mmHg(*v);
    s.mean_airway_pressure = whole_.mean_paw();
    if (auto v = ppeak_.quantile(0.5)) s.ppeak = cmH2O(*v);
    if (auto v = peep_.quantile(0.5)) s.peep = cmH2O(*v);
    if (auto v = vt_.quantile(0.5)) s.vt = litre(*v);
    s.fits = r_.count();
    if (auto v = r_.quantile(0.5)) s.resistance = cmH2O_per_L_per_s(*v);
    if (auto v = e_.quantile(0.5); v && *v > 0) {
      s.elastance = cmH2O_per_L(*v);
      s.compliance = Compliance(1.0 / *s.elastance);
    }
    if (auto v = p0_.quantile(0.5)) s.total_peep = cmH2O(*v);
    s.fit_r_squared = r2_.quantile(0.5);
    s.stress_index = stress_.quantile(0.5);
    s.windows = windows_closed_;
    if (s.vt && cycles_.stated.pbw) s.vt_per_kg = tidal_volume_per_kg(*s.vt, *cycles_.stated.pbw);
    SignalConditions k = whole_.conditions(pressure_, s.compliance);
    k.vt_per_kg = s.vt_per_kg;
    k.cycles = cycles_.source;
    k.rr = s.respiratory_rate;
    s.gates = signal_ppv_gates(k, cycles_.stated, t_);
    if (s.ppv) s.reading = read_ppv(s.ppv->median, s.gates, t_);
    return s;
  }

 private:
  void take_breath(const Breath& br, const BreathPpv& p) {
    if (o_.on_breath) o_.on_breath(br, p);
    const double start = in_seconds(br.start);
    WindowAcc* w = window_at(start);
    if (w) w->tally.add_breath(br, swing_);
    whole_.add_breath(br, swing_);
    if (br.gap) return;
    if (p.ppv) {
      ppv_.add(in_fraction(*p.ppv));
      spv_.add(in_mmHg(*p.spv));
      if (w) {
        w->ppv.push_back(in_fraction(*p.ppv));
        w->spv.push_back(in_mmHg(*p.spv));
      }
    }
    if (br.ppeak) ppeak_.add(in_cmH2O(*br.ppeak));
    if (br.peep) peep_.add(in_cmH2O(*br.peep));
    if (br.vt) {
      vt_.add(in_litre(*br.vt));
      if (w) w->vt.push_back(in_litre(*br.vt));
    }
    if (br.fit && br.fit->r_squared >= min_r2_) {
      r_.add(in_cmH2O_per_L_per_s(br.fit->resistance));
      e_.add(in_cmH2O_per_L(br.fit->elastance));
      p0_.add(in_cmH2O(br.fit->p0));
      r2_.add(br.fit->r_squared);
      if (w) w->elastance.push_back(in_cmH2O_per_L(br.fit->elastance));
    }
    if (br.stress_index) stress_.add(br.stress_index->b);
  }

  // Without breaths: the window's PPV over whole respiratory cycles, of the set
  // rate or of the modulation found in its pulse pressures (its RR then).
  void cycles_of(WindowAcc& acc, WindowResult& w, double start) {
    // In /min; 0: no rate.
    double rate = cycles_.set_rr ? in_per_min(*cycles_.set_rr) : 0.0;
    // With a set rate too: a modulation clearly at another rate is said (breathing above
    // the set rate, or a rate typed that is not the one set).
    w.modulation = find_pulse_modulation(acc.beats, rr_low_, rr_high_, modulation_min_beats_);
    const bool found = w.modulation && w.modulation->false_alarm <= false_alarm_max_;
    const double seen = found ? in_per_min(w.modulation->rate) : 0.0;
    if (cycles_.source == CycleSource::pulse_modulation) {
      if (found) {
        rate = seen;
        modulation_rr_.add(seen);
      } else if (!acc.beats.empty()) {
        ++windows_without_modulation_;
      }
    } else if (found && rate > 0 && std::abs(seen - rate) > rate_mismatch_ * rate) {
      ++windows_rate_mismatch_;
      mismatch_rr_.add(seen);
    }
    if (!(rate > 0)) {
      w.respiratory_rate.reset();
      return;
    }
    w.respiratory_rate = per_min(rate);
    cycle_buffer_.clear();
    cycle_ppv(acc.beats, seconds(start), w.end, seconds(60.0 / rate), min_beats_, cycle_buffer_);
    w.cycles_analysed = static_cast<std::int64_t>(cycle_buffer_.size());
    cycles_analysed_ += w.cycles_analysed;
    for (const BreathPpv& p : cycle_buffer_) {
      if (!p.ppv) continue;
      ppv_.add(in_fraction(*p.ppv));
      spv_.add(in_mmHg(*p.spv));
      acc.ppv.push_back(in_fraction(*p.ppv));
      acc.spv.push_back(in_mmHg(*p.spv));
    }
  }

  // The open window holding time t; none when that window is already closed.
  WindowAcc* window_at(double t) {
    const auto k = static_cast<std::int64_t>(std::floor((t - origin_) / window_));
    if (k < first_window_) return nullptr;
    while (first_window_ + static_cast<std::int64_t>(windows_.size()) <= k) windows_.emplace_back();
    return &windows_[static_cast<std::size_t>(k - first_window_)];
  }

  void close_window(double now, bool final) {
    WindowAcc& acc = windows_.front();
    WindowResult w;
    const double start = origin_ + static_cast<double>(first_window_) * window_;
    w.start = seconds(start);
    w.end = seconds(final ? std::min(start + window_, std::max(now, start)) : start + window_);
    w.beats = acc.tally.beats;
    w.beats_rejected = acc.tally.beats_rejected;
    w.breaths = acc.tally.breaths;
    w.heart_rate = acc.tally.hr();
    w.respiratory_rate = acc.tally.rr();
    w.cycles = cycles_.source;
    if (cycles_.source != CycleSource::breaths) cycles_of(acc, w, start);
    if (w.heart_rate && w.respiratory_rate) {
      w.hr_rr_ratio = heart_rate_to_respiratory_rate_ratio(*w.heart_rate, *w.respiratory_rate);
    }
    if (static_cast<int>(acc.ppv.size()) >= min_breaths_) {
      std::vector<double> a = acc.ppv, b = acc.ppv, c = acc.ppv;
      w.ppv = PpvSpread{fraction(median_of(a)), fraction(quantile_of(b, 0.1)),
                        fraction(quantile_of(c, 0.9)), static_cast<int>(acc.ppv.size())};
      w.spv = mmHg(median_of(acc.spv));
    }
    w.mean_airway_pressure = acc.tally.mean_paw();
    if (!acc.vt.empty()) w.vt = litre(median_of(acc.vt));
    if (w.vt && cycles_.stated.pbw) w.vt_per_kg = tidal_volume_per_kg(*w.vt, *cycles_.stated.pbw);
    std::optional<Compliance> crs;
    if (!acc.elastance.empty()) {
      const double e = median_of(acc.elastance);
      if (e > 0) crs = Compliance(1.0 / cmH2O_per_L(e));
    }
    SignalConditions k = acc.tally.conditions(pressure_, crs);
    k.vt_per_kg = w.vt_per_kg;
    k.cycles = cycles_.source;
    k.rr = w.respiratory_rate;
    w.gates = signal_ppv_gates(k, cycles_.stated, t_);
    if (w.ppv) w.reading = read_ppv(w.ppv->median, w.gates, t_);
    const bool empty = w.beats == 0 && w.breaths == 0;
    windows_.pop_front();
    ++first_window_;
    if (empty && final) return;
    ++windows_closed_;
    if (o_.on_window) o_.on_window(w);
  }

  const PipelineOptions& o_;
  const Thresholds& t_;
  double origin_, window_;
  bool pressure_;
  CycleSettings cycles_;
  Frequency rr_low_, rr_high_;
  double false_alarm_max_;
  int modulation_min_beats_;
  double rate_mismatch_;
  std::int64_t cycles_analysed_ = 0, windows_without_modulation_ = 0, windows_rate_mismatch_ = 0;
  StreamQuantiles mismatch_rr_{0.0, 100.0, 10000};  // /min, modulations away from the set rate
  std::vector<BreathPpv> cycle_buffer_;
  StreamQuantiles modulation_rr_{0.0, 100.0, 10000};  // /min, of the windows' modulations
  int min_beats_, min_breaths_;
  double swing_, min_r2_, margin_;
  double last_beat_onset_ = -std::numeric_limits<double>::infinity();
  std::deque<Beat> beats_;
  std::deque<Breath> breaths_;
  std::deque<WindowAcc> windows_;
  std::int64_t first_window_ = 0;
  std::int64_t windows_closed_ = 0;
  Tally whole_;
  StreamQuantiles ppv_{0.0, 2.0, 20000};     // fraction, 0.01 percentage point bins
  StreamQuantiles spv_{0.0, 100.0, 10000};   // mmHg
  StreamQuantiles sbp_{-50.0, 350.0, 4000};  // mmHg, 0.1 mmHg bins
  StreamQuantiles dbp_{-50.0, 350.0, 4000};
  StreamQuantiles map_{-50.0, 350.0, 4000};
  StreamQuantiles pp_{0.0, 350.0, 3500};
  StreamQuantiles ppeak_{-20.0, 100.0, 12000};  // cmH2O
  StreamQuantiles peep_{-20.0, 100.0, 12000};
  StreamQuantiles vt_{0.0, 4.0, 4000};       // L, 1 mL bins
  StreamQuantiles r_{-50.0, 200.0, 25000};   // cmH2O/L/s
  StreamQuantiles e_{-50.0, 500.0, 55000};   // cmH2O/L
  StreamQuantiles p0_{-50.0, 100.0, 15000};  // cmH2O
  StreamQuantiles r2_{-1.0, 1.0, 2000};
  StreamQuantiles stress_{0.0, 5.0, 5000};
};

// Samples of channel `c` in the chunk, scaled, up to time `to` (infinite: all).
void scaled(const Chunk& chunk, int c, double factor, double fs, double to,
            std::vector<double>& out) {
  out.clear();
  if (c < 0) return;
  const auto& in = chunk.samples[static_cast<std::size_t>(c)];
  std::size_t count = in.size();
  if (std::isfinite(to)) {
    const double keep = (to - chunk.start_time) * fs;
    count = std::min(count, static_cast<std::size_t>(std::max(0.0, std::ceil(keep - 1e-9))));
  }
  out.resize(count);
  for (std::size_t i = 0; i < count; ++i) out[i] = in[i] * factor;
}

}  // namespace

void check_stretch(const PipelineOptions& o, std::optional<double> length) {
  if (!length) return;
  const std::string says = "the record lasts " + format_number(*length, 1) + " s";
  const double slack = 1e-9 * std::max(1.0, *length);
  if (o.from && in_seconds(*o.from) >= *length - slack) {
    throw InputError("from", format_number(in_seconds(*o.from), 1) + " s",
                     "is at or after the end of the record (" + says + ")",
                     "a start before " + format_number(*length, 1) + " s");
  }
  if (o.to && in_seconds(*o.to) > *length + slack) {
    throw InputError(
        "to", format_number(in_seconds(*o.to), 1) + " s",
        "is after the end of the record (" + says + ")",
        "an end at or before " + format_number(*length, 1) + " s, or none for the whole record");
  }
}

namespace {}  // namespace

RecordSummary analyse_record(SignalSource& source, const PipelineOptions& options,
                             const Thresholds& t) {
  const std::vector<ChannelInfo>& channels = source.channels();
  const ChannelChoice c = choose_channels(channels, options);
  const ChannelInfo& abp = channels[static_cast<std::size_t>(c.abp)];
  const double abp_factor = channel_factor(abp, Dimension::pressure, "mmHg", "abp");

  RecordSummary s;
  s.abp_channel = abp.name;
  s.has_pressure = c.paw >= 0;
  double paw_factor = 1, flow_factor = 1, breath_fs = 0;
  int flow_channel = c.flow;
  if (s.has_pressure) {
    const ChannelInfo& paw = channels[static_cast<std::size_t>(c.paw)];
    paw_factor = channel_factor(paw, Dimension::pressure, "cmH2O", "paw");
    breath_fs = paw.fs;
    s.breath_signal = BreathSignal::airway_pressure;
    s.breath_channel = paw.name;
    if (flow_channel >= 0 && channels[static_cast<std::size_t>(flow_channel)].fs != paw.fs) {
      s.notes.push_back("flow channel not used: its sampling rate differs from airway pressure");
      flow_channel = -1;
    }
  } else if (flow_channel >= 0) {
    breath_fs = channels[static_cast<std::size_t>(flow_channel)].fs;
    s.breath_signal = BreathSignal::flow;
    s.breath_channel = channels[static_cast<std::size_t>(flow_channel)].name;
  } else if (c.resp < 0) {
    // Arterial pressure alone: no breaths; the detector is built but never fed.
    s.has_breath_channel = false;
    breath_fs = abp.fs;
    s.breath_signal = BreathSignal::respiration;
  } else {
    breath_fs = channels[static_cast<std::size_t>(c.resp)].fs;
    s.breath_signal = BreathSignal::respiration;
    s.breath_channel = channels[static_cast<std::size_t>(c.resp)].name;
  }
  if (flow_channel >= 0) {
    flow_factor = channel_factor(channels[static_cast<std::size_t>(flow_channel)], Dimension::flow,
                                 "L/s", "flow");
  }
  s.has_flow = flow_channel >= 0;
  const int resp_channel = s.breath_signal == BreathSignal::respiration ? c.resp : -1;
  s.stated = options.stated;
  s.set_rr = options.set_rr;
  s.set_rr_unused = s.has_breath_channel && options.set_rr.has_value();
  const CycleSource cycle_source = s.has_breath_channel ? CycleSource::breaths
                                   : options.set_rr     ? CycleSource::set_rate
                                                        : CycleSource::pulse_modulation;
  const int paw_channel = c.paw;

  const bool length_known = source.duration().has_value();
  check_stretch(options, source.duration());
  if (options.from) source.seek(in_seconds(*options.from));
  const double to_time =
      options.to ? in_seconds(*options.to) : std::numeric_limits<double>::infinity();
  const double window =
      in_seconds(options.window ? *options.window : t.get<Time>("waveform.window"));
  if (!(window > 0))
    throw InputError("window", format_number(window, 1) + " s", "is not positive",
                     "a window such as 30s");

  BeatDetector beats(beat_settings(t, abp.fs));
  BreathDetector breaths(
      breath_settings(t, breath_fs, s.breath_signal, s.has_pressure, s.has_flow));
  const double origin = options.from ? in_seconds(*options.from) : 0.0;
  Engine engine(options, t, origin, window, s.has_pressure,
                CycleSettings{cycle_source, s.has_breath_channel ? std::nullopt : options.set_rr,
                              options.stated});
  std::optional<Time> total;
  if (options.to)
    total = seconds(in_seconds(*options.to) - origin);
  else if (source.duration())
    total = seconds(*source.duration() - origin);

  // Two chunks in flight: while the background job finds the breaths of one,
  // this thread finds its beats and reads the next. The engine then takes the
  // chunk's beats and breaths in the same order as a single thread would, so
  // the results do not depend on the threading.
  struct Slot {
    Chunk chunk;
    std::vector<double> abp, paw, flow, resp;
    double end = 0;
    std::vector<Breath> breaths;
  };
  std::array<Slot, 2> slots;
  auto load = [&](Slot& slot) {
    if (!source.next(slot.chunk, 10.0) || slot.chunk.start_time >= to_time) return false;
    scaled(slot.chunk, c.abp, abp_factor, abp.fs, to_time, slot.abp);
    scaled(slot.chunk, paw_channel, paw_factor, breath_fs, to_time, slot.paw);
    scaled(slot.chunk, flow_channel, flow_factor, breath_fs, to_time, slot.flow);
    scaled(slot.chunk, resp_channel, 1.0, breath_fs, to_time, slot.resp);
    slot.end = std::min(to_time, slot.chunk.start_time + slot.chunk.duration);
    return true;
  };
  std::vector<Beat> new_beats;
  std::vector<Breath> new_breaths;
  double start = origin, end = origin;
  // After everything its jobs touch, so that it is joined first on the way out.
  BackgroundJob job(!source.prefers_one_thread());
  bool more = load(slots[0]);
  if (more) start = slots[0].chunk.start_time;
  for (std::size_t k = 0; more; k ^= 1) {
    Slot& slot = slots[k];
    slot.breaths.clear();
    if (s.has_breath_channel) {
      job.start([&breaths, &slot] {
        breaths.push(slot.paw, slot.flow, slot.resp, slot.chunk.start_time, slot.breaths);
      });
    }
    new_beats.clear();
    beats.push(slot.abp, slot.chunk.start_time, new_beats);
    more = load(slots[k ^ 1]);
    job.wait();
    for (const Beat& b : new_beats) engine.add_beat(b);
    for (const Breath& b : slot.breaths) engine.add_breath(b);
    end = slot.end;
    engine.advance(end, false);
    if (options.on_progress) options.on_progress(seconds(end - origin), total);
  }
  new_beats.clear();
  new_breaths.clear();
  beats.finish(new_beats);
  if (s.has_breath_channel) breaths.finish(new_breaths);
  for (const Beat& b : new_beats) engine.add_beat(b);
  for (const Breath& b : new_breaths) engine.add_breath(b);
  engine.finish(end);

  // A record that does not say its length up front (CSV) knows it once read.
  if (!length_known) check_stretch(options, source.duration());
  s.start = seconds(start);
  s.duration = seconds(std::max(0.0, end - start));
  s.beats = beats.counts();
  s = engine.summary(std::move(s));
  for (const std::string& note : source.notes()) s.notes.push_back(note);
  if (s.beats.total() == 0) s.notes.push_back("no arterial pulses found");
  if (s.breaths == 0 && s.has_breath_channel) s.notes.push_back("no breaths found");
  return s;
}

}  // namespace bb::wave
