// The report as text: steps as columns, units in the row labels, wrapped into
// several column blocks when the steps do not fit the width.
#include <algorithm>
#include <sstream>

#include "breathbeat/present/report.hpp"
#include "breathbeat/version.hpp"
#include "report_view.hpp"

namespace bb {

namespace {

using report::Cell;
using report::View;

constexpr std::size_t kMaxLabel = 44;
constexpr std::size_t kMinColumn = 9;

std::size_t shown_width(const std::string& s) {
  std::size_t n = 0;
  for (unsigned char c : s) n += (c & 0xC0) != 0x80;
  return n;
}
std::string pad_right(const std::string& s, std::size_t w) {
  const std::size_t n = shown_width(s);
  return n >= w ? s : s + std::string(w - n, ' ');
}
std::string pad_left(const std::string& s, std::size_t w) {
  const std::size_t n = shown_width(s);
  return n >= w ? s : std::string(w - n, ' ') + s;
}
std::string clip(const std::string& s, std::size_t w) {
  if (shown_width(s) <= w) return s;
  return s.substr(0, w - 1) + "~";
}

std::string wrap(const std::string& text, std::size_t width, const std::string& first,
                 const std::string& rest) {
  std::istringstream words(text);
  std::string word, line = first, out;
  bool empty = true;
  while (words >> word) {
    if (!empty && shown_width(line) + 1 + shown_width(word) > width) {
      out += line + "\n";
      line = rest;
      empty = true;
    }
    line += (empty ? "" : " ") + word;
    empty = false;
  }
  return out + line + "\n";
}

// The number of a cell without its unit (the unit is in the row label); a range as "low to high".
std::string cell_text(const Cell& c) {
  if (!c.shown) return c.text;
  const Shown& s = *c.shown;
  if (s.low && s.high)
    return format_number(*s.low, s.decimals) + " to " + format_number(*s.high, s.decimals);
  return format_number(s.value, s.decimals);
}

// One table row: a label with unit and one cell per step.
struct Row {
  std::string label;
  std::vector<std::string> cells;
};

// Rows from per-step cell lists, keyed by Cell::key, in order of first appearance.
std::vector<Row> rows_of(const std::vector<const std::vector<Cell>*>& per_step) {
  std::vector<Row> rows;
  std::vector<std::string> keys;
  for (std::size_t i = 0; i < per_step.size(); ++i) {
    for (const Cell& c : *per_step[i]) {
      auto it = std::find(keys.begin(), keys.end(), c.key);
      std::size_t r = static_cast<std::size_t>(it - keys.begin());
      if (it == keys.end()) {
        keys.push_back(c.key);
        std::string label = c.label;
        if (c.shown && !c.shown->unit.empty()) label += " [" + c.shown->unit + "]";
        rows.push_back(Row{label, std::vector<std::string>(per_step.size(), "-")});
      }
      rows[r].cells[i] = cell_text(c);
      if (!c.note.empty() && c.note != "as written" && c.shown) rows[r].cells[i] += "*";
    }
  }
  return rows;
}

class Table {
 public:
  Table(const View& a, std::size_t width) : a_(a), width_(width) {}

  std::string render(const std::vector<Row>& rows) const {
    if (rows.empty()) return "  (nothing recorded)\n";
    std::size_t label_w = 0;
    for (const Row& r : rows) label_w = std::max(label_w, shown_width(r.label));
    label_w = std::min(label_w, kMaxLabel) + 2;
    std::vector<std::size_t> col_w(a_.steps.size(), kMinColumn);
    for (std::size_t i = 0; i < a_.steps.size(); ++i) {
      col_w[i] = std::max(col_w[i], std::min<std::size_t>(shown_width(a_.steps[i].label), 14) + 2);
      for (const Row& r : rows) col_w[i] = std::max(col_w[i], shown_width(r.cells[i]) + 2);
    }
    std::string out;
    std::size_t first = 0;
    while (first < a_.steps.size()) {
      std::size_t used = label_w + 2, last = first;
      while (last < a_.steps.size() && (last == first || used + col_w[last] <= width_))
        used += col_w[last++];
      if (first > 0) out += "\n";
      out += header(first, last, label_w, col_w);
      for (const Row& r : rows) {
        std::string line = "  " + pad_right(clip(r.label, label_w - 2), label_w);
        for (std::size_t i = first; i < last; ++i) line += pad_left(r.cells[i], col_w[i]);
        out += line + "\n";
      }
      first = last;
    }
    return out;
  }

