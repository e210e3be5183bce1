// WFDB records (PhysioNet): a text header (.hea) and one or more binary
// signal files (.dat). Written from the open specification: the header(5) and
// signal(5) pages of the WFDB Programmer's Guide (PhysioNet).
//
// Header: a record line, then one line per signal, or for a multi-segment
// record (`name/segments`) one line per segment; `#` starts a comment.
// Signal files: samples interleaved frame by frame in one of the storage
// formats below. Physical value = (adc - baseline) / gain; the format's
// invalid-sample code becomes NaN.
#pragma once

#include <cstdint>
#include <filesystem>
#include <istream>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

// One signal line of a header (header(5)).
struct WfdbSignalSpec {
  std::string file_name;         // "~" or empty for a signal without samples
  int format = 0;                // storage format (16, 80, 212, ...)
  int samples_per_frame = 1;     // "212x4"
  int skew = 0;                  // ":4", in frames
  std::int64_t byte_offset = 0;  // "+N": bytes to skip at the start of the file
  double gain = 200.0;           // ADC units per physical unit (200 when absent or 0)
  bool gain_given = false;       // false: the signal is uncalibrated (header(5))
  int gain_column = 0;           // where the gain is (0: absent)
  int baseline = 0;              // "(b)" after the gain; ADC zero when absent
  std::string units = "mV";      // "/units" after the gain; mV when absent
  int adc_resolution = 0;        // bits
  int adc_zero = 0;
  int initial_value = 0;
  int checksum = 0;  // 16-bit sum of the signal's stored samples (header(5))
  bool checksum_given = false;
  int block_size = 0;
  std::string description;  // the signal's label, e.g. "ABP"
  int line = 0;             // header line it came from
};

// One segment line of a multi-segment header.
struct WfdbSegmentSpec {
  std::string record_name;  // "~" for a null segment (no data: a gap)
  std::int64_t frames = 0;
  int line = 0;
};

// A parsed header.
struct WfdbHeader {
  std::string record_name;
  int segment_count = 0;  // 0: single-segment record
  int signal_count = 0;
  double frame_frequency = 250.0;  // frames per second (250 when absent)
  std::optional<double> counter_frequency;
  std::optional<double> base_counter;
  std::optional<std::int64_t> frames;  // samples per signal (frames), when given
  std::string base_time;               // "HH:MM:SS", as written
  std::string base_date;               // "DD/MM/YYYY", as written
  std::vector<WfdbSignalSpec> signals;
  std::vector<WfdbSegmentSpec> segments;
  std::vector<std::string> comments;  // info lines without the leading '#'
};

// Parses a header; `file` names it in errors (InputError with line and column).
WfdbHeader parse_wfdb_header(std::istream& in, const std::string& file);
WfdbHeader read_wfdb_header(const std::filesystem::path& hea_path);

// Formats this reader decodes: 16, 61, 80, 212, 310, 311, 24, 32 and 0 (null).
bool wfdb_format_supported(int format);
// The ADC value a format uses for "no sample" (e.g. -32768 for 16, -2048 for 212).
std::int32_t wfdb_invalid_sample(int format);

// Opens a WFDB record from its .hea path (single or multi-segment). Signals are
// channels; a channel's rate is frame rate x samples per frame; skew is applied
// (the signal's samples are taken `skew` frames later in the file); samples
// beyond the end of the file after skewing are NaN. When a record is read from
// its first frame to its last, each signal's samples are checked against the
// header's checksum; a mismatch is reported in notes(), not as an error (as
// the WFDB library warns and reads on).
struct WfdbOptions {
  bool apply_skew = true;  // false: samples as stored (for checking against header checksums)
};
std::unique_ptr<SignalSource> open_wfdb(const std::filesystem::path& hea_path,
                                        const WfdbOptions& options = {});

}  // namespace bb::wave
