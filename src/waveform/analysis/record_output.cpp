// Printing the waveform results: the summary as an Answer and JSON, CSV rows
// for beats, breaths and windows, and atomic output files.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iomanip>
#include <random>
#include <sstream>

#include "breathbeat/cautions.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/version.hpp"
#include "breathbeat/waveform/pipeline.hpp"

namespace bb::wave {

namespace {

Shown count_shown(std::int64_t n, const char* ucum, const char* unit) {
  return Shown{static_cast<double>(n), ucum, unit, 0, std::nullopt, std::nullopt};
}

Shown ppv_shown(const PpvSpread& p) {
  Shown s = as_percent(p.median, 1);
  s.low = in_percent(p.p10);
  s.high = in_percent(p.p90);
  return s;
}

nlohmann::ordered_json ppv_json(const PpvSpread& p) {
  nlohmann::ordered_json j = to_json(as_percent(p.median, 1));
  j["p10"] = to_json(as_percent(p.p10, 1))["value"];
  j["p90"] = to_json(as_percent(p.p90, 1))["value"];
  j["breaths"] = p.breaths;
  return j;
}

template <class T, class F>
nlohmann::ordered_json optional_json(const std::optional<T>& v, F shown) {
  return v ? to_json(shown(*v)) : nlohmann::ordered_json(nullptr);
}

std::string fixed(double v, int decimals) {
  if (std::isnan(v)) return "";
  std::ostringstream out;
  out << std::fixed << std::setprecision(decimals) << v;
  return out.str();
}

template <class T, class F>
std::string cell(const std::optional<T>& v, F reader, int decimals) {
  return v ? fixed(reader(*v), decimals) : "";
}

void add(Answer& a, const std::string& key, const std::string& label, Shown shown,
         std::string note = "") {
  a.results.push_back(Item{key, label, std::move(shown), std::move(note)});
}

int unknown_conditions(const WindowResult& w) {
  return static_cast<int>(std::count_if(
      w.gates.begin(), w.gates.end(), [](const Gate& g) { return g.state == GateState::unknown; }));
}

// The window's reading, saying when it rests on conditions nobody has confirmed.
std::string reading_cell(const WindowResult& w) {
  if (!w.reading) return "-";
  const int unknown = unknown_conditions(w);
  if (unknown == 0 || w.reading->category == "not_interpretable") return w.reading->category;
  return w.reading->category + ", " + std::to_string(unknown) + " condition" +
         (unknown == 1 ? "" : "s") + " unknown";
}

}  // namespace

nlohmann::ordered_json to_json(const BeatCounts& c) {
  nlohmann::ordered_json j = to_json(count_shown(c.rejected(), "{beats}", "beats"));
  nlohmann::ordered_json reasons = nlohmann::ordered_json::object();
  for (int v = 1; v < kBeatVerdictCount; ++v)
    reasons[to_string(static_cast<BeatVerdict>(v))] = c.by_verdict[v];
  j["by_reason"] = reasons;
  return j;
}

Answer describe_record(const RecordSummary& s, const Thresholds& t) {
  Answer a;
  a.command = "wave";
  a.title = "Waveform analysis";
  a.inputs.push_back({"arterial_pressure_channel", s.abp_channel});
  a.inputs.push_back(
      {"breath_channel", s.breath_channel + " (" + to_string(s.breath_signal) + ")"});
  a.inputs.push_back({"start", as_seconds(s.start, 1)});
  add(a, "duration", "Duration analysed", as_seconds(s.duration, 1));
  add(a, "beats", "Beats", count_shown(s.beats.total(), "{beats}", "beats"));
  std::string reasons;
  for (int v = 1; v < kBeatVerdictCount; ++v) {
    if (s.beats.by_verdict[v] == 0) continue;
    reasons += (reasons.empty() ? "" : ", ") + std::string(to_string(static_cast<BeatVerdict>(v))) +
               " " + std::to_string(s.beats.by_verdict[v]);
  }
  add(a, "beats_rejected", "Beats set aside", count_shown(s.beats.rejected(), "{beats}", "beats"),
      reasons);
  add(a, "breaths", "Breaths", count_shown(s.breaths, "{breaths}", "breaths"));
  if (s.heart_rate)
    add(a, "heart_rate", "Heart rate (accepted beats)", as_per_min(*s.heart_rate, 0));
  if (s.respiratory_rate)
    add(a, "respiratory_rate", "Respiratory rate", as_per_min(*s.respiratory_rate, 1));
  if (s.hr_rr_ratio) add(a, "hr_rr_ratio", "HR/RR", as_number(in_fraction(*s.hr_rr_ratio), 1));
  if (s.ppv) {
    add(a, "ppv", "PPV, median (p10-p90) over breaths", ppv_shown(*s.ppv),
        std::to_string(s.ppv->breaths) + " breaths; Michard 2000");
  } else {
    a.skipped.push_back(
        {"ppv",
         "PPV",
         {"breaths with at least " + format_number(t.number("waveform.min_beats_per_breath"), 0) +
          " accepted beats"}});
  }
  if (s.spv) add(a, "spv", "SPV, median over breaths", as_mmHg(*s.spv, 1), "Perel 1987");
  if (s.mean_airway_pressure) {
    add(a, "mean_airway_pressure", "Mean airway pressure", as_cmH2O(*s.mean_airway_pressure, 1),
        "time average over whole breaths");
  }
  if (s.ppeak) add(a, "ppeak", "Peak airway pressure, median", as_cmH2O(*s.ppeak, 1));
  if (s.peep) add(a, "peep", "PEEP (end-expiratory), median", as_cmH2O(*s.peep, 1));
  if (s.vt)
    add(a, "vt", "Tidal volume, median", as_mL(*s.vt, 0), "flow integrated, drift corrected");
  if (s.resistance) {
    const std::string fit = std::to_string(s.fits) + " breaths; Bates 2009";
    add(a, "resistance", "Resistance (equation of motion)", as_cmH2O_per_L_per_s(*s.resistance, 1),
        fit);
  }
  if (s.elastance)
    add(a, "elastance", "Elastance (equation of motion)", as_cmH2O_per_L(*s.elastance, 1));
  if (s.compliance)
    add(a, "compliance", "Compliance (1/elastance)", as_mL_per_cmH2O(*s.compliance, 1));
  if (s.total_peep) add(a, "total_peep", "Total PEEP (P0 of the fit)", as_cmH2O(*s.total_peep, 1));
  if (s.fit_r_squared)
    add(a, "fit_r_squared", "Goodness of fit (R2), median", as_number(*s.fit_r_squared, 3));
  if (s.stress_index) {
    add(a, "stress_index", "Stress index, median", as_number(*s.stress_index, 2), "Ranieri 2000");
  }
  add(a, "windows", "Windows in the trend", count_shown(s.windows, "1", ""));
  a.gates = s.gates;
  a.reading = s.reading;
  a.notes = s.notes;
  a.notes.push_back(
      "Pulse onsets by the slope-sum function (Zong et al., Computers in Cardiology 2003;30:259).");
  a.cautions = standard_cautions();
  return a;
}

nlohmann::ordered_json to_json(const WindowResult& w) {
  nlohmann::ordered_json j;
  j["start"] = to_json(as_seconds(w.start, 1));
  j["end"] = to_json(as_seconds(w.end, 1));
  j["beats"] = w.beats;
  j["beats_rejected"] = w.beats_rejected;
  j["breaths"] = w.breaths;
  j["heart_rate"] = optional_json(w.heart_rate, [](Frequency f) { return as_per_min(f, 0); });
  j["respiratory_rate"] =
      optional_json(w.respiratory_rate, [](Frequency f) { return as_per_min(f, 1); });
  j["hr_rr_ratio"] =
      optional_json(w.hr_rr_ratio, [](Ratio r) { return as_number(in_fraction(r), 1); });
  j["ppv"] = w.ppv ? ppv_json(*w.ppv) : nlohmann::ordered_json(nullptr);
  j["spv"] = optional_json(w.spv, [](Pressure p) { return as_mmHg(p, 1); });
  j["mean_airway_pressure"] =
      optional_json(w.mean_airway_pressure, [](Pressure p) { return as_cmH2O(p, 1); });
  j["vt"] = optional_json(w.vt, [](Volume v) { return as_mL(v, 0); });
  j["reading"] =
      w.reading ? nlohmann::ordered_json(w.reading->category) : nlohmann::ordered_json(nullptr);
  nlohmann::ordered_json failed = nlohmann::ordered_json::array();
  nlohmann::ordered_json unknown = nlohmann::ordered_json::array();
  for (const Gate& g : w.gates) {
    if (g.state == GateState::failed) failed.push_back(g.key);
    if (g.state == GateState::unknown) unknown.push_back(g.key);
  }
  j["gates_failed"] = failed;
  j["gates_unknown"] = unknown;
  return j;
}

nlohmann::ordered_json summary_json(const RecordSummary& s, const Thresholds& t) {
  nlohmann::ordered_json j = to_json(describe_record(s, t));
  nlohmann::ordered_json out;
  for (const char* key : {"tool", "version", "command", "inputs"}) out[key] = j[key];
  out["duration"] = to_json(as_seconds(s.duration, 1));
  out["beats"] = to_json(count_shown(s.beats.total(), "{beats}", "beats"));
  out["beats_rejected"] = to_json(s.beats);
  out["breaths"] = to_json(count_shown(s.breaths, "{breaths}", "breaths"));
  out["heart_rate"] = optional_json(s.heart_rate, [](Frequency f) { return as_per_min(f, 0); });
  out["respiratory_rate"] =
      optional_json(s.respiratory_rate, [](Frequency f) { return as_per_min(f, 1); });
  out["hr_rr_ratio"] =
      optional_json(s.hr_rr_ratio, [](Ratio r) { return as_number(in_fraction(r), 1); });
  out["ppv"] = s.ppv ? ppv_json(*s.ppv) : nlohmann::ordered_json(nullptr);
  out["spv"] = optional_json(s.spv, [](Pressure p) { return as_mmHg(p, 1); });
  if (s.has_pressure) {
    out["mean_airway_pressure"] =
        optional_json(s.mean_airway_pressure, [](Pressure p) { return as_cmH2O(p, 1); });
  }
  for (const char* key : {"results", "skipped", "gates", "reading", "notes", "cautions"})
    out[key] = j[key];
  return out;
}

// ---- CSV ------------------------------------------------------------------------

void write_beat_csv_header(std::ostream& out) {
  out << "onset_s,systolic_time_s,systolic_mm[Hg],diastolic_mm[Hg],pulse_pressure_mm[Hg],mean_mm["
         "Hg],"
         "interval_s,verdict\n";
}

void write_beat_csv_row(std::ostream& out, const Beat& b) {
  out << fixed(in_seconds(b.onset), 3) << ',' << fixed(in_seconds(b.systolic_time), 3) << ','
      << fixed(in_mmHg(b.systolic), 2) << ',' << fixed(in_mmHg(b.diastolic), 2) << ','
      << fixed(in_mmHg(b.pulse_pressure), 2) << ',' << fixed(in_mmHg(b.mean), 2) << ','
      << cell(b.interval, in_seconds, 3) << ',' << to_string(b.verdict) << '\n';
}

void write_breath_csv_header(std::ostream& out) {
  out << "start_s,ttot_s,ti_s,te_s,rr_/min,gap,ppeak_cm[H2O],peep_cm[H2O],mean_paw_cm[H2O],"
         "negative_swing_cm[H2O],vt_mL,resistance_cm[H2O]/L/s,elastance_cm[H2O]/"
         "L,p0_cm[H2O],fit_r2,"
         "stress_index,beats,beats_accepted,ppv_%,spv_mm[Hg]\n";
}

void write_breath_csv_row(std::ostream& out, const Breath& b, const BreathPpv& p) {
  auto fit_cell = [&](auto reader, int decimals) {
    return b.fit ? fixed(reader(*b.fit), decimals) : std::string();
  };
  out << fixed(in_seconds(b.start), 3) << ',' << fixed(in_seconds(b.duration), 3) << ','
      << fixed(in_seconds(b.ti), 3) << ',' << fixed(in_seconds(b.te), 3) << ','
      << fixed(in_per_min(b.rate), 2) << ',' << (b.gap ? 1 : 0) << ',' << cell(b.ppeak, in_cmH2O, 2)
      << ',' << cell(b.peep, in_cmH2O, 2) << ',' << cell(b.mean_airway_pressure, in_cmH2O, 2) << ','
      << cell(b.negative_swing, in_cmH2O, 2) << ',' << cell(b.vt, in_mL, 1) << ','
      << fit_cell([](const EquationOfMotionFit& f) { return in_cmH2O_per_L_per_s(f.resistance); },
                  3)
      << ','
      << fit_cell([](const EquationOfMotionFit& f) { return in_cmH2O_per_L(f.elastance); }, 3)
      << ',' << fit_cell([](const EquationOfMotionFit& f) { return in_cmH2O(f.p0); }, 3) << ','
      << fit_cell([](const EquationOfMotionFit& f) { return f.r_squared; }, 4) << ','
      << (b.stress_index ? fixed(b.stress_index->b, 3) : "") << ',' << p.beats << ','
      << p.beats_accepted << ',' << cell(p.ppv, in_percent, 2) << ',' << cell(p.spv, in_mmHg, 2)
      << '\n';
}

void write_window_csv_header(std::ostream& out) {
  out << "start_s,end_s,beats,beats_rejected,breaths,heart_rate_/min,respiratory_rate_/"
         "min,hr_rr_ratio,"
         "ppv_%,ppv_p10_%,ppv_p90_%,ppv_breaths,spv_mm[Hg],mean_paw_cm[H2O],vt_mL,reading,"
         "conditions_unknown\n";
}

void write_window_csv_row(std::ostream& out, const WindowResult& w) {
  out << fixed(in_seconds(w.start), 1) << ',' << fixed(in_seconds(w.end), 1) << ',' << w.beats
      << ',' << w.beats_rejected << ',' << w.breaths << ',' << cell(w.heart_rate, in_per_min, 1)
      << ',' << cell(w.respiratory_rate, in_per_min, 1) << ','
      << cell(w.hr_rr_ratio, in_fraction, 2) << ','
      << (w.ppv ? fixed(in_percent(w.ppv->median), 2) : "") << ','
      << (w.ppv ? fixed(in_percent(w.ppv->p10), 2) : "") << ','
      << (w.ppv ? fixed(in_percent(w.ppv->p90), 2) : "") << ','
      << (w.ppv ? std::to_string(w.ppv->breaths) : "") << ',' << cell(w.spv, in_mmHg, 1) << ','
      << cell(w.mean_airway_pressure, in_cmH2O, 1) << ',' << cell(w.vt, in_mL, 0) << ','
      << (w.reading ? w.reading->category : "") << ',' << unknown_conditions(w) << '\n';
}

std::string window_text_header() {
  return "  start s    end s  beats  rej  breaths  HR/min  RR/min  HR/RR  PPV % (p10-p90)     "
         "Pmean cmH2O  reading";
}

std::string window_text_row(const WindowResult& w) {
  char line[256];
  const std::string ppv = w.ppv ? fixed(in_percent(w.ppv->median), 1) + " (" +
                                      fixed(in_percent(w.ppv->p10), 1) + "-" +
                                      fixed(in_percent(w.ppv->p90), 1) + ")"
                                : "-";
  std::snprintf(line, sizeof line,
                "  %7.1f  %7.1f  %5lld  %3lld  %7lld  %6s  %6s  %5s  %-18s  %11s  %s",
                in_seconds(w.start), in_seconds(w.end), static_cast<long long>(w.beats),
                static_cast<long long>(w.beats_rejected), static_cast<long long>(w.breaths),
                w.heart_rate ? fixed(in_per_min(*w.heart_rate), 0).c_str() : "-",
                w.respiratory_rate ? fixed(in_per_min(*w.respiratory_rate), 1).c_str() : "-",
                w.hr_rr_ratio ? fixed(in_fraction(*w.hr_rr_ratio), 1).c_str() : "-", ppv.c_str(),
                w.mean_airway_pressure ? fixed(in_cmH2O(*w.mean_airway_pressure), 1).c_str() : "-",
                reading_cell(w).c_str());
  return line;
}

// ---- atomic files ------------------------------------------------------------------

TrendSpool::TrendSpool(TrendFormat format) : format_(format), file_(std::tmpfile()) {}

TrendSpool::~TrendSpool() {
  if (file_) std::fclose(file_);
}

void TrendSpool::append(const std::string& text) {
  if (file_ && std::fwrite(text.data(), 1, text.size(), file_) == text.size()) return;
  if (file_) {  // the temporary file failed (disk full?): keep what it holds in memory from now
    copy_to_memory();
  }
  memory_ += text;
}

void TrendSpool::copy_to_memory() {
  std::string held;
  std::rewind(file_);
  char buf[1 << 16];
  std::size_t got = 0;
  while ((got = std::fread(buf, 1, sizeof buf, file_)) > 0) held.append(buf, got);
  std::fclose(file_);
  file_ = nullptr;
  memory_ = std::move(held) + memory_;
}

void TrendSpool::add(const WindowResult& w) {
  switch (format_) {
    case TrendFormat::text:
      append(window_text_row(w) + "\n");
      break;
    case TrendFormat::csv: {
      std::ostringstream row;
      write_window_csv_row(row, w);
      append(row.str());
      break;
    }
    case TrendFormat::json: {
      std::string element = to_json(w).dump(2);
      std::string indented = count_ > 0 ? ",\n    " : "    ";
      for (char ch : element) {
        indented += ch;
        if (ch == '\n') indented += "    ";
      }
      append(indented);
      break;
    }
  }
  ++count_;
}

void TrendSpool::copy_to(std::ostream& out) {
  if (file_) {
    std::fflush(file_);
    std::rewind(file_);
    char buf[1 << 16];
    std::size_t got = 0;
    while ((got = std::fread(buf, 1, sizeof buf, file_)) > 0)
      out.write(buf, static_cast<std::streamsize>(got));
    std::fseek(file_, 0, SEEK_END);
  }
  out << memory_;
}

void write_json_with_windows(std::ostream& out, const nlohmann::ordered_json& summary,
                             TrendSpool& windows) {
  std::string head = "{\n";
  if (!summary.empty()) {
    head = summary.dump(2);        // "{\n  ...\n}"
    head.resize(head.size() - 2);  // without the closing "\n}"
    head += ",\n";
  }
  out << head << "  \"windows\": [";
  if (windows.windows() > 0) {
    out << "\n";
    windows.copy_to(out);
    out << "\n  ]";
  } else {
    out << "]";
  }
  out << "\n}";
}

AtomicOutputFile::AtomicOutputFile(std::filesystem::path destination)
    : destination_(std::move(destination)) {
  std::random_device rd;
  temporary_ = destination_;
  temporary_ += ".tmp-" + std::to_string(rd());
  out_.open(temporary_, std::ios::binary | std::ios::trunc);
  if (!out_) {
    throw InputError("output", destination_.string(), "cannot be written",
                     "a path in a writable folder");
  }
}

AtomicOutputFile::~AtomicOutputFile() {
  if (committed_) return;
  out_.close();
  std::error_code ec;
  std::filesystem::remove(temporary_, ec);
}

void AtomicOutputFile::commit() {
  out_.flush();
  const bool ok = static_cast<bool>(out_);
  out_.close();
  if (!ok) throw std::runtime_error("writing " + temporary_.string() + " failed");
  std::filesystem::rename(temporary_, destination_);
  committed_ = true;
}

}  // namespace bb::wave
