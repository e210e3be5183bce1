// Presenters of the waveform engine (breathbeat/waveform/pipeline.hpp): the
// record summary as an Answer and as JSON, the CSV rows of beats, breaths and
// windows, the text trend, and the spool that keeps the window trend out of
// memory until the analysis has succeeded.
#pragma once

#include <cstdint>
#include <cstdio>
#include <ostream>
#include <string>

#include <nlohmann/json.hpp>

#include "breathbeat/answer.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/pipeline.hpp"

namespace bb::wave {

// The summary as an Answer (command "wave"): results, gates, reading, notes,
// standard cautions. Windows are printed separately.
Answer describe_record(const RecordSummary& s, const Thresholds& t);
// The JSON summary: duration, beats, beats_rejected, breaths, heart_rate,
// respiratory_rate, hr_rr_ratio, ppv {value, unit, p10, p90}, spv,
// mean_airway_pressure (with airway pressure), results, gates, reading, notes,
// cautions. The caller adds "windows".
nlohmann::ordered_json summary_json(const RecordSummary& s, const Thresholds& t);
nlohmann::ordered_json to_json(const WindowResult& w);
nlohmann::ordered_json to_json(const BeatCounts& c);

// CSV rows for the sinks and the window trend (header rows name unit codes).
void write_beat_csv_header(std::ostream& out);
void write_beat_csv_row(std::ostream& out, const Beat& b);
void write_breath_csv_header(std::ostream& out);
void write_breath_csv_row(std::ostream& out, const Breath& b, const BreathPpv& p);
void write_window_csv_header(std::ostream& out);
void write_window_csv_row(std::ostream& out, const WindowResult& w);
// Without breaths (arterial pressure alone) the breaths column counts respiratory cycles,
// and an RR found in the pulse-pressure modulation is marked "~" (an estimate).
std::string window_text_header(CycleSource cycles = CycleSource::breaths);
// One line of progress for a long run: "breathbeat wave: 120 s of 600 s analysed (20 %)".
std::string progress_text(Time done, std::optional<Time> total);
std::string window_text_row(const WindowResult& w);

// The window trend of `breathbeat wave`, kept in an anonymous temporary file
// as the windows close (in memory only if no temporary file can be made), so
// that memory does not grow with the record and nothing reaches the output
// before the analysis has succeeded.
enum class TrendFormat { text, csv, json };
class TrendSpool {
 public:
  explicit TrendSpool(TrendFormat format);
  ~TrendSpool();
  TrendSpool(const TrendSpool&) = delete;
  TrendSpool& operator=(const TrendSpool&) = delete;
  void add(const WindowResult& w);
  std::int64_t windows() const { return count_; }
  // The spooled rows (text, csv) or JSON objects (indented as elements of a
  // top-level array and separated by commas), in order.
  void copy_to(std::ostream& out);

 private:
  void append(const std::string& text);
  void copy_to_memory();
  TrendFormat format_;
  std::FILE* file_ = nullptr;
  std::string memory_;  // when there is no file
  std::int64_t count_ = 0;
};

// `summary` with the spooled windows as its last member, "windows", printed as
// nlohmann::ordered_json::dump(2) would print the whole object.
void write_json_with_windows(std::ostream& out, const nlohmann::ordered_json& summary,
                             TrendSpool& windows);

}  // namespace bb::wave
