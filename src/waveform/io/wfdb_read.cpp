// WFDB signal files (.dat), from the signal(5) page of the WFDB Programmer's
// Guide (PhysioNet): the samples of the signals stored in one file are
// interleaved frame by frame (each signal contributing its samples-per-frame
// in turn), packed in the file's storage format. Read in blocks, never whole.
#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <limits>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/wfdb.hpp"

namespace bb::wave {

namespace {

constexpr double kWfdbNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kBlockBytes = 1 << 16;

// Storage layout of a format: `bytes` hold `samples` samples.
struct Packing {
  int bytes = 2;
  int samples = 1;
};

Packing packing_of(int format) {
  switch (format) {
    case 80:
      return {1, 1};
    case 24:
      return {3, 1};
    case 32:
      return {4, 1};
    case 212:
      return {3, 2};
    case 310:
    case 311:
      return {4, 3};
    default:
      return {2, 1};  // 16, 61
  }
}

// Samples decodable from the first `bytes` bytes of an incomplete last unit
// (signal(5): a format-212 file with an odd number of samples ends in 2 bytes).
int partial_samples(int format, std::int64_t bytes) {
  if (format == 212 || format == 310) return bytes >= 2 ? 1 : 0;
  if (format == 311) return bytes >= 3 ? 2 : (bytes >= 2 ? 1 : 0);
  return 0;
}

std::int32_t sign_extend(std::uint32_t value, int bits) {
  const std::uint32_t sign = 1u << (bits - 1);
  return static_cast<std::int32_t>((value ^ sign)) - static_cast<std::int32_t>(sign);
}

// Decodes one storage unit at `b` into `out`; returns the samples it holds.
int decode_unit(int format, const std::uint8_t* b, std::int32_t* out) {
  switch (format) {
    case 16:  // 16-bit two's complement, least significant byte first
      out[0] = static_cast<std::int16_t>(b[0] | (b[1] << 8));
      return 1;
    case 61:  // 16-bit two's complement, most significant byte first
      out[0] = static_cast<std::int16_t>((b[0] << 8) | b[1]);
      return 1;
    case 80:  // 8-bit offset binary
      out[0] = static_cast<std::int32_t>(b[0]) - 128;
      return 1;
    case 24:  // 24-bit two's complement, least significant byte first
      out[0] = sign_extend(b[0] | (b[1] << 8) | (b[2] << 16), 24);
      return 1;
    case 32:  // 32-bit two's complement, least significant byte first
      out[0] = static_cast<std::int32_t>(static_cast<std::uint32_t>(b[0]) | (b[1] << 8) |
                                         (b[2] << 16) | (static_cast<std::uint32_t>(b[3]) << 24));
      return 1;
    case 212:  // two 12-bit samples in 3 bytes; byte 1 holds both high nibbles
      out[0] = sign_extend(b[0] | ((b[1] & 0x0F) << 8), 12);
      out[1] = sign_extend(b[2] | ((b[1] & 0xF0) << 4), 12);
      return 2;
    case 310: {  // three 10-bit samples in two 16-bit words (bit 0 of each unused)
      const std::uint32_t w0 = b[0] | (b[1] << 8);
      const std::uint32_t w1 = b[2] | (b[3] << 8);
      out[0] = sign_extend((w0 >> 1) & 0x3FF, 10);
      out[1] = sign_extend((w1 >> 1) & 0x3FF, 10);
      out[2] = sign_extend(((w0 >> 11) & 0x1F) | (((w1 >> 11) & 0x1F) << 5), 10);
      return 3;
    }
    case 311: {  // three 10-bit samples in bits 0-9, 10-19, 20-29 of a 32-bit word
      const std::uint32_t w = static_cast<std::uint32_t>(b[0]) | (b[1] << 8) | (b[2] << 16) |
                              (static_cast<std::uint32_t>(b[3]) << 24);
      out[0] = sign_extend(w & 0x3FF, 10);
      out[1] = sign_extend((w >> 10) & 0x3FF, 10);
      out[2] = sign_extend((w >> 20) & 0x3FF, 10);
      return 3;
    }
    default:
      return 0;
  }
}

// Decodes `units` whole storage units at `b` into `out`; returns the samples.
// The common formats get their own loops; the others go unit by unit.
std::size_t decode_units(int format, const std::uint8_t* b, std::size_t units, std::int32_t* out) {
  switch (format) {
    case 16:
      for (std::size_t u = 0; u < units; ++u, b += 2)
        out[u] = static_cast<std::int16_t>(b[0] | (b[1] << 8));
      return units;
    case 212:
      for (std::size_t u = 0; u < units; ++u, b += 3, out += 2) {
        out[0] = sign_extend(b[0] | ((b[1] & 0x0F) << 8), 12);
        out[1] = sign_extend(b[2] | ((b[1] & 0xF0) << 4), 12);
      }
      return 2 * units;
    default: {
      std::size_t done = 0;
      const int bytes = packing_of(format).bytes;
      for (std::size_t u = 0; u < units; ++u, b += bytes) {
        done += static_cast<std::size_t>(decode_unit(format, b, out + done));
      }
      return done;
    }
  }
}

// The interleaved sample stream of one signal file, decoded block by block.
class SampleStream {
 public:
  SampleStream(const std::filesystem::path& path, int format, std::int64_t offset)
      : path_(path), format_(format), offset_(offset), pack_(packing_of(format)) {
    file_.open(path, std::ios::binary);
    buffer_.resize(kBlockBytes);
    const std::int64_t size = static_cast<std::int64_t>(std::filesystem::file_size(path));
    const std::int64_t bytes = std::max<std::int64_t>(0, size - offset);
    available_ = bytes / pack_.bytes * pack_.samples + partial_samples(format, bytes % pack_.bytes);
    seek(0);
  }

