// CSV records, streamed through a fixed buffer. The dialects read (separators,
// decimal marks, header styles, clock times) and their detection are
// documented in docs/waveform-formats.md; channel and time labels come from
// presets/channel_labels.toml.
#include <algorithm>
#include <array>
#include <cctype>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <limits>
#include <span>
#include <string_view>

#include "../background_job.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/units_parse.hpp"
#include "breathbeat/waveform/csv.hpp"

namespace bb::wave {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kBufferBytes = 1 << 20;
constexpr int kRowsForRate = 1000;     // rows used to estimate the rate from the time column
constexpr int kRowsForDecimal = 1000;  // rows looked at to tell decimal points from commas
constexpr double kDay = 86400.0;       // seconds
constexpr double kHalfDay = 43200.0;

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

bool is_time_label(const std::string& name) {
  const std::string key = presets::label_key(name);
  const auto& time = presets::channel_labels().time;
  return std::find(time.begin(), time.end(), key) != time.end();
}

// A clock time hh:mm[:ss[.fff]] (24 hours) from `p`: its seconds since midnight
// in `seconds` and where it ends, or nullptr when the text is not one.
const char* parse_clock(const char* p, const char* end, double& seconds) {
  auto digits = [&](const char* at, int n) {
    for (int i = 0; i < n; ++i)
      if (at + i >= end || at[i] < '0' || at[i] > '9') return false;
    return true;
  };
  int h = 0, m = 0;
  const auto rh = std::from_chars(p, end, h);
  if (rh.ec != std::errc() || rh.ptr - p < 1 || rh.ptr - p > 2 || rh.ptr == end || *rh.ptr != ':')
    return nullptr;
  p = rh.ptr + 1;
  if (!digits(p, 2)) return nullptr;
  std::from_chars(p, p + 2, m);
  p += 2;
  double sec = 0.0;
  if (p < end && *p == ':') {
    ++p;
    if (!digits(p, 2)) return nullptr;
    const auto rs = std::from_chars(p, end, sec, std::chars_format::fixed);
    if (rs.ec != std::errc()) return nullptr;
    p = rs.ptr;
  }
  if (h < 0 || h > 23 || m > 59 || !(sec >= 0.0 && sec < 60.0)) return nullptr;
  seconds = h * 3600.0 + m * 60.0 + sec;
  return p;
}

// Decimal commas are read by swapping ',' and '.' in a row's text: the number
// parser then reads "72,4" as 72.4, and a stray "1.5" becomes "1,5", which is
// not a number (no silent thousands separator).
void swap_marks(char* begin, char* end) {
  static const auto table = [] {
    std::array<char, 256> t{};
    for (int i = 0; i < 256; ++i) t[static_cast<std::size_t>(i)] = static_cast<char>(i);
    t[static_cast<unsigned char>(',')] = '.';
    t[static_cast<unsigned char>('.')] = ',';
    return t;
  }();
  for (char* c = begin; c != end; ++c) *c = table[static_cast<unsigned char>(*c)];
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
  double first = 0.0, last = 0.0;  // seconds (clock times: since the first midnight)
  double day = 0.0;                // clock times: seconds added for midnights crossed
  int first_line = 0, first_column = 0;
};

// What parsing rows needs to know about the file (fixed once the header and
// rate are known), and the parsing itself, which keeps no state of its own so
// that two runs of rows can be parsed at once.
struct RowRules {
  std::string file;
  int column_count = 0;
  int time_column = -1;
  static constexpr int kTrailing = -2;       // the empty column after a trailing separator
  std::vector<int> channel_of_column;        // column -> channel, -1 for time, kTrailing
  std::vector<std::string> field_of_column;  // each header cell as written
  std::string time_field = "time";
  char sep = ',';
  char decimal = '.';        // '.' or ',' (the row text has ',' and '.' swapped)
  bool clock = false;        // the time column holds clock times
  double time_factor = 1.0;  // seconds per unit of the time column
  double fs = 0.0;           // 0 while the rate is being estimated: no step check

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
      fail(line, column, time_field, shown_time(next),
           "time does not increase from the previous row",
           "times later than " + shown_time(before));
    }
    if (fs > 0.0 && std::abs(step - 1.0 / fs) > 0.5 / fs) {
      fail(line, column, time_field, shown_time(next),
           "the time step is irregular (a missing or extra row?)",
           "steps of " + std::to_string(1.0 / fs) + " s (" + std::to_string(fs) + " samples/s)");
    }
  }

 private:
  // A time as the file writes it: seconds, or the clock time of day.
  std::string shown_time(double t) const {
    if (!clock) return std::to_string(t / time_factor) + (time_factor == 1.0 ? " s" : "");
    const double day = std::fmod(t, kDay);
    const int h = static_cast<int>(day / 3600.0);
    const int m = static_cast<int>((day - h * 3600.0) / 60.0);
    char buf[32];
    std::snprintf(buf, sizeof buf, "%02d:%02d:%06.3f", h, m, day - h * 3600.0 - m * 60.0);
    return buf;
  }

  // Cells are read in place: the number parser stops where the number ends,
  // which must be the end of the cell (the separator or the end of the row,
  // after optional blanks); no separate search for the separators.
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
      ++p;  // the separator
    }
    if (index != column_count) ragged(row.line, index, static_cast<int>(row.text.size()) + 1);
  }

  [[noreturn]] void ragged(int line, int cells, int column) const {
    fail(line, column, "row", std::to_string(cells) + " cells",
         "the row has a different number of cells than the header",
         std::to_string(column_count) + " cells, as in the header");
  }

  bool is_blank(char c) const { return c == ' ' || c == '\r' || (c == '\t' && sep != '\t'); }

  // Reads the cell starting at `p`; returns where it ends (the separator or `end`).
  const char* take_cell(const char* p, const char* end, int index, int line, int column,
                        std::vector<std::vector<double>>& out, TimeTrack& time) const {
    const char* const cell = p;
    while (p < end && is_blank(*p)) ++p;
    const bool is_time = index == time_column;
    const int target = channel_of_column[static_cast<std::size_t>(index)];
    if (target == kTrailing) {  // the empty cell after a trailing separator
      if (p != end && *p != sep)
        fail(line, column, "row", std::string_view(p, static_cast<std::size_t>(end - p)),
             "has a value after the last column",
             "an empty cell: the header ends with a separator, naming no further column");
      return p;
    }
    const auto channel = static_cast<std::size_t>(target);
    if (p == end || *p == sep) {
      if (is_time)
        fail(line, column, time_field, "", "the time cell is empty",
             clock ? "a clock time such as 12:00:00.004" : "a time");
      out[channel].push_back(kNaN);
      return p;
    }
    double value = 0.0;
    const char* after = p;
    bool ok = false;
    if (is_time && clock) {
      const char* ptr = parse_clock(p, end, value);
      ok = ptr != nullptr;
      if (ok) after = ptr;
    } else {
      const auto [ptr, ec] = std::from_chars(p, end, value);
      ok = ec == std::errc();
      after = ptr;
    }
    while (after < end && is_blank(*after)) ++after;
    if (!ok || (after < end && *after != sep) || !std::isfinite(value))
      bad_number(cell, end, index, line, column);
    if (!is_time) {
      out[channel].push_back(value);
      return after;
    }
    if (clock) {
      value += time.day;
      if (time.any && value < time.last - kHalfDay) {  // past midnight
        time.day += kDay;
        value += kDay;
      }
    } else {
      value *= time_factor;
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
    const auto* stop = static_cast<const char*>(std::memchr(cell_begin, sep, row_end - cell_begin));
    std::string_view cell(cell_begin,
                          static_cast<std::size_t>((stop ? stop : row_end) - cell_begin));
    cell = trim_view(cell);
    std::string shown(cell);  // as in the file
    if (decimal == ',') swap_marks(shown.data(), shown.data() + shown.size());
    const std::string& field = field_of_column[static_cast<std::size_t>(index)];
    if (index == time_column && clock) {
      fail(line, column, field, shown, "is not a clock time",
           "a time of day such as 12:00:00.004 (hh:mm:ss, 24 hours), or a unit in the header "
           "for times in seconds (Time [s])");
    }
    double value = 0.0;
    const auto [ptr, ec] = std::from_chars(cell.data(), cell.data() + cell.size(), value);
    if (ec != std::errc() || ptr != cell.data() + cell.size()) {
      if (decimal == '.' && shown.find(',') != std::string::npos)
        fail(line, column, field, shown, "is not a number",
             "a number with a decimal point; for a file with decimal commas, --decimal comma");
      if (decimal == ',' && shown.find('.') != std::string::npos)
        fail(line, column, field, shown, "is not a number",
             "a number with a decimal comma, as read for this file; for decimal points, "
             "--decimal point");
      fail(line, column, field, shown, "is not a number", "a decimal number");
    }
    if (std::isnan(value)) {
      fail(line, column, field, shown, "is a NaN sample",
           "a number; leave the cell empty to mark a missing sample");
    }
    fail(line, column, field, shown, "is an infinite sample", "a finite number");
  }
};

