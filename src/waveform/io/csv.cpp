// CSV records, streamed through a fixed buffer. The header convention
// (`<name>_<unit>`, a `time_s` column or an explicit rate) is this project's
// own, documented in docs/waveform-formats.md.
#include <algorithm>
#include <charconv>
#include <cmath>
#include <fstream>
#include <limits>
#include <string_view>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/csv.hpp"

namespace bb::wave {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kBufferBytes = 1 << 20;
constexpr int kRowsForRate = 1000;  // rows used to estimate the rate from the time column

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t' || s.back() == '\r'))
    s.remove_suffix(1);
  return s;
}

std::string_view unquote(std::string_view s) {
  s = trim(s);
  if (s.size() >= 2 && s.front() == '"' && s.back() == '"') s = s.substr(1, s.size() - 2);
  return trim(s);
}

// Lines of a file through one fixed buffer.
class LineReader {
 public:
  LineReader(const std::filesystem::path& path, std::string file)
      : in_(path, std::ios::binary), file_(std::move(file)), buffer_(kBufferBytes) {}

  bool ok() const { return static_cast<bool>(in_); }
  int line_number() const { return line_; }

  bool next(std::string_view& line) {
    for (;;) {
      const auto* begin = buffer_.data() + begin_;
      const auto* end = buffer_.data() + end_;
      const auto* nl = std::find(begin, end, '\n');
      if (nl != end) {
        line = std::string_view(begin, static_cast<std::size_t>(nl - begin));
        begin_ = static_cast<std::size_t>(nl - buffer_.data()) + 1;
        ++line_;
        return true;
      }
      if (eof_) return last_line(line);
      refill();
    }
  }

  void rewind_to(std::streamoff offset, int line) {
    in_.clear();
    in_.seekg(offset);
    begin_ = end_ = 0;
    eof_ = false;
    line_ = line;
  }

  // Byte offset of the next unread line.
  std::streamoff tell() const { return consumed_ + static_cast<std::streamoff>(begin_); }

 private:
  bool last_line(std::string_view& line) {
    if (begin_ >= end_) return false;
    line = std::string_view(buffer_.data() + begin_, end_ - begin_);
    begin_ = end_;
    ++line_;
    return true;
  }

  void refill() {
    if (begin_ == 0 && end_ == buffer_.size()) {
      throw InputError("row", "", "a line is longer than the reader's buffer (1 MiB)",
                       "rows of ordinary length", SourcePlace{file_, line_ + 1, 1});
    }
    std::copy(buffer_.begin() + static_cast<long>(begin_),
              buffer_.begin() + static_cast<long>(end_), buffer_.begin());
    consumed_ += static_cast<std::streamoff>(begin_);
    end_ -= begin_;
    begin_ = 0;
    in_.read(buffer_.data() + end_, static_cast<std::streamsize>(buffer_.size() - end_));
    const auto got = static_cast<std::size_t>(in_.gcount());
    end_ += got;
    if (got == 0) eof_ = true;
  }

  std::ifstream in_;
  std::string file_;
  std::vector<char> buffer_;
  std::size_t begin_ = 0;
  std::size_t end_ = 0;
  std::streamoff consumed_ = 0;
  bool eof_ = false;
  int line_ = 0;
};

bool is_time_column(const CsvColumn& c) {
  std::string name = c.name;
  std::transform(name.begin(), name.end(), name.begin(),
                 [](unsigned char ch) { return static_cast<char>(std::tolower(ch)); });
  return (name == "time" || name == "t") && c.unit == "s";
}

class CsvSource final : public SignalSource {
 public:
  CsvSource(const std::filesystem::path& path, std::optional<double> fs)
      : file_(path.string()), reader_(path, path.string()) {
    if (!reader_.ok()) {
      throw InputError("record", file_, "cannot open the CSV file", "an existing, readable file");
    }
    read_header();
    data_offset_ = reader_.tell();
    set_rate(fs);
    restart();
  }

  const std::vector<ChannelInfo>& channels() const override { return channels_; }
  std::optional<double> duration() const override { return std::nullopt; }

  void seek(double seconds) override {
    restart();
    const auto target = static_cast<std::int64_t>(std::floor(std::max(0.0, seconds) * fs_ + 1e-9));
    std::vector<std::vector<double>> skip(channels_.size());
    while (row_ < target && read_rows(std::min<std::int64_t>(target - row_, 65536), skip) > 0) {
    }
  }