  std::int64_t available() const { return available_; }

  void seek(std::int64_t sample) {
    const std::int64_t unit = sample / pack_.samples;
    file_.clear();
    file_.seekg(offset_ + unit * pack_.bytes);
    begin_ = end_ = 0;
    carry_count_ = carry_next_ = 0;
    std::array<std::int32_t, 3> skip{};
    read(skip.data(), static_cast<std::size_t>(sample % pack_.samples));
  }

  // Decodes up to `n` samples; fewer only at the end of the file.
  std::size_t read(std::int32_t* out, std::size_t n) {
    std::size_t done = 0;
    while (done < n && carry_next_ < carry_count_) out[done++] = carry_[carry_next_++];
    while (done < n) {
      if (!ensure_unit()) return done + read_partial(out + done, n - done);
      // Whole units straight into `out`: as many as are buffered and fit.
      const std::size_t buffered = (end_ - begin_) / static_cast<std::size_t>(pack_.bytes);
      const std::size_t fit = (n - done) / static_cast<std::size_t>(pack_.samples);
      const std::size_t units = std::min(buffered, fit);
      if (units > 0) {
        done += decode_units(format_, buffer_.data() + begin_, units, out + done);
        begin_ += units * static_cast<std::size_t>(pack_.bytes);
        continue;
      }
      // A unit with more samples than are still wanted: keep the rest for later.
      const int got = decode_unit(format_, buffer_.data() + begin_, carry_.data());
      begin_ += pack_.bytes;
      carry_count_ = got;
      carry_next_ = 0;
      while (done < n && carry_next_ < carry_count_) out[done++] = carry_[carry_next_++];
    }
    return done;
  }

 private:
  // True when a whole unit is buffered, reading the next block if needed.
  bool ensure_unit() {
    if (end_ - begin_ >= static_cast<std::size_t>(pack_.bytes)) return true;
    std::copy(buffer_.begin() + begin_, buffer_.begin() + end_, buffer_.begin());
    end_ -= begin_;
    begin_ = 0;
    file_.read(reinterpret_cast<char*>(buffer_.data() + end_),
               static_cast<std::streamsize>(buffer_.size() - end_));
    end_ += static_cast<std::size_t>(file_.gcount());
    return end_ - begin_ >= static_cast<std::size_t>(pack_.bytes);
  }

  // The samples of an incomplete last unit.
  std::size_t read_partial(std::int32_t* out, std::size_t n) {
    const int count = partial_samples(format_, static_cast<std::int64_t>(end_ - begin_));
    if (count == 0) return 0;
    std::array<std::uint8_t, 4> padded{};
    std::copy(buffer_.begin() + begin_, buffer_.begin() + end_, padded.begin());
    std::array<std::int32_t, 3> values{};
    decode_unit(format_, padded.data(), values.data());
    begin_ = end_;
    const std::size_t take = std::min<std::size_t>(n, static_cast<std::size_t>(count));
    std::copy_n(values.begin(), take, out);
    return take;
  }