// Chunks of at least this many rows are parsed in two halves at once.
constexpr std::size_t kRowsForTwoThreads = 1024;

class CsvSource final : public SignalSource {
 public:
  CsvSource(const std::filesystem::path& path, const OpenOptions& options)
      : file_(path.string()), reader_(path, path.string()) {
    if (!reader_.ok()) {
      throw InputError("record", file_, "cannot open the CSV file", "an existing, readable file");
    }
    rules_.file = file_;
    const std::string header = read_header_line();
    data_offset_ = reader_.tell();
    choose_dialect(header, options);
    read_header(header);
    set_rate(options.csv_fs);
    restart();
  }

  const std::vector<ChannelInfo>& channels() const override { return channels_; }

  // How the file was read, when that is not this project's own form: the
  // dialect (so that a detection can be checked) and the clock time of time 0.
  std::vector<std::string> notes() const override {
    std::vector<std::string> notes;
    if (rules_.sep != ',' || rules_.decimal != '.') {
      const char* sep = rules_.sep == ';' ? "semicolons" : rules_.sep == '\t' ? "tabs" : "commas";
      notes.push_back(file_ + " read as separated by " + sep +
                      (delimiter_given_ ? " (as given)" : " (detected)") + ", with decimal " +
                      (rules_.decimal == ',' ? "commas" : "points") +
                      (decimal_given_ ? " (as given)" : " (detected)") +
                      "; --delimiter and --decimal set them");
    }
    if (rules_.clock) notes.push_back("time 0 is the first row's clock time, " + first_clock_);
    return notes;
  }

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
  std::string read_header_line() {
    std::string_view line;
    bool got = reader_.next(line);
    while (got && trim_view(line).empty()) got = reader_.next(line);
    if (!got) {
      throw InputError("file", "", "the CSV file is empty",
                       "a header row such as Time [s];ART (mmHg);Paw [cmH2O]",
                       SourcePlace{file_, 1, 1});
    }
    if (line.substr(0, 3) == "\xEF\xBB\xBF") line.remove_prefix(3);  // UTF-8 byte-order mark
    header_line_ = reader_.line_number();
    return std::string(line);
  }

