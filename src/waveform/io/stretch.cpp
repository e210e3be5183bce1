// A stretch of a record: time range, channel subset, optional common rate.
#include "breathbeat/waveform/stretch.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

#include "breathbeat/text/strings.hpp"

namespace bb::wave {

namespace {

std::string seconds_text(double s) {
  return format_number(s, s == std::floor(s) ? 0 : 2) + " s";
}

std::string channel_list(const std::vector<ChannelInfo>& channels) {
  std::string names;
  for (const ChannelInfo& c : channels) names += (names.empty() ? "" : ", ") + c.name;
  return names;
}

// The record's channel indices the stretch keeps, in record order.
std::vector<std::size_t> chosen(const std::vector<ChannelInfo>& channels,
                                const std::vector<std::string>& names) {
  std::vector<std::size_t> keep;
  if (names.empty()) {
    for (std::size_t i = 0; i < channels.size(); ++i) keep.push_back(i);
    return keep;
  }
  for (const std::string& name : names) {
    const auto it = std::find_if(channels.begin(), channels.end(),
                                 [&](const ChannelInfo& c) { return c.name == name; });
    if (it == channels.end()) {
      throw InputError("channels", name, "is not a channel of the record",
                       "one of " + channel_list(channels));
    }
    const auto index = static_cast<std::size_t>(it - channels.begin());
    if (std::find(keep.begin(), keep.end(), index) != keep.end()) {
      throw InputError("channels", name, "is named twice", "each channel once");
    }
    keep.push_back(index);
  }
  std::sort(keep.begin(), keep.end());
  return keep;
}

class StretchSource final : public SignalSource {
 public:
  StretchSource(std::unique_ptr<SignalSource> inner, const StretchOptions& o)
      : inner_(std::move(inner)), keep_(chosen(inner_->channels(), o.channels)) {
    from_ = o.from.value_or(0.0);
    const std::optional<double> length = inner_->duration();
    if (from_ < 0)
      throw InputError("from", seconds_text(from_), "is negative", "a time from the start");
    if (length && from_ >= *length) {
      throw InputError("from", seconds_text(from_), "is at or past the end of the record",
                       "a time before the record ends at " + seconds_text(*length));
    }
    if (o.to && length && *o.to > *length) {
      throw InputError("to", seconds_text(*o.to), "is past the end of the record",
                       "a time up to the record's end at " + seconds_text(*length));
    }
    if (o.to && *o.to <= from_) {
      throw InputError("to", seconds_text(*o.to), "is not after the start of the stretch",
                       "a time later than " + seconds_text(from_));
    }
    end_ = o.to ? *o.to : length.value_or(std::numeric_limits<double>::infinity());
    for (std::size_t i : keep_) {
      channels_.push_back(inner_->channels()[i]);
      rate_ = std::max(rate_, channels_.back().fs);
    }
    if (o.common_rate) {
      common_rate_ = true;
      for (ChannelInfo& c : channels_) c.fs = rate_;
    }
    at_ = from_;
    inner_->seek(from_);
  }

  const std::vector<ChannelInfo>& channels() const override { return channels_; }
  std::optional<double> duration() const override {
    if (std::isinf(end_)) return std::nullopt;
    return end_ - from_;
  }
  void seek(double seconds) override {
    at_ = from_ + seconds;
    inner_->seek(at_);
  }
  bool prefers_one_thread() const override { return inner_->prefers_one_thread(); }
  std::vector<std::string> notes() const override { return inner_->notes(); }

  bool next(Chunk& chunk, double max_seconds) override {
    const double left = end_ - at_;
    if (left <= 0) return false;
    Chunk raw;
    if (!inner_->next(raw, std::min(max_seconds, left))) {
      if (!any_) {
        throw InputError("from", seconds_text(from_), "is at or past the end of the record",
                         "a time before the record ends");
      }
      return false;
    }
    chunk.start_time = raw.start_time - from_;
    chunk.samples.assign(keep_.size(), {});
    double duration = 0.0;
    for (std::size_t k = 0; k < keep_.size(); ++k) {
      const ChannelInfo& original = inner_->channels()[keep_[k]];
      std::vector<double> s = std::move(raw.samples[keep_[k]]);
      // Samples at or after the stretch's end are left out.
      const double room = (end_ - raw.start_time) * original.fs;
      if (room < static_cast<double>(s.size()))
        s.resize(static_cast<std::size_t>(std::max(0.0, std::ceil(room - 1e-9))));
      duration = std::max(duration, static_cast<double>(s.size()) / original.fs);
      chunk.samples[k] = common_rate_ ? repeated(s, original.fs) : std::move(s);
    }
    chunk.duration = duration;
    at_ = raw.start_time + duration;
    if (duration > 0) any_ = true;
    return duration > 0 || at_ < end_;
  }

 private:
  // `s` at fs_ samples per second, each sample held until the next one.
  std::vector<double> repeated(const std::vector<double>& s, double fs) const {
    if (fs == rate_) return s;
    const auto n =
        static_cast<std::size_t>(std::llround(static_cast<double>(s.size()) * rate_ / fs));
    std::vector<double> out(n, std::numeric_limits<double>::quiet_NaN());
    if (s.empty()) return out;
    for (std::size_t i = 0; i < n; ++i) {
      const auto j =
          static_cast<std::size_t>(std::floor(static_cast<double>(i) * fs / rate_ + 1e-9));
      out[i] = s[std::min(j, s.size() - 1)];
    }
    return out;
  }

  std::unique_ptr<SignalSource> inner_;
  std::vector<std::size_t> keep_;
  std::vector<ChannelInfo> channels_;
  double from_ = 0.0;
  double end_ = 0.0;
  double at_ = 0.0;
  double rate_ = 0.0;
  bool common_rate_ = false;
  bool any_ = false;
};

}  // namespace

std::unique_ptr<SignalSource> select_stretch(std::unique_ptr<SignalSource> source,
                                             const StretchOptions& options) {
  return std::make_unique<StretchSource>(std::move(source), options);
}

}  // namespace bb::wave