  std::filesystem::path path_;
  int format_;
  std::int64_t offset_;
  Packing pack_;
  std::ifstream file_;
  std::vector<std::uint8_t> buffer_;
  std::size_t begin_ = 0;
  std::size_t end_ = 0;
  std::array<std::int32_t, 3> carry_{};
  int carry_count_ = 0;
  int carry_next_ = 0;
  std::int64_t available_ = 0;
};

// The signals stored in one file, decoded ahead as far as the largest skew needs.
struct Group {
  std::unique_ptr<SampleStream> stream;
  std::string file_name;
  std::vector<int> signals;  // indices into the segment's signals
  int frame_samples = 0;     // samples of all its signals in one frame
  int max_skew = 0;
  std::int64_t stored_frames = 0;
  std::int64_t pending_first = 0;                  // stored frame of pending[*][0]
  std::int64_t decoded_end = 0;                    // stored frames decoded so far
  std::vector<std::vector<std::int32_t>> pending;  // per signal of the group
  std::vector<std::int32_t> scratch;
  // header(5) checksums: sums of the stored samples of the record's frames,
  // per signal, while the file is decoded from its first frame on.
  std::vector<std::int64_t> sums;
  bool summing = true;
  bool summed = false;  // every frame of the record added
};

// `where`: the header line that names the file (or announces the length).
[[noreturn]] void truncated(const std::string& file, std::int64_t have, std::int64_t want,
                            const SourcePlace& where) {
  throw InputError("signal file", file,
                   "is truncated: it holds " + std::to_string(have) + " complete frames",
                   std::to_string(want) + " frames, as the header announces", where);
}

// One single-segment record: its header and open signal files.
class Segment {
 public:
  // Checksum mismatches found while reading go to `notes`.
  Segment(WfdbHeader header, const std::filesystem::path& hea_path, bool apply_skew,
          std::vector<std::string>& notes)
      : header_(std::move(header)), hea_(hea_path), notes_(notes) {
    if (!apply_skew) {
      for (auto& s : header_.signals) s.skew = 0;
    }
    const auto dir = hea_path.parent_path();
    for (std::size_t i = 0; i < header_.signals.size(); ++i) add_signal(dir, hea_path, i);
    frames_ = header_.frames.value_or(stored_frames());
    for (auto& g : groups_) {
      if (g.stored_frames < frames_) {
        truncated((dir / g.file_name).string(), g.stored_frames, frames_, place_of(g));
      }
    }
  }

  const WfdbHeader& header() const { return header_; }
  std::int64_t frames() const { return frames_; }

  void seek(std::int64_t frame) {
    position_ = frame;
    for (auto& g : groups_) {
      g.summing = frame == 0 && !g.summed;  // a checksum needs every sample from the first
      std::fill(g.sums.begin(), g.sums.end(), 0);
      g.pending_first = g.decoded_end = std::min(frame, g.stored_frames);
      for (auto& p : g.pending) p.clear();
      g.stream->seek(g.pending_first * g.frame_samples);
    }
  }

  // Reads `n` frames from the current position into out[signal] (physical).
  void read(std::int64_t n, std::vector<std::vector<double>>& out) {
    out.resize(header_.signals.size());
    for (std::size_t s = 0; s < header_.signals.size(); ++s) {
      const auto& spec = header_.signals[s];
      out[s].assign(static_cast<std::size_t>(n * spec.samples_per_frame), kWfdbNaN);
    }
    for (auto& g : groups_) read_group(g, n, out);
    position_ += n;
  }

 private:
  // The header line of the group's first signal.
  SourcePlace place_of(const Group& g) const {
    const auto& spec = header_.signals[static_cast<std::size_t>(g.signals.front())];
    return SourcePlace{hea_.string(), spec.line, 1};
  }

  std::int64_t stored_frames() const {
    std::int64_t frames = groups_.empty() ? 0 : std::numeric_limits<std::int64_t>::max();
    for (const auto& g : groups_) frames = std::min(frames, g.stored_frames);
    return frames;
  }

