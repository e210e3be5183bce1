// The waveform engine end to end: a record (SignalSource) to beats, breaths,
// per-breath PPV, windows and a record summary, streamed so that memory does
// not grow with the length of the record. Beats and breaths go to optional
// callbacks, windows to a callback (the command line spools them as they close),
// as typed results; breathbeat/present/wave.hpp turns them into words.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/validity.hpp"
#include "breathbeat/waveform/beats.hpp"
#include "breathbeat/waveform/breaths.hpp"
#include "breathbeat/waveform/ppv_waveform.hpp"
#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

struct PipelineOptions {
  // Channel names chosen by the user (fields abp, paw, flow, resp); empty:
  // the first channel whose role matches.
  std::string abp;
  std::string paw;
  std::string flow;
  std::string resp;
  std::optional<Time> from;
  std::optional<Time> to;
  std::optional<Time> window;  // default waveform.window
  // What the signals cannot show, as the user stated it (fields passive,
  // regular_rhythm, closed_chest, iah, rv_failure; sex and height as the PBW).
  StatedConditions stated;
  // The respiratory rate as set (field rr): with arterial pressure alone, the
  // PPV is taken over whole cycles of 60/RR s. Not used when the record has a
  // breath channel (RecordSummary::set_rr_unused).
  std::optional<Frequency> set_rr;
  // Called after each chunk with the record time analysed since the start of
  // the stretch and the stretch's length when known (progress of long runs).
  std::function<void(Time done, std::optional<Time> total)> on_progress;
  std::function<void(const Beat&)> on_beat;
  std::function<void(const Breath&, const BreathPpv&)> on_breath;
  std::function<void(const WindowResult&)> on_window;
};

// The channels the analysis uses (index into source.channels()).
struct ChannelChoice {
  int abp = -1;
  int paw = -1;
  int flow = -1;
  int resp = -1;
};
// Resolves roles and names; throws InputError for a name that matches no
// channel, for a missing arterial pressure channel, and
// for a unit the role cannot have, and for a chosen channel the file marks as
// uncalibrated (ChannelInfo::uncalibrated). The error's field is the channel's
// field id (abp, paw, flow, resp; window for a window that is not positive).
ChannelChoice choose_channels(const std::vector<ChannelInfo>& channels, const PipelineOptions& o);

struct RecordSummary {
  std::string abp_channel;
  bool has_breath_channel = true;  // false: arterial pressure alone
  std::string breath_channel;
  BreathSignal breath_signal = BreathSignal::airway_pressure;
  bool has_pressure = false;
  bool has_flow = false;
  Time start;
  Time duration;
  BeatCounts beats;
  std::int64_t breaths = 0;
  std::int64_t breaths_with_ppv = 0;
  int min_breaths = 0;  // ppv.min_breaths: fewer breaths with a PPV give no PPV
  std::optional<Frequency> heart_rate;
  std::optional<Frequency> respiratory_rate;
  std::optional<Ratio> hr_rr_ratio;
  std::optional<PpvSpread> ppv;  // over all breaths; none below min_breaths
  // Medians over accepted beats, for plausibility notes and the reader.
  std::optional<Pressure> sbp, dbp, map, pulse_pressure;
  std::optional<Pressure> spv;  // median
  std::optional<Pressure> mean_airway_pressure;
  std::optional<Pressure> ppeak;         // median
  std::optional<Pressure> peep;          // median
  std::optional<Volume> vt;              // median
  std::optional<Resistance> resistance;  // median of good fits
  std::optional<Elastance> elastance;    // median of good fits
  std::optional<Compliance> compliance;  // 1 / median elastance
  std::optional<Pressure> total_peep;    // median P0 of good fits
  std::optional<double> fit_r_squared;   // median
  std::int64_t fits = 0;
  std::optional<double> stress_index;  // median b
  std::int64_t windows = 0;
  // Where the PPV's respiratory cycles come from; without breaths, how many
  // cycles were analysed and in how many windows no respiratory modulation was
  // found (CycleSource::pulse_modulation).
  CycleSource cycles = CycleSource::breaths;
  std::int64_t cycles_analysed = 0;
  std::int64_t windows_without_modulation = 0;
  // CycleSource::set_rate: windows whose pulse pressure is clearly modulated at a rate
  // more than waveform.set_rate_mismatch from the set one, and the median of those rates.
  std::int64_t windows_rate_mismatch = 0;
  std::optional<Frequency> mismatch_rate;
  std::optional<Frequency> set_rr;         // as stated (field rr)
  bool set_rr_unused = false;              // stated, but the record has breaths
  StatedConditions stated;                 // as given
  std::optional<VolumePerMass> vt_per_kg;  // median VT over the stated PBW
  std::vector<Gate> gates;
  std::optional<Reading> reading;
  std::vector<std::string> notes;
};

// Throws InputError (field from / to) when the start is at or after the end of
// the record, or the end after it, naming the record's duration.
// A start at or after the end of the record, or an end after it (`length` in seconds, when the
// record knows it): an InputError on field "from" or "to" naming the record's length. The check
// analyse_record makes before reading.
void check_stretch(const PipelineOptions& options, std::optional<double> length);

RecordSummary analyse_record(SignalSource& source, const PipelineOptions& options,
                             const Thresholds& t);

// Presenters (the summary as an Answer and JSON, CSV and text rows, the window
// trend spool): breathbeat/present/wave.hpp.

}  // namespace bb::wave