  bool next(Chunk& chunk, double max_seconds) override {
    const auto wanted =
        std::max<std::int64_t>(1, static_cast<std::int64_t>(std::floor(max_seconds * fs_ + 1e-9)));
    const std::int64_t first = row_;
    chunk.samples.resize(channels_.size());
    const std::int64_t got = read_rows(wanted, chunk.samples);
    if (got == 0) return false;
    chunk.start_time = static_cast<double>(first) / fs_;
    chunk.duration = static_cast<double>(got) / fs_;
    return true;
  }

 private:
  [[noreturn]] void fail(int column, std::string field, std::string_view value, std::string problem,
                         std::string expected) const {
    throw InputError(std::move(field), std::string(value), std::move(problem), std::move(expected),
                     SourcePlace{file_, reader_.line_number(), column});
  }

  void read_header() {
    std::string_view line;
    bool got = reader_.next(line);
    while (got && trim(line).empty()) got = reader_.next(line);
    if (!got) {
      throw InputError("file", "", "the CSV file is empty",
                       "a header row such as time_s,abp_mmHg,paw_cmH2O", SourcePlace{file_, 1, 1});
    }
    if (line.substr(0, 3) == "\xEF\xBB\xBF") line.remove_prefix(3);  // UTF-8 byte-order mark
    header_line_ = reader_.line_number();
    std::size_t start = 0;
    int index = 0;
    for (;;) {
      const auto comma = line.find(',', start);
      const auto cell =
          unquote(line.substr(start, comma == std::string_view::npos ? comma : comma - start));
      const CsvColumn c = parse_csv_column(std::string(cell), file_, static_cast<int>(start) + 1);
      add_column(c, index++, static_cast<int>(start) + 1);
      if (comma == std::string_view::npos) break;
      start = comma + 1;
    }
    column_count_ = index;
    if (channels_.empty())
      fail(1, "header", line, "names no signal column", "at least one <name>_<unit> column");
  }

  void add_column(const CsvColumn& c, int index, int column) {
    if (is_time_column(c)) {
      if (time_column_ >= 0)
        fail(column, "header", c.name + "_" + c.unit, "has two time columns", "one time_s column");
      time_column_ = index;
      return;
    }
    ChannelInfo info;
    info.name = c.name;
    info.unit = c.unit;
    info.role = role_from_label(c.name);
    channels_.push_back(info);
    channel_of_column_.resize(static_cast<std::size_t>(index) + 1, -1);
    channel_of_column_[static_cast<std::size_t>(index)] = static_cast<int>(channels_.size()) - 1;
  }

  void set_rate(std::optional<double> fs) {
    if (time_column_ >= 0 && fs) {
      throw InputError("--fs", std::to_string(*fs),
                       "the CSV file has a time column, which sets the rate",
                       "no --fs with a time_s column", SourcePlace{file_, header_line_, 1});
    }
    if (time_column_ < 0 && !fs) {
      throw InputError("--fs", "", "the CSV file has no time column and no sampling rate was given",
                       "a time_s column or --fs", SourcePlace{file_, header_line_, 1});
    }
    if (fs && (!std::isfinite(*fs) || *fs <= 0.0)) {
      throw InputError("--fs", std::to_string(*fs), "is not a positive rate",
                       "samples per second > 0");
    }
    fs_ = fs ? *fs : rate_from_time_column();
    for (auto& c : channels_) c.fs = fs_;
  }

  // Samples per second from the first rows' time stamps; a rate within 0.1 %
  // of a whole number is taken as that number (times printed with few decimals).
  double rate_from_time_column() {
    restart();
    std::vector<std::vector<double>> rows(channels_.size());
    estimating_ = true;
    const std::int64_t n = read_rows(kRowsForRate, rows);
    estimating_ = false;
    if (n < 2) {
      throw InputError("time_s", "", "fewer than two data rows: the sampling rate is unknown",
                       "at least two rows, or --fs", SourcePlace{file_, reader_.line_number(), 1});
    }
    const double fs = static_cast<double>(n - 1) / (last_time_ - first_time_);
    const double whole = std::round(fs);
    return std::abs(fs - whole) <= 1e-3 * fs && whole > 0 ? whole : fs;
  }

  void restart() {
    reader_.rewind_to(data_offset_, header_line_);
    row_ = 0;
  }

  // Reads up to `n` rows, appending to `out` (cleared first); returns rows read.
  std::int64_t read_rows(std::int64_t n, std::vector<std::vector<double>>& out) {
    for (auto& v : out) v.clear();
    std::string_view line;
    std::int64_t got = 0;
    while (got < n && reader_.next(line)) {
      if (trim(line).empty()) continue;
      parse_row(line, out);
      ++got;
      ++row_;
    }
    return got;
  }

