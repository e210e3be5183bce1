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
void apply_step_waveforms(Trial& trial, const Thresholds& limits);

}  // namespace bb
