// WFDB header (.hea) parsing, from the header(5) page of the WFDB
// Programmer's Guide (PhysioNet). Record line:
//   name[/segments] signals [frequency[/counter[(base)]] [frames [time [date]]]]
// Signal line:
//   file format[xspf][:skew][+offset] [gain[(baseline)][/units] [resolution
//   [zero [initial [checksum [blocksize [description]]]]]]]
// Segment line (multi-segment records): name frames.
#include <cerrno>
#include <charconv>
#include <cmath>
#include <fstream>
#include <string_view>

#include "breathbeat/errors.hpp"
#include "breathbeat/waveform/wfdb.hpp"

namespace bb::wave {

namespace {

// Reader limit, not a rule of header(5): no signal of a bedside record is
// sampled faster than this (common practice, no source); a header claiming
// more is taken as damaged rather than read into memory.
constexpr double kMaxSamplesPerSecond = 1e6;

struct Token {
  std::string_view text;
  int column = 0;  // 1-based
};

struct LineContext {
  const std::string& file;
  int line;
  std::string_view raw;
};

std::vector<Token> split_tokens(std::string_view line) {
  std::vector<Token> out;
  std::size_t i = 0;
  while (i < line.size()) {
    while (i < line.size() && (line[i] == ' ' || line[i] == '\t' || line[i] == '\r')) ++i;
    if (i >= line.size()) break;
    const std::size_t start = i;
    while (i < line.size() && line[i] != ' ' && line[i] != '\t' && line[i] != '\r') ++i;
    out.push_back({line.substr(start, i - start), static_cast<int>(start) + 1});
  }
  return out;
}

[[noreturn]] void fail(const LineContext& ctx, int column, std::string field,
                       std::string_view value, std::string problem, std::string expected) {
  throw InputError(std::move(field), std::string(value), std::move(problem), std::move(expected),
                   SourcePlace{ctx.file, ctx.line, column});
}

template <class T>
T parse_whole(const LineContext& ctx, const Token& token, std::string_view text,
              const char* field) {
  T value{};
  const auto* end = text.data() + text.size();
  auto [ptr, ec] = std::from_chars(text.data(), end, value);
  if (text.empty() || ec != std::errc() || ptr != end) {
    fail(ctx, token.column, field, token.text, "is not a whole number", "an integer");
  }
  return value;
}

double parse_real(const LineContext& ctx, const Token& token, std::string_view text,
                  const char* field) {
  double value = 0.0;
  const auto* end = text.data() + text.size();
  auto [ptr, ec] = std::from_chars(text.data(), end, value);
  if (text.empty() || ec != std::errc() || ptr != end || !std::isfinite(value)) {
    fail(ctx, token.column, field, token.text, "is not a number", "a finite decimal number");
  }
  return value;
}

// "name" or "name/segments".
void parse_record_name(const LineContext& ctx, const Token& token, WfdbHeader& h) {
  const auto slash = token.text.find('/');
  h.record_name = std::string(token.text.substr(0, slash));
  if (slash == std::string_view::npos) return;
  h.segment_count = parse_whole<int>(ctx, token, token.text.substr(slash + 1), "segments");
  if (h.segment_count < 1) {
    fail(ctx, token.column, "segments", token.text, "names no segments", "at least 1 segment");
  }
}

// "frequency[/counter[(base)]]".
void parse_frequency(const LineContext& ctx, const Token& token, WfdbHeader& h) {
  std::string_view text = token.text;
  const auto slash = text.find('/');
  h.frame_frequency = parse_real(ctx, token, text.substr(0, slash), "sampling frequency");
  if (h.frame_frequency <= 0.0) {
    fail(ctx, token.column, "sampling frequency", token.text, "is not positive",
         "frames per second > 0");
  }
  if (h.frame_frequency > kMaxSamplesPerSecond) {
    fail(ctx, token.column, "sampling frequency", token.text, "is higher than this reader accepts",
         "at most 1000000 frames per second");
  }
  if (slash == std::string_view::npos) return;
  std::string_view counter = text.substr(slash + 1);
  const auto paren = counter.find('(');
  h.counter_frequency = parse_real(ctx, token, counter.substr(0, paren), "counter frequency");
  if (paren == std::string_view::npos) return;
  if (counter.back() != ')') {
    fail(ctx, token.column, "base counter", token.text, "has no closing parenthesis",
         "frequency/counter(base)");
  }
  h.base_counter =
      parse_real(ctx, token, counter.substr(paren + 1, counter.size() - paren - 2), "base counter");
}

void parse_record_line(const LineContext& ctx, const std::vector<Token>& t, WfdbHeader& h) {
  parse_record_name(ctx, t[0], h);
  if (t.size() < 2) {
    fail(ctx, t[0].column, "number of signals", "", "is missing from the record line",
         "record name followed by the number of signals");
  }
  h.signal_count = parse_whole<int>(ctx, t[1], t[1].text, "number of signals");
  if (h.signal_count < 0) {
    fail(ctx, t[1].column, "number of signals", t[1].text, "is negative", "0 or more signals");
  }
  if (t.size() > 2) parse_frequency(ctx, t[2], h);
  if (t.size() > 3) {
    const auto frames = parse_whole<std::int64_t>(ctx, t[3], t[3].text, "number of samples");
    if (frames < 0) {
      fail(ctx, t[3].column, "number of samples", t[3].text, "is negative", "0 or more");
    }
    if (frames > 0) h.frames = frames;  // 0 means "not stated"
  }
  if (t.size() > 4) h.base_time = std::string(t[4].text);
  if (t.size() > 5) h.base_date = std::string(t[5].text);
}

// "format[xspf][:skew][+offset]".
void parse_format(const LineContext& ctx, const Token& token, WfdbSignalSpec& s) {
  const std::string_view text = token.text;
  std::size_t mark = text.find_first_of("x:+");
  s.format = parse_whole<int>(ctx, token, text.substr(0, mark), "format");
  while (mark != std::string_view::npos) {
    const std::size_t next = text.find_first_of("x:+", mark + 1);
    const std::string_view part =
        text.substr(mark + 1, next == std::string_view::npos ? next : next - mark - 1);
    if (text[mark] == 'x')
      s.samples_per_frame = parse_whole<int>(ctx, token, part, "samples per frame");
    if (text[mark] == ':') s.skew = parse_whole<int>(ctx, token, part, "skew");
    if (text[mark] == '+')
      s.byte_offset = parse_whole<std::int64_t>(ctx, token, part, "byte offset");
    mark = next;
  }
  if (s.samples_per_frame < 1) {
    fail(ctx, token.column, "samples per frame", token.text, "is below 1", "212x4 style, >= 1");
  }
  if (s.skew < 0) fail(ctx, token.column, "skew", token.text, "is negative", "a skew >= 0 frames");
  if (s.byte_offset < 0) {
    fail(ctx, token.column, "byte offset", token.text, "is negative", "an offset >= 0 bytes");
  }
  if (!wfdb_format_supported(s.format)) {
    fail(ctx, token.column, "format", token.text, "is not a supported WFDB storage format",
         "one of 0, 16, 24, 32, 61, 80, 212, 310, 311");
  }
}

// "gain[(baseline)][/units]".
void parse_gain(const LineContext& ctx, const Token& token, WfdbSignalSpec& s) {
  std::string_view text = token.text;
  const auto slash = text.find('/');
  if (slash != std::string_view::npos) {
    s.units = std::string(text.substr(slash + 1));
    text = text.substr(0, slash);
  }
  const auto paren = text.find('(');
  if (paren != std::string_view::npos) {
    if (text.back() != ')') {
      fail(ctx, token.column, "baseline", token.text, "has no closing parenthesis",
           "gain(baseline)/units");
    }
    s.baseline =
        parse_whole<int>(ctx, token, text.substr(paren + 1, text.size() - paren - 2), "baseline");
    text = text.substr(0, paren);
  }
  const double gain = parse_real(ctx, token, text, "ADC gain");
  if (gain < 0.0) fail(ctx, token.column, "ADC gain", token.text, "is negative", "a gain >= 0");
  s.gain_given = gain > 0.0;
  s.gain_column = token.column;
  // header(5): a zero (or missing) gain means the signal is uncalibrated; 200 is
  // used only to scale it, and channels_of() marks the channel so.
  s.gain = gain > 0.0 ? gain : 200.0;
  if (paren == std::string_view::npos) s.baseline = INT32_MIN;  // resolved to ADC zero below
}

// The remainder of the line after the token at `index` (the description may
// contain spaces).
std::string rest_of_line(const LineContext& ctx, const std::vector<Token>& t, std::size_t index) {
  if (t.size() <= index) return "";
  const auto start = static_cast<std::size_t>(t[index].column - 1);
  std::string_view rest = ctx.raw.substr(start);
  while (!rest.empty() && (rest.back() == ' ' || rest.back() == '\t' || rest.back() == '\r')) {
    rest.remove_suffix(1);
  }
  return std::string(rest);
}

WfdbSignalSpec parse_signal_line(const LineContext& ctx, const std::vector<Token>& t,
                                 double frame_frequency) {
  WfdbSignalSpec s;
  s.line = ctx.line;
  s.file_name = std::string(t[0].text);
  if (t.size() < 2) {
    fail(ctx, t[0].column, "format", "", "is missing from the signal line",
         "file name followed by the storage format");
  }
  parse_format(ctx, t[1], s);
  if (frame_frequency * s.samples_per_frame > kMaxSamplesPerSecond) {
    fail(ctx, t[1].column, "samples per frame", t[1].text,
         "gives the signal more samples per second than this reader accepts",
         "at most 1000000 samples per second (frame rate x samples per frame)");
  }
  bool baseline_pending = true;
  if (t.size() > 2) {
    parse_gain(ctx, t[2], s);
    baseline_pending = s.baseline == INT32_MIN;
  }
  if (t.size() > 3) s.adc_resolution = parse_whole<int>(ctx, t[3], t[3].text, "ADC resolution");
  if (t.size() > 4) s.adc_zero = parse_whole<int>(ctx, t[4], t[4].text, "ADC zero");
  if (t.size() > 5) s.initial_value = parse_whole<int>(ctx, t[5], t[5].text, "initial value");
  if (t.size() > 6) {
    s.checksum = parse_whole<int>(ctx, t[6], t[6].text, "checksum");
    s.checksum_given = true;
  }
  if (t.size() > 7) s.block_size = parse_whole<int>(ctx, t[7], t[7].text, "block size");
  s.description = rest_of_line(ctx, t, 8);
  if (baseline_pending) s.baseline = s.adc_zero;  // header(5): baseline defaults to ADC zero
  return s;
}

WfdbSegmentSpec parse_segment_line(const LineContext& ctx, const std::vector<Token>& t) {
  WfdbSegmentSpec s;
  s.line = ctx.line;
  s.record_name = std::string(t[0].text);
  if (t.size() < 2) {
    fail(ctx, t[0].column, "segment length", "", "is missing from the segment line",
         "segment name followed by its number of samples");
  }
  s.frames = parse_whole<std::int64_t>(ctx, t[1], t[1].text, "segment length");
  if (s.frames < 0) {
    fail(ctx, t[1].column, "segment length", t[1].text, "is negative", "0 or more samples");
  }
  return s;
}

}  // namespace

WfdbHeader parse_wfdb_header(std::istream& in, const std::string& file) {
  WfdbHeader h;
  bool have_record_line = false;
  std::string line;
  int number = 0;
  while (std::getline(in, line)) {
    ++number;
    const LineContext ctx{file, number, line};
    const auto tokens = split_tokens(line);
    if (tokens.empty()) continue;
    if (tokens[0].text[0] == '#') {
      if (have_record_line) h.comments.push_back(line.substr(line.find('#') + 1));
      continue;
    }
    if (!have_record_line) {
      parse_record_line(ctx, tokens, h);
      have_record_line = true;
      continue;
    }
    const std::size_t wanted =
        h.segment_count > 0 ? static_cast<std::size_t>(h.segment_count) : h.signal_count;
    const std::size_t have = h.segment_count > 0 ? h.segments.size() : h.signals.size();
    if (have >= wanted) {
      fail(ctx, tokens[0].column, h.segment_count > 0 ? "segments" : "signals", tokens[0].text,
           "the header has more lines than its record line announces",
           std::to_string(wanted) + (h.segment_count > 0 ? " segment lines" : " signal lines"));
    }
    if (h.segment_count > 0) {
      h.segments.push_back(parse_segment_line(ctx, tokens));
    } else {
      h.signals.push_back(parse_signal_line(ctx, tokens, h.frame_frequency));
    }
  }
  if (!have_record_line) {
    throw InputError("record line", "", "the header is empty", "a WFDB record line",
                     SourcePlace{file, 1, 1});
  }
  const std::size_t wanted =
      h.segment_count > 0 ? static_cast<std::size_t>(h.segment_count) : h.signal_count;
  const std::size_t have = h.segment_count > 0 ? h.segments.size() : h.signals.size();
  if (have < wanted) {
    throw InputError(h.segment_count > 0 ? "segments" : "signals", std::to_string(have),
                     "the header has fewer lines than its record line announces",
                     std::to_string(wanted), SourcePlace{file, number, 1});
  }
  return h;
}

WfdbHeader read_wfdb_header(const std::filesystem::path& hea_path) {
  std::ifstream in(hea_path);
  if (!in) {
    throw InputError("record", hea_path.string(), "cannot open the WFDB header",
                     "an existing, readable .hea file");
  }
  return parse_wfdb_header(in, hea_path.string());
}

bool wfdb_format_supported(int format) {
  switch (format) {
    case 0:
    case 16:
    case 24:
    case 32:
    case 61:
    case 80:
    case 212:
    case 310:
    case 311:
      return true;
    default:
      return false;
  }
}

std::int32_t wfdb_invalid_sample(int format) {
  switch (format) {
    case 80:
      return -128;
    case 212:
      return -2048;
    case 310:
    case 311:
      return -512;
    case 24:
      return -(1 << 23);
    case 32:
      return INT32_MIN;
    default:
      return -32768;
  }
}

}  // namespace bb::wave
