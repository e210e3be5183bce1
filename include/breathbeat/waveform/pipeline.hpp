// The waveform engine end to end: a record (SignalSource) to beats, breaths,
// per-breath PPV, windows and a record summary, streamed so that memory does
// not grow with the length of the record. Beats and breaths go to optional
// sinks (CSV files written atomically), windows to a callback.
#pragma once

#include <array>
#include <cstdint>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <optional>
#include <ostream>
#include <string>
#include <vector>

#include "breathbeat/output.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/beats.hpp"
#include "breathbeat/waveform/breaths.hpp"
#include "breathbeat/waveform/ppv_waveform.hpp"
#include "breathbeat/waveform/source.hpp"

namespace bb::wave {

struct PipelineOptions {
  // Channel names chosen by the user (--abp, --paw, --flow, --resp); empty:
  // the first channel whose role matches.
  std::string abp;
  std::string paw;
  std::string flow;
  std::string resp;
  std::optional<Time> from;
  std::optional<Time> to;
  std::optional<Time> window;  // default waveform.window
  std::function<void(const Beat&)> on_beat;
  std::function<void(const Breath&, const BreathPpv&)> on_breath;
  std::function<void(const WindowResult&)> on_window;
};

// The channels the analysis uses (index into source.channels()).
struct ChannelChoice {
  int abp = -1;
  int paw = -1;
  int flow = -1;
  int resp = -1;
};
// Resolves roles and names; throws InputError for a name that matches no
// channel, for a missing arterial pressure channel, for no breath channel, and
// for a unit the role cannot have.
ChannelChoice choose_channels(const std::vector<ChannelInfo>& channels, const PipelineOptions& o);

struct RecordSummary {
  std::string abp_channel;
  std::string breath_channel;
  BreathSignal breath_signal = BreathSignal::airway_pressure;
  bool has_pressure = false;
  bool has_flow = false;
  Time start;
  Time duration;
  BeatCounts beats;
  std::int64_t breaths = 0;
  std::int64_t breaths_with_ppv = 0;
  std::optional<Frequency> heart_rate;
  std::optional<Frequency> respiratory_rate;
  std::optional<Ratio> hr_rr_ratio;
  std::optional<PpvSpread> ppv;  // over all breaths
  std::optional<Pressure> spv;   // median
  std::optional<Pressure> mean_airway_pressure;
  std::optional<Pressure> ppeak;         // median
  std::optional<Pressure> peep;          // median
  std::optional<Volume> vt;              // median
  std::optional<Resistance> resistance;  // median of good fits
  std::optional<Elastance> elastance;    // median of good fits
  std::optional<Compliance> compliance;  // 1 / median elastance
  std::optional<Pressure> total_peep;    // median P0 of good fits
  std::optional<double> fit_r_squared;   // median
  std::int64_t fits = 0;
  std::optional<double> stress_index;  // median b
  std::int64_t windows = 0;
  std::vector<Gate> gates;
  std::optional<Reading> reading;
  std::vector<std::string> notes;
};

RecordSummary analyse_record(SignalSource& source, const PipelineOptions& options,
                             const Thresholds& t);

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
std::string window_text_header();
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

// A file written beside its destination and renamed over it by commit();
// destroyed without commit(), it removes the temporary file and the
// destination is untouched.
class AtomicOutputFile {
 public:
  explicit AtomicOutputFile(std::filesystem::path destination);
  ~AtomicOutputFile();
  AtomicOutputFile(const AtomicOutputFile&) = delete;
  AtomicOutputFile& operator=(const AtomicOutputFile&) = delete;
  std::ostream& stream() { return out_; }
  void commit();

 private:
  std::filesystem::path destination_;
  std::filesystem::path temporary_;
  std::ofstream out_;
  bool committed_ = false;
};

}  // namespace bb::wave