  // Where the header's cells start (byte offsets), split at `sep` outside quotes.
  static std::vector<std::size_t> cell_starts(std::string_view header, char sep) {
    std::vector<std::size_t> starts{0};
    bool quoted = false;
    for (std::size_t i = 0; i < header.size(); ++i) {
      if (header[i] == '"') quoted = !quoted;
      if (header[i] == sep && !quoted) starts.push_back(i + 1);
    }
    return starts;
  }

  // The separator: given, or the header's semicolons or tabs, else commas. The
  // decimal mark: given, or from the first rows (a comma separator has decimal
  // points; decimal commas there cannot be told from separators).
  void choose_dialect(const std::string& header, const OpenOptions& o) {
    const SourcePlace at_header{file_, header_line_, 1};
    if (o.csv_delimiter == ',' && o.csv_decimal == ',') {
      throw InputError("--decimal", "comma",
                       "cannot go with a comma separator: a decimal comma and a separating comma "
                       "cannot be told apart",
                       "--delimiter semicolon or --delimiter tab with --decimal comma");
    }
    char sep = ',';
    if (o.csv_delimiter) {
      sep = *o.csv_delimiter;
    } else {
      const std::size_t tabs = cell_starts(header, '\t').size() - 1;
      const std::size_t semicolons = cell_starts(header, ';').size() - 1;
      if (tabs > 0 && semicolons > 0) {
        throw InputError("--delimiter", "",
                         "the header has both tabs and semicolons: the separator cannot be told",
                         "--delimiter tab or --delimiter semicolon", at_header);
      }
      sep = tabs > 0 ? '\t' : semicolons > 0 ? ';' : ',';
    }
    rules_.sep = sep;
    delimiter_given_ = o.csv_delimiter.has_value();
    decimal_given_ = o.csv_decimal.has_value();
    const std::size_t header_cells = cell_starts(header, sep).size();

    if (sep == ',') {
      if (o.csv_decimal == ',') {
        throw InputError("--decimal", "comma",
                         "the file is read as comma-separated (no semicolon or tab in the "
                         "header): a decimal comma and a separating comma cannot be told apart",
                         "--delimiter semicolon or --delimiter tab with --decimal comma, for a "
                         "file so separated",
                         at_header);
      }
      std::string_view row;
      while (!o.csv_delimiter && reader_.next(row)) {
        if (trim_view(row).empty()) continue;
        const std::size_t cells = cell_starts(row, ',').size();
        if (cells > header_cells && row.find('.') == std::string_view::npos) {
          throw InputError(
              "--delimiter", "",
              "the first row has more commas than the header (" + std::to_string(cells) +
                  " cells for " + std::to_string(header_cells) +
                  " columns): a comma separator with decimal commas is ambiguous",
              "a file separated by semicolons or tabs (read with --delimiter semicolon "
              "--decimal comma), or one with decimal points",
              SourcePlace{file_, reader_.line_number(), 1});
        }
        break;
      }
      rules_.decimal = '.';
    } else if (o.csv_decimal) {
      rules_.decimal = *o.csv_decimal;
    } else {
      int comma_line = 0, point_line = 0, rows = 0;
      std::string_view row;
      while (rows < kRowsForDecimal && !(comma_line && point_line) && reader_.next(row)) {
        if (trim_view(row).empty()) continue;
        ++rows;
        if (!comma_line && row.find(',') != std::string_view::npos)
          comma_line = reader_.line_number();
        if (!point_line && row.find('.') != std::string_view::npos)
          point_line = reader_.line_number();
      }
      if (comma_line && point_line) {
        throw InputError("--decimal", "",
                         "the first rows hold both decimal points (line " +
                             std::to_string(point_line) + ") and decimal commas (line " +
                             std::to_string(comma_line) + "): the decimal mark cannot be told",
                         "--decimal point or --decimal comma",
                         SourcePlace{file_, std::max(comma_line, point_line), 1});
      }
      rules_.decimal = comma_line ? ',' : '.';
    }
    reader_.rewind_to(data_offset_, header_line_);
  }