  void add_signal(const std::filesystem::path& dir, const std::filesystem::path& hea_path,
                  std::size_t index) {
    const auto& spec = header_.signals[index];
    if (spec.format == 0 || spec.file_name == "~") return;  // no samples: NaN
    const SourcePlace place{hea_path.string(), spec.line, 1};
    if (spec.file_name == "-") {
      throw InputError("signal file", spec.file_name, "standard input is not read", "a file name",
                       place);
    }
    auto it = std::find_if(groups_.begin(), groups_.end(),
                           [&](const Group& g) { return g.file_name == spec.file_name; });
    if (it == groups_.end()) it = open_group(dir, spec, place);
    if (!it->signals.empty()) check_same_layout(*it, spec, place);
    it->signals.push_back(static_cast<int>(index));
    it->pending.emplace_back();
    it->sums.push_back(0);
    it->frame_samples += spec.samples_per_frame;
    it->max_skew = std::max(it->max_skew, spec.skew);
    it->stored_frames = it->stream->available() / it->frame_samples;
  }

  void check_same_layout(const Group& g, const WfdbSignalSpec& spec,
                         const SourcePlace& place) const {
    const auto& first = header_.signals[static_cast<std::size_t>(g.signals.front())];
    if (first.format != spec.format || first.byte_offset != spec.byte_offset) {
      throw InputError("format", std::to_string(spec.format),
                       "signals in one file must share their storage format and byte offset",
                       "the format and offset of " + first.description, place);
    }
  }

  std::vector<Group>::iterator open_group(const std::filesystem::path& dir,
                                          const WfdbSignalSpec& spec, const SourcePlace& place) {
    const auto path = dir / spec.file_name;
    if (!std::filesystem::is_regular_file(path)) {
      throw InputError("signal file", path.string(),
                       "the header names a signal file that does not exist",
                       "the .dat file beside the header", place);
    }
    Group g;
    g.file_name = spec.file_name;
    // A signal line's offset must be read before the file is opened.
    g.stream = std::make_unique<SampleStream>(path, spec.format, spec.byte_offset);
    groups_.push_back(std::move(g));
    return groups_.end() - 1;
  }

  // Decodes stored frames of `g` up to `target` (or the end of the file).
  void decode_until(Group& g, std::int64_t target) {
    target = std::min(target, g.stored_frames);
    if (target <= g.decoded_end) return;
    const std::int64_t frames = target - g.decoded_end;
    g.scratch.resize(static_cast<std::size_t>(frames * g.frame_samples));
    const std::size_t got = g.stream->read(g.scratch.data(), g.scratch.size());
    if (got < g.scratch.size()) truncated(g.file_name, g.decoded_end, target, place_of(g));
    // De-interleave: each signal's samples of every frame to its own queue.
    const std::size_t count = g.signals.size();
    std::vector<std::int32_t*> to(count);
    std::vector<int> spf(count);
    for (std::size_t j = 0; j < count; ++j) {
      spf[j] = header_.signals[static_cast<std::size_t>(g.signals[j])].samples_per_frame;
      auto& queue = g.pending[j];
      const std::size_t old = queue.size();
      queue.resize(old + static_cast<std::size_t>(frames * spf[j]));
      to[j] = queue.data() + old;
    }
    const std::int32_t* in = g.scratch.data();
    for (std::int64_t f = 0; f < frames; ++f) {
      for (std::size_t j = 0; j < count; ++j) {
        for (int k = 0; k < spf[j]; ++k) *to[j]++ = *in++;
      }
    }
    if (g.summing) add_to_checksums(g, frames);
    g.decoded_end = target;
  }

