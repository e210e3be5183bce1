// A trial step may name a recorded waveform and a time window ([step.waveform]).
// This reads the record, runs the waveform engine over the window, and fills
// the step's PPV, heart rate and rhythm from the signals where the file did not
// give them, marking them as coming from the signals. File I/O lives here, not
// in the analysis.
#pragma once

#include "breathbeat/thresholds.hpp"
#include "breathbeat/trial/trial.hpp"

namespace bb {

// For every step with [step.waveform]: analyse the record (path relative to the
// trial file) over [start, end]. Throws InputError located at the step's
// waveform table for an unreadable record or a window without usable signals.
// A window outside its record leaves that step without its signals
// (TrialWaveform::window_refused) and the other steps are still analysed.
void apply_step_waveforms(Trial& trial, const Thresholds& limits);

// The window of `step`'s record against the record's length (the check the waveform engine
// makes before analysing, wave::check_stretch): throws InputError on "from" or "to", placed at
// the window's start or end in the file when known. An unreadable record is left to the analysis.
void check_step_window(const Trial& trial, const TrialStep& step);

}  // namespace bb