  void read_header(const std::string& header) {
    const std::string_view line(header);
    const std::vector<std::size_t> starts = cell_starts(line, rules_.sep);
    for (std::size_t i = 0; i < starts.size(); ++i) {
      const std::size_t start = starts[i];
      const std::size_t stop = i + 1 < starts.size() ? starts[i + 1] - 1 : line.size();
      const std::string cell(unquote(line.substr(start, stop - start)));
      const int column = static_cast<int>(start) + 1;
      if (cell.empty() && i > 0 && i + 1 == starts.size()) {  // a trailing separator
        rules_.channel_of_column.push_back(RowRules::kTrailing);
        rules_.field_of_column.emplace_back("(after the last column)");
        continue;
      }
      const CsvColumn c = parse_csv_column(cell, file_, column, header_line_);
      add_column(c, cell, static_cast<int>(i), column);
    }
    rules_.column_count = static_cast<int>(starts.size());
    if (channels_.empty()) {
      rules_.fail(header_line_, 1, "header", line, "names no signal column",
                  "at least one signal column, such as ART (mmHg)");
    }
  }

  // A column labelled as time (presets/channel_labels.toml) with a unit of
  // time, a clock unit (hh:mm:ss) or none is the time column, and so is any column
  // whose unit is a unit of time (no signal is measured in seconds: "Zeit [s]");
  // any other is a channel.
  void add_column(const CsvColumn& c, const std::string& cell, int index, int column) {
    rules_.channel_of_column.push_back(-1);
    rules_.field_of_column.push_back(cell);
    const SourcePlace place{file_, header_line_, column};
    const UnitSpelling* time_unit = c.unit.empty() ? nullptr : find_unit(c.unit, Dimension::time);
    const bool clock = c.unit.empty() || c.unit.find(':') != std::string::npos;
    if ((is_time_label(c.name) && clock) || time_unit != nullptr) {
      if (rules_.time_column >= 0) {
        rules_.fail(header_line_, column, "header", cell, "is a second time column",
                    "one time column (the first is " + rules_.time_field + ")");
      }
      rules_.time_column = index;
      rules_.time_field = cell;
      rules_.clock = clock;
      rules_.time_factor = time_unit ? time_unit->to_si : 1.0;
      return;
    }
    ChannelInfo info;
    info.name = c.name;
    info.unit = c.unit;
    info.role = role_from_label(c.name);
    info.declared = place;
    channels_.push_back(info);
    rules_.channel_of_column.back() = static_cast<int>(channels_.size()) - 1;
  }