  // Adds the frames just decoded (those within the record) to the sums; once
  // the last frame is in, compares each sum with the header's checksum.
  void add_to_checksums(Group& g, std::int64_t frames) {
    const std::int64_t counted = std::clamp<std::int64_t>(frames_ - g.decoded_end, 0, frames);
    const std::int32_t* in = g.scratch.data();
    for (std::int64_t f = 0; f < counted; ++f) {
      for (std::size_t j = 0; j < g.signals.size(); ++j) {
        const int spf = header_.signals[static_cast<std::size_t>(g.signals[j])].samples_per_frame;
        for (int k = 0; k < spf; ++k) g.sums[j] += *in++;
      }
    }
    if (g.decoded_end + frames < frames_) return;
    g.summing = false;
    g.summed = true;
    for (std::size_t j = 0; j < g.signals.size(); ++j) {
      const auto& spec = header_.signals[static_cast<std::size_t>(g.signals[j])];
      if (!spec.checksum_given) continue;
      const auto sum16 = static_cast<std::int16_t>(static_cast<std::uint16_t>(g.sums[j] & 0xFFFF));
      if (sum16 == spec.checksum) continue;
      notes_.push_back("signal " + spec.description + " in " + g.file_name +
                       ": the checksum of its samples (" + std::to_string(sum16) +
                       ") differs from the header's (" + std::to_string(spec.checksum) +
                       "); the signal file may be damaged or not the one the header describes");
    }
  }

  void read_group(Group& g, std::int64_t n, std::vector<std::vector<double>>& out) {
    decode_until(g, position_ + n + g.max_skew);
    for (std::size_t j = 0; j < g.signals.size(); ++j) {
      const auto s = static_cast<std::size_t>(g.signals[j]);
      const auto& spec = header_.signals[s];
      const std::int32_t invalid = wfdb_invalid_sample(spec.format);
      const auto& src = g.pending[j];
      const std::int64_t base = (position_ + spec.skew - g.pending_first) * spec.samples_per_frame;
      const std::int64_t count = static_cast<std::int64_t>(out[s].size());
      const std::int64_t have = std::min<std::int64_t>(
          count, std::max<std::int64_t>(0, static_cast<std::int64_t>(src.size()) - base));
      for (std::int64_t k = 0; k < have; ++k) {
        const std::int32_t adc = src[static_cast<std::size_t>(base + k)];
        out[s][static_cast<std::size_t>(k)] =
            adc == invalid ? kWfdbNaN : (adc - spec.baseline) / spec.gain;
      }
    }
    // Stored frames before the next position are no longer needed (skews >= 0).
    const std::int64_t drop = std::min(position_ + n, g.decoded_end) - g.pending_first;
    if (drop <= 0) return;
    for (std::size_t j = 0; j < g.signals.size(); ++j) {
      const int spf = header_.signals[static_cast<std::size_t>(g.signals[j])].samples_per_frame;
      auto& p = g.pending[j];
      p.erase(p.begin(),
              p.begin() + std::min<std::int64_t>(static_cast<std::int64_t>(p.size()), drop * spf));
    }
    g.pending_first += drop;
  }

  WfdbHeader header_;
  std::filesystem::path hea_;
  std::vector<std::string>& notes_;
  std::vector<Group> groups_;
  std::int64_t frames_ = 0;
  std::int64_t position_ = 0;
};

std::string channel_name(const WfdbSignalSpec& spec, std::size_t index) {
  return spec.description.empty() ? "signal " + std::to_string(index) : spec.description;
}

std::vector<ChannelInfo> channels_of(const WfdbHeader& h, const std::filesystem::path& hea) {
  std::vector<ChannelInfo> out;
  for (std::size_t i = 0; i < h.signals.size(); ++i) {
    const auto& s = h.signals[i];
    ChannelInfo c;
    c.name = channel_name(s, i);
    c.unit = s.units;
    c.fs = h.frame_frequency * s.samples_per_frame;
    c.role = role_from_label(c.name);
    if (!s.gain_given) {
      c.uncalibrated = SourcePlace{hea.string(), s.line, s.gain_column > 0 ? s.gain_column : 1};
    }
    out.push_back(c);
  }
  return out;
}

// A stretch of the record: one segment, or a null segment (all NaN).
struct Plan {
  std::filesystem::path hea;  // empty for a null segment
  std::int64_t first_frame = 0;
  std::int64_t frames = 0;
  int line = 0;
};

class WfdbSource final : public SignalSource {
 public:
  WfdbSource(const std::filesystem::path& hea_path, const WfdbOptions& options)
      : hea_path_(hea_path), options_(options) {
    WfdbHeader h = read_wfdb_header(hea_path);
    frame_fs_ = h.frame_frequency;
    if (h.segment_count == 0) {
      open_single(std::move(h));
    } else {
      open_multi(h);
    }
  }

