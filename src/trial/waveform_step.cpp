#include "breathbeat/trial/waveform_step.hpp"

#include <cmath>
#include <filesystem>

#include "breathbeat/waveform/pipeline.hpp"

namespace bb {

namespace {

std::filesystem::path record_path(const Trial& trial, const std::string& file) {
  std::filesystem::path p(file);
  if (p.is_absolute() || trial.file.empty()) return p;
  return std::filesystem::path(trial.file).parent_path() / p;
}

// Whole seconds, rounded half away from zero.
std::string whole_seconds(Time t) {
  const long long s = std::llround(in_seconds(t));
  return std::to_string(s) + " s";
}

std::string window_text(const TrialWaveform& w) {
  std::string out = w.start ? whole_seconds(*w.start) : "start";
  out += " to ";
  out += w.end ? whole_seconds(*w.end) : "end";
  return out;
}

std::optional<bool> gate_state(const std::vector<Gate>& gates, const std::string& key) {
  for (const Gate& g : gates) {
    if (g.key != key || g.state == GateState::unknown) continue;
    return g.state != GateState::failed;  // met or not contradicted
  }
  return std::nullopt;
}

void apply_one(const Trial& trial, TrialStep& step, const Thresholds& limits) {
  TrialWaveform& w = *step.waveform;
  const std::filesystem::path path = record_path(trial, w.file);
  wave::PipelineOptions options;
  options.from = w.start;
  options.to = w.end;
  // A record with arterial pressure alone takes its PPV over cycles of the step's set rate.
  options.set_rr = step.ventilator.rr;
  wave::RecordSummary summary;
  try {
    auto source = wave::open_record(path);
    summary = wave::analyse_record(*source, options, limits);
  } catch (const InputError& e) {
    throw InputError("step '" + step.label + "'.waveform.file", w.file,
                     "could not be analysed: " + std::string(e.what()),
                     "a readable WFDB, EDF or CSV record with arterial pressure", w.place);
  }
  TrialCirculation& c = step.circulation;
  const std::string cycles =
      summary.cycles == wave::CycleSource::breaths ? " breaths"
      : summary.cycles == wave::CycleSource::set_rate
          ? " cycles of the set rate: arterial pressure alone"
          : " cycles of the modulation found in the pulse pressure: arterial pressure alone, an "
            "estimate";
  const std::string origin =
      "'" + step.label + "': PPV from the recorded signals in " + w.file + " (" + window_text(w) +
      ", " + std::to_string(summary.breaths_with_ppv) + cycles + "), not from a monitor.";
  const bool has_pressure_ppv = c.ppv_monitor.has_value() || !c.pp_cycles.empty();
  if (summary.ppv) w.record_ppv = summary.ppv->median;
  w.record_hr = summary.heart_rate;
  w.ppv_typed = summary.ppv && has_pressure_ppv;
  w.hr_typed = summary.heart_rate && c.hr;
  if (summary.ppv && !has_pressure_ppv) {
    c.ppv_monitor = summary.ppv->median;
    c.signals_origin = origin;
  }
  if (summary.heart_rate && !c.hr) c.hr = summary.heart_rate;
  // What the signals show can fail a condition but not prove it (issue: signals
  // never turn a condition into "met").
  // A failure the signals show wins over a stated "regular" or "passive".
  const auto rhythm = gate_state(summary.gates, "regular_rhythm");
  if (rhythm == false) {
    w.rhythm_overridden = c.rhythm_regular == true;
    c.rhythm_regular = false;
  } else if (!c.rhythm_regular && rhythm) {
    c.rhythm_regular = true;
    c.rhythm_from_signals = true;
  }
  const auto passive = gate_state(summary.gates, "passive_ventilation");
  if (passive == false) {
    w.passive_overridden = c.spontaneous_effort == false;
    c.spontaneous_effort = true;
    c.passive_from_signals = false;
  } else if (!c.spontaneous_effort && passive) {
    c.spontaneous_effort = false;
    c.passive_from_signals = true;
  }
  w.analysed = true;
}

}  // namespace

void check_step_window(const Trial& trial, const TrialStep& step) {
  if (!step.waveform) return;
  const TrialWaveform& w = *step.waveform;
  std::optional<double> length;
  try {
    length = wave::open_record(record_path(trial, w.file))->duration();
  } catch (const InputError&) {
    return;  // an unreadable record is the analysis's error, with its own words
  }
  wave::PipelineOptions options;
  options.from = w.start;
  options.to = w.end;
  try {
    wave::check_stretch(options, length);
  } catch (const InputError& e) {
    const bool start = e.field() == "from";
    SourcePlace place = w.place;
    const std::string keys[] = {start ? "waveform.from" : "waveform.to",
                                start ? "waveform.start" : "waveform.end"};
    for (const std::string& key : keys) {
      if (const auto it = step.places.find(key); it != step.places.end()) place = it->second;
    }
    throw InputError("step '" + step.label + "'.waveform." + (start ? "start" : "end"), e.value(),
                     e.problem(), e.expected(), place);
  }
}

void apply_step_waveforms(Trial& trial, const Thresholds& limits) {
  for (TrialStep& step : trial.steps) {
    if (!step.waveform) continue;
    try {
      check_step_window(trial, step);
    } catch (const InputError& e) {
      step.waveform->window_refused = e;
      continue;
    }
    apply_one(trial, step, limits);
  }
}

}  // namespace bb
