// WFDB writer (header(5), signal(5) of the WFDB Programmer's Guide): one
// signal file in format 16 or 212 holding all channels frame by frame, and a
// header naming it. Both written atomically; the header last, once the
// checksums and initial values are known.
#include <algorithm>
#include <charconv>
#include <cmath>
#include <ostream>

#include "breathbeat/errors.hpp"
#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/waveform/wfdb.hpp"
#include "breathbeat/waveform/writers.hpp"

namespace bb::wave {

namespace {

std::string shortest(double value) {
  char buf[32];
  const auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, value);
  return std::string(buf, ptr);
}

std::string no_spaces(std::string s, char replacement) {
  for (char& c : s) {
    if (c == ' ' || c == '\t' || c == '\n' || c == '\r') c = replacement;
  }
  return s;
}

std::string no_newlines(std::string s) {
  for (char& c : s) {
    if (c == '\n' || c == '\r') c = ' ';
  }
  return s;
}

struct Channel {
  int spf = 1;
  double gain = 1.0;
  std::int64_t baseline = 0;
  std::int64_t sum = 0;
  std::int32_t initial = 0;
  bool have_initial = false;
};

// Packs ADC values in stream order and writes them in blocks.
class Encoder {
 public:
  Encoder(std::ostream& os, int format) : os_(os), format_(format) {}

  void put(std::int32_t v) {
    if (format_ == 16) {
      bytes_.push_back(static_cast<char>(v & 0xFF));
      bytes_.push_back(static_cast<char>((v >> 8) & 0xFF));
    } else if (!has_pending_) {
      pending_ = v;
      has_pending_ = true;
    } else {  // 212: two 12-bit samples in 3 bytes
      const std::int32_t a = pending_;
      bytes_.push_back(static_cast<char>(a & 0xFF));
      bytes_.push_back(static_cast<char>(((a >> 8) & 0x0F) | (((v >> 8) & 0x0F) << 4)));
      bytes_.push_back(static_cast<char>(v & 0xFF));
      has_pending_ = false;
    }
    if (bytes_.size() >= (1u << 16)) flush();
  }

  void finish() {
    if (has_pending_) {  // an odd last sample: its 2 bytes only
      bytes_.push_back(static_cast<char>(pending_ & 0xFF));
      bytes_.push_back(static_cast<char>((pending_ >> 8) & 0x0F));
      has_pending_ = false;
    }
    flush();
  }

 private:
  void flush() {
    os_.write(bytes_.data(), static_cast<std::streamsize>(bytes_.size()));
    bytes_.clear();
  }
  std::ostream& os_;
  int format_;
  std::vector<char> bytes_;
  std::int32_t pending_ = 0;
  bool has_pending_ = false;
};

std::vector<Channel> plan_channels(const std::vector<ChannelInfo>& info,
                                   const WriteOptions& options, double frame_fs, std::int32_t dmin,
                                   std::int32_t dmax) {
  std::vector<Channel> out;
  for (std::size_t c = 0; c < info.size(); ++c) {
    Channel ch;
    const double ratio = info[c].fs / frame_fs;
    ch.spf = static_cast<int>(std::llround(ratio));
    if (std::abs(ratio - ch.spf) > 1e-9 * ratio) {
      throw InputError("--format", "wfdb", "a channel rate is not a whole multiple of the slowest",
                       "rates like 125 and 500 samples/s");
    }
    const ChannelRange r = c < options.ranges.size() && options.ranges[c] ? *options.ranges[c]
                                                                          : default_range(info[c]);
    if (!(r.max > r.min)) throw InputError("range", info[c].name, "is empty", "max > min");
    ch.gain = static_cast<double>(dmax - dmin) / (r.max - r.min);
    ch.baseline = std::llround(dmin - r.min * ch.gain);
    out.push_back(ch);
  }
  return out;
}

}  // namespace

WriteSummary write_wfdb(SignalSource& source, const std::filesystem::path& out,
                        const WriteOptions& options) {
  const auto& info = source.channels();
  if (info.empty()) throw InputError("record", "", "has no channels", "at least one channel");
  if (options.wfdb_format != 16 && options.wfdb_format != 212) {
    throw InputError("WFDB format", std::to_string(options.wfdb_format), "cannot be written",
                     "16 or 212");
  }
  const std::string name = out.stem().string();
  if (name.empty()) throw InputError("output", out.string(), "has no record name", "e.g. rec.hea");
  double frame_fs = info.front().fs;
  for (const auto& c : info) frame_fs = std::min(frame_fs, c.fs);
  const int format = options.wfdb_format;
  const std::int32_t invalid = wfdb_invalid_sample(format);
  const std::int32_t dmax = format == 16 ? 32767 : 2047;
  const std::int32_t dmin = -dmax;
  auto channels = plan_channels(info, options, frame_fs, dmin, dmax);

  const auto dir = out.parent_path();
  AtomicFile dat(dir / (name + ".dat"));
  AtomicFile hea(dir / (name + ".hea"));
  std::ostream& os = dat.stream();
  Encoder encoder(os, format);
  WriteSummary summary;
  Chunk chunk;
  while (source.next(chunk, options.chunk_seconds)) {
    const std::size_t frames =
        chunk.samples.front().size() / static_cast<std::size_t>(channels.front().spf);
    for (std::size_t f = 0; f < frames; ++f) {
      for (std::size_t c = 0; c < channels.size(); ++c) {
        Channel& ch = channels[c];
        for (int j = 0; j < ch.spf; ++j) {
          const double x =
              chunk.samples[c][f * static_cast<std::size_t>(ch.spf) + static_cast<std::size_t>(j)];
          std::int32_t adc = invalid;
          if (std::isnan(x)) {
            ++summary.missing;
          } else {
            const double raw = std::round(x * ch.gain + static_cast<double>(ch.baseline));
            if (raw < dmin || raw > dmax) ++summary.clipped;
            adc = static_cast<std::int32_t>(std::clamp<double>(raw, dmin, dmax));
          }
          if (!ch.have_initial) {
            ch.initial = adc;
            ch.have_initial = true;
          }
          ch.sum += adc;
          encoder.put(adc);
        }
      }
    }
    summary.frames += static_cast<std::int64_t>(frames);
  }
  encoder.finish();

  std::ostream& hs = hea.stream();
  hs << name << ' ' << channels.size() << ' ' << shortest(frame_fs) << ' ' << summary.frames
     << '\n';
  for (std::size_t c = 0; c < channels.size(); ++c) {
    const Channel& ch = channels[c];
    const auto checksum = static_cast<std::int16_t>(static_cast<std::uint16_t>(ch.sum & 0xFFFF));
    hs << name << ".dat " << format;
    if (ch.spf > 1) hs << 'x' << ch.spf;
    hs << ' ' << shortest(ch.gain) << '(' << ch.baseline << ")/" << no_spaces(info[c].unit, '_')
       << ' ' << (format == 16 ? 16 : 12) << " 0 " << ch.initial << ' ' << checksum << " 0 "
       << no_newlines(info[c].name) << '\n';
  }
  dat.commit();  // InputError when the disk is full; the header only after the signals
  hea.commit();
  summary.files = {hea.target(), dat.target()};
  return summary;
}

}  // namespace bb::wave