  const std::vector<ChannelInfo>& channels() const override { return channels_; }
  std::optional<double> duration() const override {
    return static_cast<double>(total_frames_) / frame_fs_;
  }
  std::vector<std::string> notes() const override { return notes_; }

  void seek(double seconds) override {
    const double frame = std::floor(std::max(0.0, seconds) * frame_fs_ + 1e-9);
    position_ = std::min(total_frames_, static_cast<std::int64_t>(frame));
    current_plan_ = -1;
  }

  bool next(Chunk& chunk, double max_seconds) override {
    if (position_ >= total_frames_) return false;
    const std::size_t p = plan_at(position_);
    const Plan& plan = plans_[p];
    const std::int64_t left = plan.first_frame + plan.frames - position_;
    const auto wanted = static_cast<std::int64_t>(std::floor(max_seconds * frame_fs_ + 1e-9));
    const std::int64_t n = std::clamp<std::int64_t>(wanted, 1, left);
    chunk.start_time = static_cast<double>(position_) / frame_fs_;
    chunk.duration = static_cast<double>(n) / frame_fs_;
    chunk.samples.resize(channels_.size());
    if (plan.hea.empty()) {
      fill_null(chunk, n);
    } else {
      read_segment(p, chunk, n);
    }
    position_ += n;
    return true;
  }

 private:
  void open_single(WfdbHeader h) {
    channels_ = channels_of(h, hea_path_);
    spf_.clear();
    for (const auto& s : h.signals) spf_.push_back(s.samples_per_frame);
    single_ = std::make_unique<Segment>(std::move(h), hea_path_, options_.apply_skew, notes_);
    total_frames_ = single_->frames();
    plans_.push_back({hea_path_, 0, total_frames_, 0});
  }

  void open_multi(const WfdbHeader& h) {
    const auto dir = hea_path_.parent_path();
    std::int64_t frame = 0;
    std::optional<WfdbHeader> layout;
    std::filesystem::path layout_path;
    for (std::size_t i = 0; i < h.segments.size(); ++i) {
      const auto& seg = h.segments[i];
      if (seg.record_name == "~") {
        plans_.push_back({{}, frame, seg.frames, seg.line});
        frame += seg.frames;
        continue;
      }
      const auto path = dir / (seg.record_name + ".hea");
      if (!std::filesystem::is_regular_file(path)) {
        throw InputError("segment", path.string(),
                         "the header names a segment header that does not exist",
                         "the segment's .hea beside the record header",
                         SourcePlace{hea_path_.string(), seg.line, 1});
      }
      if (i == 0 && seg.frames == 0) {
        layout = read_wfdb_header(path);  // layout segment: signals of the whole record
        layout_path = path;
        by_label_ = true;
        continue;
      }
      if (!layout) {
        layout = read_wfdb_header(path);
        layout_path = path;
      }
      plans_.push_back({path, frame, seg.frames, seg.line});
      frame += seg.frames;
    }
    total_frames_ = frame;
    if (layout) {
      channels_ = channels_of(*layout, layout_path);
      for (auto& c : channels_) c.fs = frame_fs_ * (c.fs / layout->frame_frequency);
      for (const auto& s : layout->signals) spf_.push_back(s.samples_per_frame);
    }
  }

  std::size_t plan_at(std::int64_t frame) {
    if (current_plan_ >= 0) {
      const Plan& p = plans_[static_cast<std::size_t>(current_plan_)];
      if (frame >= p.first_frame && frame < p.first_frame + p.frames) {
        return static_cast<std::size_t>(current_plan_);
      }
    }
    std::size_t i = 0;
    while (i + 1 < plans_.size() && plans_[i].first_frame + plans_[i].frames <= frame) ++i;
    current_plan_ = static_cast<long>(i);
    open_plan(i);
    return i;
  }

  void open_plan(std::size_t i) {
    const Plan& plan = plans_[i];
    if (plan.hea.empty()) return;
    if (single_ && plans_.size() == 1) {
      single_->seek(position_ - plan.first_frame);
      return;
    }
    WfdbHeader h = read_wfdb_header(plan.hea);
    check_segment(h, plan);
    map_signals(h);
    refuse_uncalibrated_segment(h, plan);
    single_ = std::make_unique<Segment>(std::move(h), plan.hea, options_.apply_skew, notes_);
    if (single_->frames() < plan.frames) {
      truncated(plan.hea.string(), single_->frames(), plan.frames,
                SourcePlace{hea_path_.string(), plan.line, 1});
    }
    single_->seek(position_ - plan.first_frame);
  }