 private:
  std::string header(std::size_t first, std::size_t last, std::size_t label_w,
                     const std::vector<std::size_t>& col_w) const {
    std::string names = "  " + pad_right("step", label_w), times = "  " + pad_right("", label_w);
    bool any_time = false;
    for (std::size_t i = first; i < last; ++i) {
      std::string name = clip(a_.steps[i].label, col_w[i] - 2);
      if (a_.steps[i].label == a_.reference) name = clip(a_.steps[i].label, col_w[i] - 3) + "=";
      names += pad_left(name, col_w[i]);
      times += pad_left(clip(a_.steps[i].time, col_w[i] - 2), col_w[i]);
      any_time = any_time || !a_.steps[i].time.empty();
    }
    return names + "\n" + (any_time ? times + "\n" : "");
  }
  const View& a_;
  std::size_t width_;
};

std::string section_title(const std::string& title) {
  return "\n" + title + "\n";
}

template <class Get>
std::vector<Row> section_rows(const View& a, Get get) {
  std::vector<const std::vector<Cell>*> per_step;
  for (const auto& s : a.steps) per_step.push_back(&get(s));
  return rows_of(per_step);
}

std::string short_reading(const PreloadIndexReading& r) {
  std::string w;
  switch (r.direction) {
    case PreloadDirection::responsive:
      w = "yes";
      break;
    case PreloadDirection::unresponsive:
      w = "no";
      break;
    case PreloadDirection::grey_zone:
      w = "grey";
      break;
    case PreloadDirection::not_valid:
      w = "invalid";
      break;
  }
  return r.conditional ? w + "?" : w;
}

std::string short_statement(const std::string& category) {
  if (category == "likely_responsive") return "likely";
  if (category == "unlikely") return "unlikely";
  if (category == "indeterminate") return "indeterm.";
  return "n/a";
}

std::vector<Row> preload_rows(const View& a) {
  std::vector<Row> rows;
  std::vector<std::string> keys;
  const std::size_t n = a.steps.size();
  for (std::size_t i = 0; i < n; ++i) {
    for (const auto& idx : a.steps[i].preload) {
      auto it = std::find(keys.begin(), keys.end(), idx.key);
      const std::size_t r = static_cast<std::size_t>(it - keys.begin());
      if (it == keys.end()) {
        keys.push_back(idx.key);
        rows.push_back(Row{idx.key + " reading", std::vector<std::string>(n, "-")});
      }
      rows[r].cells[i] = short_reading(*idx.reading);
    }
  }
  Row overall{"Overall preload statement", {}};
  for (const auto& s : a.steps) {
    overall.cells.push_back(short_statement(s.statement.category) +
                            (s.statement.conditional ? "?" : ""));
  }
  rows.push_back(overall);
  return rows;
}

std::string gate_text(const Gate& g) {
  const std::string state = g.state == GateState::not_contradicted
                                ? "not contradicted by the signals, not proven"
                                : to_string(g.state);
  std::string t = state + ": " + g.label;
  if (!g.detail.empty()) t += " (" + g.detail + ")";
  return t;
}

std::string preload_details(const View& a, std::size_t width) {
  std::string out;
  for (const auto& s : a.steps) {
    out += wrap(s.statement.text, width, "  " + s.label + ": ", "      ");
    for (const auto& idx : s.preload) {
      out += wrap(idx.reading->reading.text, width, "    - " + idx.label + ": ", "        ");
      for (const Gate& g : idx.reading->gates) {
        if (g.state == GateState::met) continue;
        // A tidal-volume challenge checks its conditions at each of its two steps.
        std::string at;
        if (g.key.rfind(kVtChallengeLowStep, 0) == 0) at = "at '" + idx.reading->from_step + "' ";
        if (g.key.rfind(kVtChallengeHighStep, 0) == 0) at = "at '" + idx.reading->to_step + "' ";
        out += wrap(at + gate_text(g), width, "        ! ", "          ");
      }
    }
  }
  return out;
}

std::string heart_lung_section(const View& a, const Table& table, std::size_t width) {
  std::vector<const std::vector<Cell>*> per_step;
  std::vector<std::vector<Cell>> merged;
  for (const auto& h : a.heart_lung) {
    std::vector<Cell> m = h.estimated;
    m.insert(m.end(), h.observed.begin(), h.observed.end());
    merged.push_back(std::move(m));
  }
  for (const auto& m : merged) per_step.push_back(&m);
  std::string out =
      "  Against the reference step '" + a.reference +
      "' (marked =). Estimates are ranges over the chest-wall share Ecw/Ers unless it was "
      "measured; observed changes are beside them.\n";
  out = wrap(out, width, "", "  ");
  out += table.render(rows_of(per_step));
  std::vector<std::string> seen;
  bool once_shown = false;  // a note that says the same at each step is shown once
  for (const auto& h : a.heart_lung) {
    for (std::size_t i = 0; i < h.notes.size(); ++i) {
      const std::string& n = h.notes[i];
      const bool once = i < h.once_only.size() && h.once_only[i];
      if ((once && once_shown) || std::find(seen.begin(), seen.end(), n) != seen.end()) continue;
      once_shown = once_shown || once;
      seen.push_back(n);
      out += wrap(n, width, "  - ", "    ");
    }
  }
  return out;
}

std::string comparison_section(const View& a, std::size_t width) {
  if (a.comparison.empty()) return "  Nothing to compare (one step, or no comparable values).\n";
  std::string out;
  for (const report::Finding& f : a.comparison) {
    std::string text = f.text;
    if (!f.source.empty()) text += " [" + f.source + "]";
    out += wrap(text, width, f.flagged ? "  ! " : "  - ", "    ");
  }
  return out + "  These are findings, not a recommended setting.\n";
}

std::string notes_section(const View& a, std::size_t width) {
  std::string out;
  for (const auto& s : a.steps) {
    for (const auto& f : s.flags) {
      out += wrap(f.message + (f.source.empty() ? "" : " [" + f.source + "]"), width,
                  "  ! " + s.label + ": ", "    ");
    }
  }
  // Each note once, with the steps it applies to.
  std::vector<std::pair<std::string, std::vector<std::string>>> notes;
  for (const auto& s : a.steps) {
    for (const auto& n : s.notes) {
      auto it =
          std::find_if(notes.begin(), notes.end(), [&](const auto& p) { return p.first == n; });
      if (it == notes.end()) {
        notes.push_back({n, {s.label}});
      } else if (it->second.back() != s.label) {
        it->second.push_back(s.label);
      }
    }
  }
  for (const auto& [n, steps] : notes) {
    std::string where;
    if (steps.size() == a.steps.size()) {
      where = "all steps";
    } else {
      for (const auto& l : steps) where += (where.empty() ? "" : ", ") + l;
    }
    out += wrap(n, width, "  - (" + where + ") ", "    ");
  }
  for (const auto& n : a.notes) out += wrap(n, width, "  - ", "    ");
  return out;
}

}  // namespace

std::string report_text(const TrialAnalysis& analysis, std::size_t width) {
  const View a = report::view_of(analysis);
  const Table table(a, width);
  std::ostringstream out;
  out << kToolName << " " << kVersion << " - heart-lung trial report\n";
  if (!a.file.empty()) out << "File: " << a.file << "\n";
  std::string patient = "Patient";
  if (!a.patient_label.empty()) patient += " '" + a.patient_label + "'";
  patient += ":";
  for (const Cell& c : a.patient) {
    patient += " " + c.label + " " + (c.shown ? format_shown(*c.shown) : c.text) + ";";
  }
  out << wrap(patient, width, "", "  ");
  out << "Reference step: '" << a.reference
      << "' (marked =). A * marks a value with a method note (JSON).\n";

  out << section_title("Settings")
      << table.render(section_rows(
             a, [](const report::Step& s) -> const auto& { return s.settings; }));
  out << section_title("Mechanics")
      << table.render(section_rows(
             a, [](const report::Step& s) -> const auto& { return s.mechanics; }));
  out << section_title("Gas exchange and O2 transport")
      << table.render(section_rows(
             a, [](const report::Step& s) -> const auto& { return s.gas_exchange; }));
  out << section_title("Circulation")
      << table.render(section_rows(
             a, [](const report::Step& s) -> const auto& { return s.circulation; }));
  out << section_title("Preload")
      << "  yes = responsive, no = not responsive, grey = grey zone, invalid = cannot be read\n"
         "  under its conditions, ? = conditional: a condition that could have misled it was not\n"
         "  recorded or only not contradicted by the signals (it holds only if that is met)\n"
      << table.render(preload_rows(a)) << preload_details(a, width);
  out << section_title("Heart-lung estimate") << heart_lung_section(a, table, width);
  out << section_title("Comparison") << comparison_section(a, width);
  const std::string notes = notes_section(a, width);
  if (!notes.empty()) out << section_title("Notes and limits breached") << notes;
  out << section_title("Cautions");
  for (const auto& c : a.cautions) out << wrap(c, width, "  * ", "    ");
  return out.str();
}

ReportFormat parse_report_format(std::string_view word) {
  if (word == "text") return ReportFormat::text;
  if (word == "json") return ReportFormat::json;
  if (word == "csv") return ReportFormat::csv;
  throw InputError("--format", std::string(word), "is not a report format", "text, json or csv");
}

std::string render_report(const TrialAnalysis& a, ReportFormat format) {
  switch (format) {
    case ReportFormat::text:
      return report_text(a);
    case ReportFormat::json:
      return report_json(a).dump(2) + "\n";
    case ReportFormat::csv:
      return report_csv(a);
  }
  return report_text(a);
}

}  // namespace bb