  void parse_row(std::string_view line, std::vector<std::vector<double>>& out) {
    std::size_t start = 0;
    int index = 0;
    for (;;) {
      const auto comma = line.find(',', start);
      const std::string_view cell =
          line.substr(start, comma == std::string_view::npos ? comma : comma - start);
      if (index >= column_count_) ragged(index + 1, static_cast<int>(start) + 1);
      take_cell(cell, index, static_cast<int>(start) + 1, out);
      ++index;
      if (comma == std::string_view::npos) break;
      start = comma + 1;
    }
    if (index != column_count_) ragged(index, static_cast<int>(line.size()) + 1);
  }

  [[noreturn]] void ragged(int cells, int column) const {
    fail(column, "row", std::to_string(cells) + " cells",
         "the row has a different number of cells than the header",
         std::to_string(column_count_) + " cells, as in the header");
  }

  void take_cell(std::string_view raw, int index, int column,
                 std::vector<std::vector<double>>& out) {
    const std::string_view cell = trim(raw);
    const bool is_time = index == time_column_;
    if (cell.empty()) {
      if (is_time) fail(column, "time_s", "", "the time cell is empty", "a time in seconds");
      out[static_cast<std::size_t>(channel_of_column_[static_cast<std::size_t>(index)])].push_back(
          kNaN);
      return;
    }
    double value = 0.0;
    const auto* end = cell.data() + cell.size();
    const auto [ptr, ec] = std::from_chars(cell.data(), end, value);
    if (ec != std::errc() || ptr != end || !std::isfinite(value)) bad_number(cell, index, column);
    if (is_time) {
      check_time(value, column);
      return;
    }
    out[static_cast<std::size_t>(channel_of_column_[static_cast<std::size_t>(index)])].push_back(
        value);
  }

  [[noreturn]] void bad_number(std::string_view cell, int index, int column) const {
    const std::string field = index == time_column_ ? "time_s" : column_name(index);
    double value = 0.0;
    const auto* end = cell.data() + cell.size();
    const auto [ptr, ec] = std::from_chars(cell.data(), end, value);
    if (ec != std::errc() || ptr != end)
      fail(column, field, cell, "is not a number", "a decimal number");
    if (std::isnan(value)) {
      fail(column, field, cell, "is a NaN sample",
           "a number; leave the cell empty to mark a missing sample");
    }
    fail(column, field, cell, "is an infinite sample", "a finite number");
  }

  std::string column_name(int index) const {
    const auto& c =
        channels_[static_cast<std::size_t>(channel_of_column_[static_cast<std::size_t>(index)])];
    return c.name + "_" + c.unit;
  }

  void check_time(double t, int column) {
    if (row_ == 0) {
      first_time_ = last_time_ = t;
      return;
    }
    const double step = t - last_time_;
    if (step <= 0.0) {
      fail(column, "time_s", std::to_string(t), "time does not increase from the previous row",
           "times later than " + std::to_string(last_time_) + " s");
    }
    if (!estimating_ && std::abs(step - 1.0 / fs_) > 0.5 / fs_) {
      fail(column, "time_s", std::to_string(t),
           "the time step is irregular (a missing or extra row?)",
           "steps of " + std::to_string(1.0 / fs_) + " s (" + std::to_string(fs_) + " samples/s)");
    }
    last_time_ = t;
  }

  std::string file_;
  LineReader reader_;
  std::vector<ChannelInfo> channels_;
  std::vector<int> channel_of_column_;  // column -> channel, -1 for time
  int column_count_ = 0;
  int time_column_ = -1;
  int header_line_ = 1;
  std::streamoff data_offset_ = 0;
  double fs_ = 0.0;
  std::int64_t row_ = 0;
  double first_time_ = 0.0;
  double last_time_ = 0.0;
  bool estimating_ = false;
};

}  // namespace

CsvColumn parse_csv_column(const std::string& cell, const std::string& file, int column) {
  const auto underscore = cell.rfind('_');
  if (underscore == std::string::npos || underscore == 0 || underscore + 1 == cell.size()) {
    throw InputError("header", cell, "a column must be named <name>_<unit>",
                     "e.g. time_s, abp_mmHg, paw_cmH2O, flow_L/min", SourcePlace{file, 1, column});
  }
  return {cell.substr(0, underscore), cell.substr(underscore + 1)};
}

std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       std::optional<double> fs) {
  return std::make_unique<CsvSource>(path, fs);
}

}  // namespace bb::wave
