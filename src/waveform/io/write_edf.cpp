// EDF+ writer through EDFlib: edfopen_file_writeonly, edf_set_* per signal,
// then edfwrite_digital_samples data record by data record, the digital
// values rounded here from the physical ones over the channel's range. Data
// records last 1 s, or the fewest whole seconds (up to EDFlib's 60) that hold
// a whole number of samples of every channel (e.g. 2 s at 62.5 samples/s).
#include <algorithm>
#include <cmath>

#include "breathbeat/errors.hpp"
#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/waveform/writers.hpp"

extern "C" {
#include <edflib.h>
}

namespace bb::wave {

namespace {

constexpr int kDigitalMin = -32768;
constexpr int kDigitalMax = 32767;

struct EdfChannel {
  int per_record = 0;
  ChannelRange range;
  std::vector<double> pending;
};

// Closes the EDFlib handle however the writer ends.
class EdfHandle {
 public:
  explicit EdfHandle(int handle) : handle_(handle) {}
  ~EdfHandle() { close(); }
  EdfHandle(const EdfHandle&) = delete;
  EdfHandle& operator=(const EdfHandle&) = delete;
  int get() const { return handle_; }
  bool close() {
    if (handle_ < 0) return true;
    const bool ok = edfclose_file(handle_) == 0;
    handle_ = -1;
    return ok;
  }

 private:
  int handle_;
};

void check(int status, const std::string& what, const std::filesystem::path& out) {
  if (status == 0) return;
  throw InputError("output", out.string(), "EDFlib refused " + what, "a value EDF can store");
}

// Seconds per data record: the fewest whole seconds, from 1 to 60 (EDFlib's
// limit), in which every channel has a whole number of samples.
int record_seconds_for(const std::vector<ChannelInfo>& info) {
  for (int seconds = 1; seconds <= 60; ++seconds) {
    const bool whole = std::all_of(info.begin(), info.end(), [&](const ChannelInfo& c) {
      const double n = c.fs * seconds;
      return std::abs(n - std::round(n)) <= 1e-9 * n && std::round(n) >= 1;
    });
    if (whole) return seconds;
  }
  std::string rates;
  for (const auto& c : info) rates += (rates.empty() ? "" : ", ") + std::to_string(c.fs);
  throw InputError("--fs", rates,
                   "no EDF data record of 1 to 60 s holds a whole number of samples at this rate",
                   "a rate that is a whole number of samples in some whole number of seconds");
}

std::vector<EdfChannel> plan(const std::vector<ChannelInfo>& info, int record_seconds,
                             const WriteOptions& options) {
  std::vector<EdfChannel> out;
  for (std::size_t c = 0; c < info.size(); ++c) {
    EdfChannel ch;
    ch.per_record = static_cast<int>(std::llround(info[c].fs * record_seconds));
    ch.range = c < options.ranges.size() && options.ranges[c] ? *options.ranges[c]
                                                              : default_range(info[c]);
    out.push_back(ch);
  }
  return out;
}

void describe_signals(int handle, const std::vector<ChannelInfo>& info,
                      const std::vector<EdfChannel>& chans, const std::filesystem::path& out) {
  for (std::size_t c = 0; c < info.size(); ++c) {
    const int s = static_cast<int>(c);
    check(edf_set_samplefrequency(handle, s, chans[c].per_record), "the sampling rate", out);
    check(edf_set_physical_maximum(handle, s, chans[c].range.max), "the physical maximum", out);
    check(edf_set_physical_minimum(handle, s, chans[c].range.min), "the physical minimum", out);
    check(edf_set_digital_maximum(handle, s, kDigitalMax), "the digital maximum", out);
    check(edf_set_digital_minimum(handle, s, kDigitalMin), "the digital minimum", out);
    check(edf_set_label(handle, s, info[c].name.substr(0, 16).c_str()), "the label", out);
    check(edf_set_physical_dimension(handle, s, info[c].unit.substr(0, 8).c_str()), "the unit",
          out);
  }
}

// Physical to digital, rounded to the nearest level (EDFlib's physical writer
// truncates; rounding halves the worst error to half a quantum).
int to_digital(double x, const ChannelRange& r) {
  const double scaled =
      (x - r.min) / (r.max - r.min) * (double{kDigitalMax} - kDigitalMin) + kDigitalMin;
  return static_cast<int>(std::clamp(std::round(scaled), double{kDigitalMin}, double{kDigitalMax}));
}

// Writes one data record from the head of every channel's pending samples.
void write_record_from(int handle, std::vector<EdfChannel>& chans, WriteSummary& summary,
                       const std::filesystem::path& out) {
  std::vector<int> record;
  for (auto& ch : chans) {
    record.clear();
    for (int i = 0; i < ch.per_record; ++i) {
      const double x = ch.pending[static_cast<std::size_t>(i)];
      if (std::isnan(x)) {
        ++summary.missing;
        record.push_back(kDigitalMin);
        continue;
      }
      if (x < ch.range.min || x > ch.range.max) ++summary.clipped;
      record.push_back(to_digital(x, ch.range));
    }
    if (edfwrite_digital_samples(handle, record.data()) != 0) {
      throw InputError("output", out.string(), "EDFlib could not write a data record",
                       "a writable path");
    }
    ch.pending.erase(ch.pending.begin(), ch.pending.begin() + ch.per_record);
  }
}

}  // namespace

WriteSummary write_edf(SignalSource& source, const std::filesystem::path& out,
                       const WriteOptions& options) {
  const auto& info = source.channels();
  if (info.empty()) throw InputError("record", "", "has no channels", "at least one channel");
  const int record_seconds = record_seconds_for(info);
  auto chans = plan(info, record_seconds, options);
  AtomicFile file(out);  // EDFlib writes the temporary file by name; commit() fsyncs it
  EdfHandle handle(edfopen_file_writeonly(file.temp_path().c_str(), EDFLIB_FILETYPE_EDFPLUS,
                                          static_cast<int>(info.size())));
  if (handle.get() < 0) {
    throw InputError("output", out.string(), "EDFlib cannot create the file", "a writable path");
  }
  if (record_seconds != 1) {
    check(edf_set_datarecord_duration(handle.get(), record_seconds * 100000),  // 10 us units
          "the data record duration", out);
  }
  describe_signals(handle.get(), info, chans, out);
  WriteSummary summary;
  Chunk chunk;
  const auto full = [&] {
    return std::all_of(chans.begin(), chans.end(), [](const EdfChannel& ch) {
      return ch.pending.size() >= static_cast<std::size_t>(ch.per_record);
    });
  };
  while (source.next(chunk, options.chunk_seconds)) {
    for (std::size_t c = 0; c < chans.size(); ++c) {
      chans[c].pending.insert(chans[c].pending.end(), chunk.samples[c].begin(),
                              chunk.samples[c].end());
    }
    summary.frames += static_cast<std::int64_t>(chunk.samples.front().size());
    while (full()) write_record_from(handle.get(), chans, summary, out);
  }
  if (!chans.front().pending.empty()) {  // pad the last record with NaN (written as the minimum)
    for (auto& ch : chans) ch.pending.resize(static_cast<std::size_t>(ch.per_record), std::nan(""));
    write_record_from(handle.get(), chans, summary, out);
  }
  if (!handle.close())
    throw InputError("output", out.string(), "EDFlib could not finish the file", "a writable path");
  file.commit();
  summary.files.push_back(out);
  return summary;
}

}  // namespace bb::wave
