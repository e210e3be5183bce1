// The CSV and text rows of beats, breaths and windows, and the spool that
// keeps the window trend out of memory (breathbeat/present/wave.hpp).
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iomanip>
#include <sstream>

#include "breathbeat/present/wave.hpp"

namespace bb::wave {

namespace {

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

// Conditions nobody has confirmed (unknown, or only not contradicted by the
// signals) that could have misled the window's reading the way it points.
std::size_t open_conditions(const WindowResult& w) {
  return w.reading ? w.reading->open_conditions.size() : 0;
}

// The window's reading, saying when it rests on conditions nobody has confirmed
// (unknown, or only not contradicted by the signals) that could have misled it.
// A reading's category in people's words ("above_grey_zone" -> "above the grey zone").
std::string category_words(const std::string& category) {
  static const std::pair<const char*, const char*> kWords[] = {
      {"above_grey_zone", "above the grey zone"},
      {"below_grey_zone", "below the grey zone"},
      {"grey_zone", "in the grey zone"},
      {"above_threshold", "above the cut-off"},
      {"below_threshold", "below the cut-off"},
      {"device_dependent_zone", "in the device-dependent zone"},
      {"between_cut_offs", "between the cut-offs"},
      {"not_interpretable", "cannot be read"},
  };
  for (const auto& [key, words] : kWords) {
    if (category == key) return words;
  }
  std::string out = category;
  std::replace(out.begin(), out.end(), '_', ' ');
  return out;
}

std::string reading_cell(const WindowResult& w) {
  if (!w.reading) return "-";
  const std::size_t open = open_conditions(w);
  std::string words = category_words(w.reading->category);
  if (open == 0 || w.reading->category == "not_interpretable") return words;
  return words + ", conditional on " + std::to_string(open) + " unconfirmed condition" +
         (open == 1 ? "" : "s");
}

}  // namespace

// ---- CSV ------------------------------------------------------------------------

// CSV headers are `name [unit]` with UCUM codes, as in the report CSV; counts, flags and words
// have no unit.
void write_beat_csv_header(std::ostream& out) {
  out << "onset [s],systolic_time [s],systolic [mm[Hg]],diastolic [mm[Hg]],"
         "pulse_pressure [mm[Hg]],mean [mm[Hg]],interval [s],verdict\n";
}

void write_beat_csv_row(std::ostream& out, const Beat& b) {
  out << fixed(in_seconds(b.onset), 3) << ',' << fixed(in_seconds(b.systolic_time), 3) << ','
      << fixed(in_mmHg(b.systolic), 2) << ',' << fixed(in_mmHg(b.diastolic), 2) << ','
      << fixed(in_mmHg(b.pulse_pressure), 2) << ',' << fixed(in_mmHg(b.mean), 2) << ','
      << cell(b.interval, in_seconds, 3) << ',' << to_string(b.verdict) << '\n';
}

void write_breath_csv_header(std::ostream& out) {
  out << "start [s],ttot [s],ti [s],te [s],rr [/min],gap,ppeak [cm[H2O]],peep [cm[H2O]],"
         "mean_paw [cm[H2O]],negative_swing [cm[H2O]],vt [mL],resistance [cm[H2O]/L/s],"
         "elastance [cm[H2O]/L],p0 [cm[H2O]],fit_r2 [1],stress_index [1],beats,beats_accepted,"
         "ppv [%],spv [mm[Hg]]\n";
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
  out << "start [s],end [s],beats,beats_rejected,breaths,heart_rate [/min],"
         "respiratory_rate [/min],hr_rr_ratio [1],ppv [%],ppv_p10 [%],ppv_p90 [%],ppv_breaths,"
         "spv [mm[Hg]],mean_paw [cm[H2O]],vt [mL],reading,conditions_unknown,cycles\n";
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
      << (w.reading ? w.reading->category : "") << ',' << open_conditions(w) << ','
      << to_string(w.cycles) << '\n';
}

std::string window_text_header(CycleSource cycles) {
  return std::string("  start s    end s  beats  rej  ") +
         (cycles == CycleSource::breaths ? "breaths" : " cycles") +
         "  HR/min  RR/min  HR/RR  PPV % (p10-p90)     Pmean cmH2O  reading";
}

std::string window_text_row(const WindowResult& w) {
  char line[256];
  const std::string ppv = w.ppv ? fixed(in_percent(w.ppv->median), 1) + " (" +
                                      fixed(in_percent(w.ppv->p10), 1) + "-" +
                                      fixed(in_percent(w.ppv->p90), 1) + ")"
                                : "-";
  const std::string rr = !w.respiratory_rate
                             ? "-"
                             : (w.cycles == CycleSource::pulse_modulation ? "~" : "") +
                                   fixed(in_per_min(*w.respiratory_rate), 1);
  std::snprintf(
      line, sizeof line, "  %7.1f  %7.1f  %5lld  %3lld  %7lld  %6s  %6s  %5s  %-18s  %11s  %s",
      in_seconds(w.start), in_seconds(w.end), static_cast<long long>(w.beats),
      static_cast<long long>(w.beats_rejected),
      static_cast<long long>(w.cycles == CycleSource::breaths ? w.breaths : w.cycles_analysed),
      w.heart_rate ? fixed(in_per_min(*w.heart_rate), 0).c_str() : "-", rr.c_str(),
      w.hr_rr_ratio ? fixed(in_fraction(*w.hr_rr_ratio), 1).c_str() : "-", ppv.c_str(),
      w.mean_airway_pressure ? fixed(in_cmH2O(*w.mean_airway_pressure), 1).c_str() : "-",
      reading_cell(w).c_str());
  return line;
}

// ---- the window trend spool ------------------------------------------------------

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

}  // namespace bb::wave
