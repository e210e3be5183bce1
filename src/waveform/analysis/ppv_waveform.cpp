// Per-breath PPV/SPV, stream quantiles and the signal-checkable PPV gates.
// See include/breathbeat/waveform/ppv_waveform.hpp.
#include "breathbeat/waveform/ppv_waveform.hpp"

#include <algorithm>
#include <cmath>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"  // format_number

namespace bb::wave {

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

namespace {

std::string share_text(std::int64_t part, std::int64_t whole, const std::string& what) {
  return std::to_string(part) + " of " + std::to_string(whole) + " " + what;
}

}  // namespace

std::vector<Gate> signal_ppv_gates(const SignalConditions& c, const Thresholds& t) {
  PpvConditions pc;
  const double ectopic_max = in_fraction(t.get<Ratio>("waveform.ectopic_share_max"));
  const double cv_max = in_fraction(t.get<Ratio>("waveform.breath_timing_cv_max"));
  const double swing_max = in_fraction(t.get<Ratio>("waveform.swing_share_max"));
  std::string rhythm_detail, passive_detail;
  if (c.beats > 0) {
    const double share = static_cast<double>(c.beats_ectopic) / static_cast<double>(c.beats);
    pc.regular_rhythm = share <= ectopic_max;
    rhythm_detail =
        "from the signals: " + share_text(c.beats_ectopic, c.beats, "beats ectopic or irregular");
  }
  if (c.breaths > 0 && c.breath_timing_cv) {
    const bool irregular = *c.breath_timing_cv > cv_max;
    const bool swings = c.pressure_known && static_cast<double>(c.breaths_with_swing) >
                                                swing_max * static_cast<double>(c.breaths);
    passive_detail =
        "from the signals: breath timing CV " + format_number(100 * *c.breath_timing_cv, 0) + " %";
    if (c.pressure_known)
      passive_detail += ", " + share_text(c.breaths_with_swing, c.breaths,
                                          "breaths with a negative pressure swing");
    if (irregular || swings)
      pc.passive = false;
    else if (c.pressure_known)
      pc.passive = true;
  }
  // The signals can show effort or an arrhythmia, never prove their absence.
  pc.passive_from_signals = true;
  pc.rhythm_from_signals = true;
  pc.hr = c.hr;
  pc.rr = c.rr;
  pc.crs = c.crs;
  std::vector<Gate> gates = ppv_gates(pc, t);
  for (Gate& g : gates) {
    const std::string& extra = g.key == "regular_rhythm"        ? rhythm_detail
                               : g.key == "passive_ventilation" ? passive_detail
                                                                : std::string();
    if (extra.empty()) continue;
    g.detail = g.detail.empty() ? extra : g.detail + "; " + extra;
  }
  return gates;
}

}  // namespace bb::wave
