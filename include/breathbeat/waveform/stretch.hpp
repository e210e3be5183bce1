// A stretch of a record as a record of its own: a time range, some of its
// channels, and optionally every channel at the record's highest rate (lower
// rates repeated sample by sample, as WFDB's high-resolution reading does), so
// that it can be written in another format (`wave convert`).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

struct StretchOptions {
  std::optional<double> from;         // seconds from the start; the start when absent
  std::optional<double> to;           // seconds from the start; the end when absent
  std::vector<std::string> channels;  // by name; every channel when empty (record order kept)
  bool common_rate = false;           // every channel at the highest rate
};

// Wraps `source`. Throws InputError naming "from", "to" or "channels" when the
// range lies outside the record, is empty, or a channel is not in it (the
// message lists the record's channels).
std::unique_ptr<SignalSource> select_stretch(std::unique_ptr<SignalSource> source,
                                             const StretchOptions& options);

}  // namespace bb::wave