  void check_segment(const WfdbHeader& h, const Plan& plan) const {
    if (std::abs(h.frame_frequency - frame_fs_) > 1e-9 * frame_fs_) {
      throw InputError("sampling frequency", std::to_string(h.frame_frequency),
                       "a segment's frame rate differs from the record's",
                       std::to_string(frame_fs_), SourcePlace{plan.hea.string(), 1, 1});
    }
  }

  // A pressure or flow channel calibrated in the record's layout but not in
  // this segment (gain 0 or absent): its values there would be raw ADC units.
  void refuse_uncalibrated_segment(const WfdbHeader& h, const Plan& plan) const {
    for (std::size_t c = 0; c < channels_.size(); ++c) {
      if (mapping_[c] < 0 || channels_[c].uncalibrated) continue;
      const Role role = channels_[c].role;
      if (role != Role::arterial_pressure && role != Role::airway_pressure && role != Role::flow)
        continue;
      const auto& spec = h.signals[static_cast<std::size_t>(mapping_[c])];
      if (spec.gain_given) continue;
      throw InputError(
          "signal gain", channels_[c].name,
          "channel " + channels_[c].name + " is uncalibrated in segment " +
              plan.hea.filename().string() + " (ADC gain 0 or not given)",
          "a gain in ADC units per " + spec.units + " on every segment's line",
          SourcePlace{plan.hea.string(), spec.line, spec.gain_column > 0 ? spec.gain_column : 1});
    }
  }

  // mapping_[channel] = signal index in the open segment, or -1.
  void map_signals(const WfdbHeader& h) {
    mapping_.assign(channels_.size(), -1);
    std::vector<bool> used(h.signals.size(), false);
    for (std::size_t c = 0; c < channels_.size(); ++c) {
      for (std::size_t s = 0; s < h.signals.size(); ++s) {
        const bool match = by_label_ ? channel_name(h.signals[s], s) == channels_[c].name : s == c;
        if (!match || used[s]) continue;
        if (h.signals[s].samples_per_frame != spf_[c]) {
          throw InputError("samples per frame", std::to_string(h.signals[s].samples_per_frame),
                           "a segment's signal differs from the record layout",
                           std::to_string(spf_[c]), SourcePlace{"", h.signals[s].line, 1});
        }
        used[s] = true;
        mapping_[c] = static_cast<int>(s);
        break;
      }
    }
  }

  void fill_null(Chunk& chunk, std::int64_t n) {
    for (std::size_t c = 0; c < channels_.size(); ++c) {
      chunk.samples[c].assign(static_cast<std::size_t>(n * spf_[c]), kWfdbNaN);
    }
  }

  void read_segment(std::size_t, Chunk& chunk, std::int64_t n) {
    if (plans_.size() == 1) {
      single_->read(n, chunk.samples);
      return;
    }
    single_->read(n, segment_out_);
    for (std::size_t c = 0; c < channels_.size(); ++c) {
      if (mapping_[c] < 0) {
        chunk.samples[c].assign(static_cast<std::size_t>(n * spf_[c]), kWfdbNaN);
      } else {
        chunk.samples[c].swap(segment_out_[static_cast<std::size_t>(mapping_[c])]);
      }
    }
  }

  std::filesystem::path hea_path_;
  WfdbOptions options_;
  double frame_fs_ = 250.0;
  std::vector<ChannelInfo> channels_;
  std::vector<int> spf_;
  std::vector<Plan> plans_;
  std::vector<int> mapping_;
  bool by_label_ = false;
  std::unique_ptr<Segment> single_;
  long current_plan_ = -1;
  std::int64_t total_frames_ = 0;
  std::int64_t position_ = 0;
  std::vector<std::vector<double>> segment_out_;
  std::vector<std::string> notes_;  // checksum mismatches
};

}  // namespace

std::unique_ptr<SignalSource> open_wfdb(const std::filesystem::path& hea_path,
                                        const WfdbOptions& options) {
  return std::make_unique<WfdbSource>(hea_path, options);
}

}  // namespace bb::wave
