// Writing a record (any SignalSource) as CSV, EDF+ (through EDFlib) or WFDB
// (format 16 or 212 with its .hea). Each writer streams chunk by chunk and
// writes atomically: temporary files beside the target, renamed at the end;
// on any error nothing is left behind.
#pragma once

#include <cstdint>
#include <filesystem>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

enum class RecordFormat { csv, edf, wfdb };
// "csv", "edf", "wfdb"; throws InputError naming `field`.
RecordFormat record_format_from(const std::string& word, const std::string& field = "--format");
// From the extension: .csv, .edf, .hea (or none: WFDB); nullopt if unknown.
std::optional<RecordFormat> record_format_of(const std::filesystem::path& path);

// The physical range an integer format must cover for a channel.
struct ChannelRange {
  double min = -1000.0;
  double max = 1000.0;
};
// A range suited to the channel's unit (mmHg -50..350, cmH2O -50..150,
// L/min -300..300, L/s -5..5, mL -1000..4000, mV -10..10; else -1000..1000).
ChannelRange default_range(const ChannelInfo& channel);

struct WriteOptions {
  int wfdb_format = 16;                             // 16 or 212
  std::vector<std::optional<ChannelRange>> ranges;  // per channel; default_range when absent
  double chunk_seconds = 10.0;                      // how much is read from the source at once
};

struct WriteSummary {
  std::vector<std::filesystem::path> files;  // what was written
  std::int64_t frames = 0;                   // samples of the slowest channel
  std::int64_t clipped = 0;                  // samples outside the range, stored at its limit
  std::int64_t missing = 0;                  // NaN samples (a gap)
};

// CSV: header `time_s,<name>_<unit>,...`, then one row per sample; every
// channel must share one rate. Numbers in the shortest form that reads back to
// the same double, so a CSV round trip is exact; NaN is an empty cell.
WriteSummary write_csv(SignalSource& source, const std::filesystem::path& out,
                       const WriteOptions& options = {});

// EDF+ through EDFlib, 1-second data records, 16-bit samples over each
// channel's range (quantum = range / 65535). EDF has no missing-sample code:
// NaN is written as the physical minimum. A last partial second is padded
// the same way. Needs a whole number of samples per second per channel.
WriteSummary write_edf(SignalSource& source, const std::filesystem::path& out,
                       const WriteOptions& options = {});

// WFDB: `<name>.hea` and `<name>.dat` (name from `out` without extension),
// format 16 (quantum = range / 65534) or 212 (range / 4094); gain and baseline
// chosen from the range; NaN is the format's invalid sample. Channel rates
// must be whole multiples of the slowest (samples per frame).
WriteSummary write_wfdb(SignalSource& source, const std::filesystem::path& out,
                        const WriteOptions& options = {});

WriteSummary write_record(SignalSource& source, const std::filesystem::path& out,
                          RecordFormat format, const WriteOptions& options = {});

}  // namespace bb::wave
