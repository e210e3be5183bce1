// CSV records, streamed through a fixed buffer. The header convention
// (`<name>_<unit>`, a `time_s` column or an explicit rate) is this project's
// own, documented in docs/waveform-formats.md.
#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstring>
#include <fstream>
#include <limits>
#include <span>
#include <string_view>

#include "../background_job.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/waveform/csv.hpp"

namespace bb::wave {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kBufferBytes = 1 << 20;
constexpr int kRowsForRate = 1000;  // rows used to estimate the rate from the time column

std::string_view unquote(std::string_view s) {
  s = trim_view(s);
  if (s.size() >= 2 && s.front() == '"' && s.back() == '"') s = s.substr(1, s.size() - 2);
  return trim_view(s);
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
      const char* begin = buffer_.data() + begin_;
      const auto* nl = static_cast<const char*>(std::memchr(begin, '\n', end_ - begin_));
      if (nl != nullptr) {
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

// A data row's text and where it is in the file.
struct RowText {
  std::string_view text;
  int line = 0;
};

// The time stamps seen by one run of rows: the first (with where it is, for
// checking the step into it later) and the last.
struct TimeTrack {
  bool any = false;
  double first = 0.0, last = 0.0;
  int first_line = 0, first_column = 0;
};

// What parsing rows needs to know about the file (fixed once the header and
// rate are known), and the parsing itself, which keeps no state of its own so
// that two runs of rows can be parsed at once.
struct RowRules {
  std::string file;
  int column_count = 0;
  int time_column = -1;
  std::vector<int> channel_of_column;  // column -> channel, -1 for time
  std::vector<std::string> field_of_column;
  double fs = 0.0;  // 0 while the rate is being estimated: no step check

  [[noreturn]] void fail(int line, int column, const std::string& field, std::string_view value,
                         std::string problem, std::string expected) const {
    throw InputError(field, std::string(value), std::move(problem), std::move(expected),
                     SourcePlace{file, line, column});
  }

  // Parses `rows` in order, appending each channel's samples to out[channel].
  void parse(std::span<const RowText> rows, std::vector<std::vector<double>>& out,
             TimeTrack& time) const {
    for (const RowText& row : rows) parse_row(row, out, time);
  }

  // The step from the time `before` into `next` (the first time of a run).
  void check_step(double before, double next, int line, int column) const {
    const double step = next - before;
    if (step <= 0.0) {
      fail(line, column, "time_s", std::to_string(next),
           "time does not increase from the previous row",
           "times later than " + std::to_string(before) + " s");
    }
    if (fs > 0.0 && std::abs(step - 1.0 / fs) > 0.5 / fs) {
      fail(line, column, "time_s", std::to_string(next),
           "the time step is irregular (a missing or extra row?)",
           "steps of " + std::to_string(1.0 / fs) + " s (" + std::to_string(fs) + " samples/s)");
    }
  }

 private:
  // Cells are read in place: the number parser stops where the number ends,
  // which must be the end of the cell (a comma or the end of the row, after
  // optional blanks); no separate search for the commas.
  void parse_row(const RowText& row, std::vector<std::vector<double>>& out, TimeTrack& time) const {
    const char* const line = row.text.data();
    const char* const end = line + row.text.size();
    const char* p = line;
    int index = 0;
    for (;;) {
      const int column = static_cast<int>(p - line) + 1;
      if (index >= column_count) ragged(row.line, index + 1, column);
      p = take_cell(p, end, index, row.line, column, out, time);
      ++index;
      if (p == end) break;
      ++p;  // the comma
    }
    if (index != column_count) ragged(row.line, index, static_cast<int>(row.text.size()) + 1);
  }

  [[noreturn]] void ragged(int line, int cells, int column) const {
    fail(line, column, "row", std::to_string(cells) + " cells",
         "the row has a different number of cells than the header",
         std::to_string(column_count) + " cells, as in the header");
  }

  static bool is_blank(char c) { return c == ' ' || c == '\t' || c == '\r'; }

  // Reads the cell starting at `p`; returns where it ends (a comma or `end`).
  const char* take_cell(const char* p, const char* end, int index, int line, int column,
                        std::vector<std::vector<double>>& out, TimeTrack& time) const {
    const char* const cell = p;
    while (p < end && is_blank(*p)) ++p;
    const bool is_time = index == time_column;
    const auto channel =
        static_cast<std::size_t>(channel_of_column[static_cast<std::size_t>(index)]);
    if (p == end || *p == ',') {
      if (is_time) fail(line, column, "time_s", "", "the time cell is empty", "a time in seconds");
      out[channel].push_back(kNaN);
      return p;
    }
    double value = 0.0;
    const auto [ptr, ec] = std::from_chars(p, end, value);
    const char* after = ptr;
    while (after < end && is_blank(*after)) ++after;
    if (ec != std::errc() || (after < end && *after != ',') || !std::isfinite(value))
      bad_number(cell, end, index, line, column);
    if (!is_time) {
      out[channel].push_back(value);
      return after;
    }
    if (time.any) {
      check_step(time.last, value, line, column);
    } else {
      time.any = true;
      time.first = value;
      time.first_line = line;
      time.first_column = column;
    }
    time.last = value;
    return after;
  }

  [[noreturn]] void bad_number(const char* cell_begin, const char* row_end, int index, int line,
                               int column) const {
    const auto* comma =
        static_cast<const char*>(std::memchr(cell_begin, ',', row_end - cell_begin));
    std::string_view cell(cell_begin,
                          static_cast<std::size_t>((comma ? comma : row_end) - cell_begin));
    cell = trim_view(cell);
    const std::string& field = field_of_column[static_cast<std::size_t>(index)];
    double value = 0.0;
    const auto [ptr, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), value);
    if (ec != std::errc() || ptr != cell.data() + cell.size())
      fail(line, column, field, cell, "is not a number", "a decimal number");
    if (std::isnan(value)) {
      fail(line, column, field, cell, "is a NaN sample",
           "a number; leave the cell empty to mark a missing sample");
    }
    fail(line, column, field, cell, "is an infinite sample", "a finite number");
  }
};

// Chunks of at least this many rows are parsed in two halves at once.
constexpr std::size_t kRowsForTwoThreads = 1024;

class CsvSource final : public SignalSource {
 public:
  CsvSource(const std::filesystem::path& path, std::optional<double> fs)
      : file_(path.string()), reader_(path, path.string()) {
    if (!reader_.ok()) {
      throw InputError("record", file_, "cannot open the CSV file", "an existing, readable file");
    }
    rules_.file = file_;
    read_header();
    data_offset_ = reader_.tell();
    set_rate(fs);
    restart();
  }

  const std::vector<ChannelInfo>& channels() const override { return channels_; }
  // Unknown until the reader has reached the last row (the file is streamed).
  std::optional<double> duration() const override {
    if (!rows_in_file_) return std::nullopt;
    return static_cast<double>(*rows_in_file_) / fs_;
  }

  void seek(double seconds) override {
    restart();
    const auto target = static_cast<std::int64_t>(std::floor(std::max(0.0, seconds) * fs_ + 1e-9));
    std::vector<std::vector<double>> skip(channels_.size());
    while (row_ < target && read_rows(std::min<std::int64_t>(target - row_, 65536), skip) > 0) {
    }
    if (row_ < target) rows_in_file_ = row_;
  }

  bool next(Chunk& chunk, double max_seconds) override {
    const auto wanted =
        std::max<std::int64_t>(1, static_cast<std::int64_t>(std::floor(max_seconds * fs_ + 1e-9)));
    const std::int64_t first = row_;
    chunk.samples.resize(channels_.size());
    const std::int64_t got = read_rows(wanted, chunk.samples);
    if (got == 0) {
      rows_in_file_ = row_;
      return false;
    }
    chunk.start_time = static_cast<double>(first) / fs_;
    chunk.duration = static_cast<double>(got) / fs_;
    return true;
  }

 private:
  void read_header() {
    std::string_view line;
    bool got = reader_.next(line);
    while (got && trim_view(line).empty()) got = reader_.next(line);
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
    rules_.column_count = index;
    if (channels_.empty()) {
      rules_.fail(header_line_, 1, "header", line, "names no signal column",
                  "at least one <name>_<unit> column");
    }
  }

  void add_column(const CsvColumn& c, int index, int column) {
    rules_.channel_of_column.push_back(-1);
    rules_.field_of_column.push_back(is_time_column(c) ? "time_s" : c.name + "_" + c.unit);
    if (is_time_column(c)) {
      if (rules_.time_column >= 0) {
        rules_.fail(header_line_, column, "header", c.name + "_" + c.unit, "has two time columns",
                    "one time_s column");
      }
      rules_.time_column = index;
      return;
    }
    ChannelInfo info;
    info.name = c.name;
    info.unit = c.unit;
    info.role = role_from_label(c.name);
    channels_.push_back(info);
    rules_.channel_of_column.back() = static_cast<int>(channels_.size()) - 1;
  }

  void set_rate(std::optional<double> fs) {
    if (rules_.time_column >= 0 && fs) {
      throw InputError("--fs", std::to_string(*fs),
                       "the CSV file has a time column, which sets the rate",
                       "no --fs with a time_s column", SourcePlace{file_, header_line_, 1});
    }
    if (rules_.time_column < 0 && !fs) {
      throw InputError("--fs", "", "the CSV file has no time column and no sampling rate was given",
                       "a time_s column or --fs", SourcePlace{file_, header_line_, 1});
    }
    if (fs && (!std::isfinite(*fs) || *fs <= 0.0)) {
      throw InputError("--fs", std::to_string(*fs), "is not a positive rate",
                       "samples per second > 0");
    }
    fs_ = fs ? *fs : rate_from_time_column();
    rules_.fs = fs_;
    for (auto& c : channels_) c.fs = fs_;
  }

  // Samples per second from the first rows' time stamps; a rate within 0.1 %
  // of a whole number is taken as that number (times printed with few decimals).
  double rate_from_time_column() {
    restart();
    std::vector<std::vector<double>> rows(channels_.size());
    const std::int64_t n = read_rows(kRowsForRate, rows);
    if (n < 2) {
      throw InputError("time_s", "", "fewer than two data rows: the sampling rate is unknown",
                       "at least two rows, or --fs", SourcePlace{file_, reader_.line_number(), 1});
    }
    const double fs = static_cast<double>(n - 1) / (time_.last - time_.first);
    const double whole = std::round(fs);
    return std::abs(fs - whole) <= 1e-3 * fs && whole > 0 ? whole : fs;
  }

  void restart() {
    reader_.rewind_to(data_offset_, header_line_);
    row_ = 0;
    time_ = TimeTrack{};
  }

  // Reads up to `n` rows into `out` (cleared first); returns rows read. The
  // rows' text is gathered first, then parsed, in two halves at once when
  // there are many.
  std::int64_t read_rows(std::int64_t n, std::vector<std::vector<double>>& out) {
    for (auto& v : out) v.clear();
    gather_rows(n);
    if (rows_.empty()) return 0;
    for (auto& v : out) v.reserve(rows_.size());
    if (rows_.size() < kRowsForTwoThreads) {
      rules_.parse(rows_, out, time_);
    } else {
      parse_in_two_halves(out);
    }
    row_ += static_cast<std::int64_t>(rows_.size());
    return static_cast<std::int64_t>(rows_.size());
  }

  // Copies the text of up to `n` non-blank rows into text_ (the reader's
  // buffer moves on while they are gathered) and points rows_ at it.
  void gather_rows(std::int64_t n) {
    text_.clear();
    rows_.clear();
    offsets_.clear();
    std::string_view line;
    while (static_cast<std::int64_t>(offsets_.size()) < n && reader_.next(line)) {
      if (trim_view(line).empty()) continue;
      offsets_.push_back({text_.size(), line.size(), reader_.line_number()});
      text_.append(line);
    }
    for (const auto& o : offsets_)
      rows_.push_back({std::string_view(text_).substr(o.at, o.size), o.line});
  }

  // The second half in the background, the first here; errors are reported
  // in file order (first half, the step between the halves, second half).
  void parse_in_two_halves(std::vector<std::vector<double>>& out) {
    if (!helper_) helper_ = std::make_unique<BackgroundJob>(true);
    const std::size_t half = rows_.size() / 2;
    const std::span<const RowText> first(rows_.data(), half);
    const std::span<const RowText> second(rows_.data() + half, rows_.size() - half);
    second_out_.resize(out.size());
    for (auto& v : second_out_) {
      v.clear();
      v.reserve(second.size());
    }
    TimeTrack second_time;
    helper_->start([&] { rules_.parse(second, second_out_, second_time); });
    std::exception_ptr first_error, second_error;
    try {
      rules_.parse(first, out, time_);
    } catch (...) {
      first_error = std::current_exception();
    }
    try {
      helper_->wait();
    } catch (...) {
      second_error = std::current_exception();
    }
    if (first_error) std::rethrow_exception(first_error);
    if (second_time.any) {
      if (time_.any) {
        rules_.check_step(time_.last, second_time.first, second_time.first_line,
                          second_time.first_column);
      } else {
        time_ = second_time;
      }
    }
    if (second_error) std::rethrow_exception(second_error);
    if (second_time.any) time_.last = second_time.last;
    for (std::size_t c = 0; c < out.size(); ++c)
      out[c].insert(out[c].end(), second_out_[c].begin(), second_out_[c].end());
  }

  struct RowPlace {
    std::size_t at = 0, size = 0;
    int line = 0;
  };

  std::string file_;
  LineReader reader_;
  RowRules rules_;
  std::vector<ChannelInfo> channels_;
  int header_line_ = 1;
  std::streamoff data_offset_ = 0;
  double fs_ = 0.0;
  std::int64_t row_ = 0;
  std::optional<std::int64_t> rows_in_file_;  // once the last row has been read
  TimeTrack time_;
  std::string text_;
  std::vector<RowPlace> offsets_;
  std::vector<RowText> rows_;
  std::vector<std::vector<double>> second_out_;
  std::unique_ptr<BackgroundJob> helper_;  // last: joined before what its jobs touch goes
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
