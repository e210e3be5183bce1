// CSV writer: shortest round-trip numbers, streamed through one buffer.
#include <charconv>
#include <cmath>

#include "breathbeat/errors.hpp"
#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/waveform/writers.hpp"

namespace bb::wave {

namespace {

void append_number(std::string& out, double value) {
  if (std::isnan(value)) return;  // empty cell: a missing sample
  char buf[32];
  const auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, value);
  out.append(buf, ptr);
}

std::string header_cell(const ChannelInfo& c) {
  std::string cell = c.name + "_" + c.unit;
  for (char& ch : cell) {
    if (ch == ',' || ch == '"' || ch == '\n' || ch == '\r') ch = ' ';
  }
  return cell;
}

void require_one_rate(const std::vector<ChannelInfo>& channels) {
  for (const auto& c : channels) {
    if (c.fs != channels.front().fs) {
      throw InputError("--format", "csv", "the channels have different sampling rates",
                       "one rate for every channel (use EDF or WFDB)");
    }
  }
}

}  // namespace

WriteSummary write_csv(SignalSource& source, const std::filesystem::path& out,
                       const WriteOptions& options) {
  const auto& channels = source.channels();
  if (channels.empty()) throw InputError("record", "", "has no channels", "at least one channel");
  require_one_rate(channels);
  AtomicFile file(out);
  std::ostream& os = file.stream();

  std::string text = "time_s";
  for (const auto& c : channels) text += "," + header_cell(c);
  text += "\n";
  const double fs = channels.front().fs;
  WriteSummary summary;
  Chunk chunk;
  while (source.next(chunk, options.chunk_seconds)) {
    const std::size_t n = chunk.samples.front().size();
    for (std::size_t i = 0; i < n; ++i) {
      append_number(text, static_cast<double>(summary.frames + static_cast<std::int64_t>(i)) / fs);
      for (const auto& s : chunk.samples) {
        text += ',';
        append_number(text, s[i]);
        if (std::isnan(s[i])) ++summary.missing;
      }
      text += '\n';
      if (text.size() > (1u << 20)) {
        os.write(text.data(), static_cast<std::streamsize>(text.size()));
        text.clear();
      }
    }
    summary.frames += static_cast<std::int64_t>(n);
  }
  os.write(text.data(), static_cast<std::streamsize>(text.size()));
  file.commit();  // InputError when the disk is full
  summary.files.push_back(out);
  return summary;
}

}  // namespace bb::wave
