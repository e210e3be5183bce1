// `breathbeat wave FILE --format html`: the record's analysis as one
// self-contained XHTML-compatible page (inline CSS and SVG from
// breathbeat/present/svg.hpp; no scripts, fonts or images): the summary, a
// strip of arterial and airway pressure with the detected beats and breaths
// marked, and the PPV trend over the windows with its grey zone. Every plotted
// point carries the JSON output's number in data-x/data-y.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/pipeline.hpp"

namespace bb::wave {

// One channel of the strip, decimated for drawing.
struct StripSignal {
  std::string name;           // channel label in the file
  std::string unit;           // as written in the file
  std::vector<double> time;   // s from the start of the record
  std::vector<double> value;  // in the channel's unit; NaN where a sample is missing
};

// A representative stretch of the record with what was detected in it.
struct Strip {
  double start = 0.0;     // s from the start of the record
  double duration = 0.0;  // s
  std::optional<StripSignal> abp;
  std::optional<StripSignal> breath;  // airway pressure, else the breath channel used
  std::vector<Beat> beats;            // beats whose onset lies in the strip
  std::vector<Breath> breaths;        // breaths that start in the strip
};

// Where the strip lies in the analysed stretch [from, from + length): after the
// detectors' learning period when the stretch is long enough; at most 20 s.
struct StripPlace {
  double start = 0.0;
  double duration = 0.0;
};
StripPlace strip_place(double from, double length);

// Reads the strip's samples from `source` (already opened, any position): the
// arterial channel and the breath channel of `choice`, each decimated to at
// most `max_points` (the lowest and highest sample of each bucket kept, so
// that peaks survive). Beats and breaths are added by the caller.
Strip read_strip(SignalSource& source, const ChannelChoice& choice, StripPlace place,
                 std::size_t max_points = 1600);

// The page. `windows`: the trend, in order.
std::string record_html(const std::string& file, const RecordSummary& s, const Thresholds& t,
                        const std::vector<WindowResult>& windows, const Strip& strip);

}  // namespace bb::wave