  void set_rate(std::optional<double> fs) {
    if (rules_.time_column >= 0 && fs) {
      throw InputError("--fs", std::to_string(*fs),
                       "the CSV file has a time column, which sets the rate",
                       "no --fs with a time column (" + rules_.time_field + ")",
                       SourcePlace{file_, header_line_, 1});
    }
    if (rules_.time_column < 0 && !fs) {
      std::string columns;
      for (const std::string& f : rules_.field_of_column)
        columns += (columns.empty() ? "" : ", ") + f;
      throw InputError("--fs", "",
                       "the CSV file has no time column and no sampling rate was given (columns: " +
                           columns + ")",
                       "a time column (a column in s, ms or min, such as Time [s], or clock times "
                       "under a time label) or --fs",
                       SourcePlace{file_, header_line_, 1});
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
      throw InputError(rules_.time_field, "",
                       "fewer than two data rows: the sampling rate is unknown",
                       "at least two rows, or --fs", SourcePlace{file_, reader_.line_number(), 1});
    }
    const double fs = static_cast<double>(n - 1) / (time_.last - time_.first);
    if (rules_.clock) {
      const std::string_view row = rows_.front().text;
      const auto starts = cell_starts(row, rules_.sep);
      const std::size_t at = starts[static_cast<std::size_t>(rules_.time_column)];
      const std::size_t stop = row.find(rules_.sep, at);
      first_clock_ = std::string(trim_view(row.substr(at, stop == row.npos ? stop : stop - at)));
      if (rules_.decimal == ',')
        swap_marks(first_clock_.data(), first_clock_.data() + first_clock_.size());
    }
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
      if (rules_.decimal == ',')
        swap_marks(text_.data() + (text_.size() - line.size()), text_.data() + text_.size());
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
    if (second_time.any && time_.any && rules_.clock) {
      // The second half counted midnights from its own first row.
      const double days = std::ceil((time_.last - kHalfDay - second_time.first) / kDay);
      if (days > 0) {
        second_time.first += days * kDay;
        second_time.last += days * kDay;
        second_time.day += days * kDay;
      }
    }
    if (second_time.any) {
      if (time_.any) {
        rules_.check_step(time_.last, second_time.first, second_time.first_line,
                          second_time.first_column);
      } else {
        time_ = second_time;
      }
    }
    if (second_error) std::rethrow_exception(second_error);
    if (second_time.any) {
      time_.last = second_time.last;
      time_.day = second_time.day;
    }
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
  bool delimiter_given_ = false, decimal_given_ = false;
  std::string first_clock_;                // the first row's clock time, as written
  std::unique_ptr<BackgroundJob> helper_;  // last: joined before what its jobs touch goes
};

}  // namespace

CsvColumn parse_csv_column(const std::string& cell, const std::string& file, int column, int line) {
  const SourcePlace place{file, line, column};
  const std::string_view text = trim_view(cell);
  const char close = !text.empty() && text.back() == ')'   ? '('
                     : !text.empty() && text.back() == ']' ? '['
                                                           : 0;
  const auto open_paren = text.find_first_of("([");
  if (close != 0) {
    const auto open = text.rfind(close);
    if (open == std::string_view::npos) {
      throw InputError("header", cell, "has a closing bracket without an opening one",
                       "name (unit) or name [unit], e.g. ART (mmHg), Paw [cmH2O]", place);
    }
    const std::string name = trim(text.substr(0, open));
    const std::string unit = trim(text.substr(open + 1, text.size() - open - 2));
    if (name.empty() || unit.empty()) {
      throw InputError("header", cell,
                       name.empty() ? "has a unit but no name" : "has empty brackets",
                       "name (unit) or name [unit], e.g. ART (mmHg), Paw [cmH2O]", place);
    }
    return {name, unit};
  }
  if (open_paren != std::string_view::npos) {
    throw InputError("header", cell, "has an opening bracket that is not closed at its end",
                     "name (unit) or name [unit], e.g. ART (mmHg), Paw [cmH2O]", place);
  }
  if (text.empty()) {
    throw InputError("header", cell, "a column has no name",
                     "every column named, e.g. Time [s], ART (mmHg), Paw [cmH2O]", place);
  }
  const auto underscore = text.rfind('_');
  if (underscore != std::string_view::npos && underscore > 0) {
    const std::string_view unit = text.substr(underscore + 1);
    if (std::any_of(unit.begin(), unit.end(),
                    [](char ch) { return std::isalpha(static_cast<unsigned char>(ch)) != 0; }))
      return {std::string(text.substr(0, underscore)), std::string(unit)};
  }
  return {std::string(text), ""};
}

std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       const OpenOptions& options) {
  return std::make_unique<CsvSource>(path, options);
}

std::unique_ptr<SignalSource> open_csv(const std::filesystem::path& path,
                                       std::optional<double> fs) {
  OpenOptions options;
  options.csv_fs = fs;
  return open_csv(path, options);
}

}  // namespace bb::wave
