// Recorded signals, read in chunks so that a record of any length is processed
// in bounded memory. Readers (WFDB, EDF/EDF+, CSV) implement SignalSource;
// the analysis (beats, breaths, PPV) consumes chunks.
#pragma once

#include <filesystem>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/errors.hpp"

namespace bb::wave {

// What a channel measures, matched from its label or set with --abp, --paw, ...
enum class Role {
  arterial_pressure,
  airway_pressure,
  flow,
  volume,
  central_venous_pressure,
  oesophageal_pressure,
  respiration,
  ecg,
  other,
};
const char* to_string(Role role);

struct ChannelInfo {
  std::string name;  // label in the file, e.g. "ABP"
  std::string unit;  // unit as written in the file, e.g. "mmHg"
  double fs = 0.0;   // samples per second
  Role role = Role::other;
  // Set when the file says the channel has no calibration (a WFDB ADC gain of
  // 0 or none given): where that is said (header file, line, column). Its
  // values are raw ADC units, not physical ones.
  std::optional<SourcePlace> uncalibrated;
  // Where the file declares the channel (a CSV header cell), for errors about
  // its unit; unset when the format gives no useful place.
  std::optional<SourcePlace> declared;
};

// A stretch of the record: for each channel, its samples in physical units
// (the channel's own unit) covering [start_time, start_time + duration).
// Channels at different rates have different sample counts. A missing or
// invalid sample is NaN.
struct Chunk {
  double start_time = 0.0;                   // seconds from the start of the record
  double duration = 0.0;                     // seconds
  std::vector<std::vector<double>> samples;  // [channel][sample]
};

class SignalSource {
 public:
  virtual ~SignalSource() = default;
  virtual const std::vector<ChannelInfo>& channels() const = 0;
  // Length of the record in seconds, when the format says it.
  virtual std::optional<double> duration() const = 0;
  // Moves to `seconds` from the start (for --from).
  virtual void seek(double seconds) = 0;
  // Fills `chunk` with at most `max_seconds` of every channel; false at the end.
  virtual bool next(Chunk& chunk, double max_seconds) = 0;
  // True when the reader slows down once the process has a second thread, so
  // that the analysis should stay in one thread (see the EDF reader).
  virtual bool prefers_one_thread() const { return false; }
  // What the reader found worth telling the user that is not an error (for
  // example a WFDB checksum that does not match), once reading has ended.
  virtual std::vector<std::string> notes() const { return {}; }
};

// Options for opening a record.
struct OpenOptions {
  std::optional<double> csv_fs;  // --fs for CSV files without a time column
  // The CSV dialect when it is not to be detected: separator ',', ';' or '\t'
  // (--delimiter), decimal mark '.' or ',' (--decimal).
  std::optional<char> csv_delimiter;
  std::optional<char> csv_decimal;
};

// Opens by extension: .hea (WFDB), .edf/.bdf (EDF/EDF+ through EDFlib), .csv.
// Throws bb::InputError with file and field for anything malformed.
std::unique_ptr<SignalSource> open_record(const std::filesystem::path& path,
                                          const OpenOptions& options = {});

// The role a channel label suggests ("ABP", "ART", "Paw", "Flow", ...).
Role role_from_label(const std::string& label);

}  // namespace bb::wave
