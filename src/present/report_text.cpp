// The report as text: steps as columns, units in the row labels, wrapped into
// several column blocks when the steps do not fit the width.
#include <algorithm>
#include <cctype>
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
std::string cell_text(const Cell& c, const DisplayUnits& d) {
  if (!c.shown) return c.text;
  const Shown s = displayed(c.key, *c.shown, d);
  if (s.low && s.high)
    return format_number(*s.low, s.decimals) + " to " + format_number(*s.high, s.decimals);
  return format_number(s.value, s.decimals);
}

// The row label with its unit in the display units: "PaO2 [kPa]".
std::string label_of(const Cell& c, const DisplayUnits& d) {
  std::string label = c.label;
  if (c.shown && !c.shown->unit.empty())
    label += " [" + displayed_unit(c.key, c.shown->unit, d) + "]";
  return label;
}

// A cell note that only repeats the value in another blood-gas unit ("15.1 kPa") is not a
// footnote: the site chooses the unit ([display] preset).
bool footnote_worthy(const Cell& c) {
  if (c.note.empty() || c.note == "as written") return false;
  if (!c.shown) return true;
  if (!is_blood_gas_key(c.key)) return true;
  const std::size_t sp = c.note.find(' ');
  if (sp == std::string::npos) return true;
  const std::string number = c.note.substr(0, sp), unit = c.note.substr(sp + 1);
  return !((unit == "kPa" || unit == "mmHg") &&
           number.find_first_not_of("0123456789.") == std::string::npos);
}

// One table row: a label with unit and one cell per step, each with its note (or "").
struct Row {
  std::string label;
  std::vector<std::string> cells;
  std::vector<std::string> notes;
};

// Rows from per-step cell lists, keyed by Cell::key, in order of first appearance.
std::vector<Row> rows_of(const std::vector<const std::vector<Cell>*>& per_step,
                         const DisplayUnits& d) {
  std::vector<Row> rows;
  std::vector<std::string> keys;
  for (std::size_t i = 0; i < per_step.size(); ++i) {
    for (const Cell& c : *per_step[i]) {
      auto it = std::find(keys.begin(), keys.end(), c.key);
      std::size_t r = static_cast<std::size_t>(it - keys.begin());
      if (it == keys.end()) {
        keys.push_back(c.key);
        rows.push_back(Row{label_of(c, d), std::vector<std::string>(per_step.size(), "-"),
                           std::vector<std::string>(per_step.size())});
      } else if (c.shown && rows[r].label == c.label) {
        // A row opened by a word ("not read") takes its unit from its first number.
        rows[r].label = label_of(c, d);
      }
      rows[r].cells[i] = cell_text(c, d);
      if (footnote_worthy(c)) rows[r].notes[i] = c.note;
    }
  }
  return rows;
}

// Numbered notes of the table cells ([1], [2], ...), printed under the table that first uses
// them; a note used again keeps its number.
class Footnotes {
 public:
  std::size_t number(const std::string& note, const std::string& label) {
    for (std::size_t i = 0; i < items_.size(); ++i) {
      if (items_[i].note != note) continue;
      auto& labels = items_[i].labels;
      if (std::find(labels.begin(), labels.end(), label) == labels.end()) labels.push_back(label);
      return i + 1;
    }
    items_.push_back({note, {label}});
    return items_.size();
  }
  // The notes numbered since the last call, one per line.
  std::string take_new(std::size_t width) {
    std::string out;
    for (; printed_ < items_.size(); ++printed_) {
      const Item& it = items_[printed_];
      std::string where;
      for (const auto& l : it.labels) where += (where.empty() ? "" : ", ") + l;
      out += wrap(where + ": " + it.note, width, "  [" + std::to_string(printed_ + 1) + "] ",
                  "      ");
    }
    return out;
  }

 private:
  struct Item {
    std::string note;
    std::vector<std::string> labels;  // the rows (label without unit) that carry it
  };
  std::vector<Item> items_;
  std::size_t printed_ = 0;
};

// A label without its " [unit]" (for the footnote lines).
std::string bare_label(const std::string& label) {
  const std::size_t cut = label.rfind(" [");
  return cut == std::string::npos ? label : label.substr(0, cut);
}

// The footnote marks of a row: on the label when every filled cell has the same note, else on
// each cell.
void mark_notes(Row& r, Footnotes& notes) {
  std::string shared;
  bool same = true, any = false;
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    if (r.cells[i] == "-") continue;
    if (!any) shared = r.notes[i];
    same = same && r.notes[i] == shared;
    any = true;
  }
  if (!any) return;
  if (same) {
    if (!shared.empty())
      r.label += " [" + std::to_string(notes.number(shared, bare_label(r.label))) + "]";
    return;
  }
  for (std::size_t i = 0; i < r.cells.size(); ++i) {
    if (!r.notes[i].empty())
      r.cells[i] += " [" + std::to_string(notes.number(r.notes[i], bare_label(r.label))) + "]";
  }
}

// `text` in lines of at most `width` displayed characters, broken at spaces (a word longer
// than the width is a line of its own: nothing is cut).
std::vector<std::string> word_lines(const std::string& text, std::size_t width) {
  std::istringstream words(text);
  std::vector<std::string> lines;
  std::string word, line;
  std::vector<std::string> tokens;
  while (words >> word) {
    // A unit or footnote mark ("[mL/min]", "[8]") stays with the word before it.
    if (!tokens.empty() && word.front() == '[') {
      tokens.back() += " " + word;
    } else {
      tokens.push_back(word);
    }
  }
  for (const std::string& token : tokens) {
    word = token;
    if (!line.empty() && shown_width(line) + 1 + shown_width(word) > width) {
      lines.push_back(line);
      line.clear();
    }
    line += (line.empty() ? "" : " ") + word;
  }
  if (!line.empty() || lines.empty()) lines.push_back(line);
  return lines;
}

// The widest piece word_lines never breaks.
std::size_t longest_word(const std::string& text) {
  std::size_t n = 0;
  for (const std::string& piece : word_lines(text, 0)) n = std::max(n, shown_width(piece));
  return n;
}

constexpr std::size_t kMaxStepName = 14;

class Table {
 public:
  Table(const View& a, std::size_t width, Footnotes& notes) : a_(a), width_(width), notes_(notes) {}

  std::string render(std::vector<Row> rows) const {
    if (rows.empty()) return "  (nothing recorded)\n";
    for (Row& r : rows) mark_notes(r, notes_);
    std::size_t label_w = 0;
    for (const Row& r : rows) label_w = std::max(label_w, shown_width(r.label));
    label_w = std::min(label_w, kMaxLabel);
    for (const Row& r : rows) label_w = std::max(label_w, longest_word(r.label));
    label_w += 2;
    std::vector<std::size_t> col_w(a_.steps.size(), kMinColumn);
    for (std::size_t i = 0; i < a_.steps.size(); ++i) {
      const std::string name = step_name(i);
      col_w[i] = std::max(col_w[i], std::min(shown_width(name), kMaxStepName) + 2);
      col_w[i] = std::max(col_w[i], longest_word(name) + 2);
      col_w[i] = std::max(col_w[i], shown_width(a_.steps[i].time) + 2);
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
        // A long label wraps; its cells stand on its last line.
        const std::vector<std::string> lines = word_lines(r.label, label_w - 2);
        for (std::size_t l = 0; l + 1 < lines.size(); ++l)
          out += "  " + (l ? std::string("  ") : std::string()) + lines[l] + "\n";
        std::string line = "  " + pad_right((lines.size() > 1 ? "  " : "") + lines.back(), label_w);
        for (std::size_t i = first; i < last; ++i) line += pad_left(r.cells[i], col_w[i]);
        out += line + "\n";
      }
      first = last;
    }
    return out + notes_.take_new(width_);
  }

 private:
  std::string step_name(std::size_t i) const {
    return a_.steps[i].label + (a_.is_reference(a_.steps[i].label) ? "=" : "");
  }
  std::string header(std::size_t first, std::size_t last, std::size_t label_w,
                     const std::vector<std::size_t>& col_w) const {
    // Step names wrap at spaces over as many header lines as the longest needs.
    std::vector<std::vector<std::string>> names;
    std::size_t lines = 1;
    for (std::size_t i = first; i < last; ++i) {
      names.push_back(word_lines(step_name(i), col_w[i] - 2));
      lines = std::max(lines, names.back().size());
    }
    std::string out;
    for (std::size_t l = 0; l < lines; ++l) {
      std::string line = "  " + pad_right(l + 1 == lines ? "step" : "", label_w);
      for (std::size_t i = first; i < last; ++i) {
        const auto& n = names[i - first];
        const std::size_t pad = lines - n.size();  // names end on the same line
        line += pad_left(l >= pad ? n[l - pad] : "", col_w[i]);
      }
      out += line + "\n";
    }
    std::string times = "  " + pad_right("", label_w);
    bool any_time = false;
    for (std::size_t i = first; i < last; ++i) {
      times += pad_left(a_.steps[i].time, col_w[i]);
      any_time = any_time || !a_.steps[i].time.empty();
    }
    return out + (any_time ? times + "\n" : "");
  }
  const View& a_;
  std::size_t width_;
  Footnotes& notes_;
};

std::string section_title(const std::string& title) {
  return "\n" + title + "\n";
}

template <class Get>
std::vector<Row> section_rows(const View& a, Get get) {
  std::vector<const std::vector<Cell>*> per_step;
  for (const auto& s : a.steps) per_step.push_back(&get(s));
  return rows_of(per_step, a.display);
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

// The row label of a preload index: its people's name ("Pulse pressure variation (per
// breath)"); the tidal-volume challenge without its step pair (the columns show the step).
std::string index_row_label(const report::Index& idx) {
  if (idx.reading->index == PreloadIndex::vt_challenge) return "Tidal-volume challenge";
  if (idx.reading->index == PreloadIndex::manoeuvre) {
    const auto paren = idx.label.find(" ('");
    return idx.label.substr(0, paren) + " (with the step before)";
  }
  return idx.label;
}

std::string summary_word(const report::SummaryPreload& p) {
  return p.word + (p.conditional ? "?" : "");
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
        rows.push_back(Row{index_row_label(idx), std::vector<std::string>(n, "-"),
                           std::vector<std::string>(n)});
      }
      rows[r].cells[i] = short_reading(*idx.reading);
    }
  }
  // A manoeuvre's reading is at its step; the step it is read against is marked its baseline.
  for (std::size_t i = 0; i < n; ++i) {
    for (const auto& idx : a.steps[i].preload) {
      if (idx.reading->index != PreloadIndex::manoeuvre) continue;
      const std::size_t r =
          static_cast<std::size_t>(std::find(keys.begin(), keys.end(), idx.key) - keys.begin());
      for (std::size_t b = 0; b < n; ++b) {
        if (b != i && a.steps[b].label == idx.reading->from_step && rows[r].cells[b] == "-")
          rows[r].cells[b] = "baseline";
      }
    }
  }
  Row overall{"Overall preload statement", {}, std::vector<std::string>(n)};
  for (const auto& p : a.summary.preload) overall.cells.push_back(summary_word(p));
  rows.push_back(overall);
  return rows;
}

std::string gate_text(const Gate& g) {
  const std::string state = g.state == GateState::not_contradicted
                                ? "not contradicted by the signals, not proven"
                                : to_string(g.state);
  std::string t = state + ": " + gate_label(g);
  const std::string detail = gate_detail(g);
  if (!detail.empty()) t += " (" + detail + ")";
  return t;
}

std::string preload_details(const View& a, std::size_t width) {
  std::string out;
  for (const auto& s : a.steps) {
    out += wrap(s.statement.text, width, "  " + s.label + ": ", "      ");
    for (const auto& idx : s.preload) {
      out += wrap(reading_text(idx.reading->reading), width, "    - " + idx.label + ": ", "        ");
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

// A text cut into the parts between its numbers and the numbers themselves ("+4.0", "12"):
// texts that differ only in their numbers share the parts.
struct NumberedText {
  std::vector<std::string> parts;  // parts.size() == numbers.size() + 1
  std::vector<std::string> numbers;
};

bool digit(char c) {
  return c >= '0' && c <= '9';
}

NumberedText numbered(const std::string& t) {
  NumberedText out{{""}, {}};
  std::size_t i = 0;
  while (i < t.size()) {
    const bool sign = (t[i] == '+' || t[i] == '-') && i + 1 < t.size() && digit(t[i + 1]) &&
                      (i == 0 || t[i - 1] == ' ' || t[i - 1] == '(');
    // A digit inside a word ("PaO2", "Ecw/Ers") is part of the word, not a number.
    const bool starts =
        sign || (digit(t[i]) && (i == 0 || !std::isalpha(static_cast<unsigned char>(t[i - 1]))));
    if (!starts) {
      out.parts.back() += t[i++];
      continue;
    }
    std::size_t j = i + (sign ? 1 : 0);
    while (j < t.size() && (digit(t[j]) || (t[j] == '.' && j + 1 < t.size() && digit(t[j + 1]))))
      ++j;
    if (j < t.size() && std::isalpha(static_cast<unsigned char>(t[j])) && t[j] != 'x') {
      out.parts.back() += t.substr(i, j - i);  // "2nd", "O2" stay words
      i = j;
      continue;
    }
    out.numbers.push_back(t.substr(i, j - i));
    out.parts.push_back("");
    i = j;
  }
  return out;
}

// Texts said at several steps, each once: the steps named, numbers that differ by step written
// "a/b/c" in the order of the steps.
struct Grouped {
  NumberedText text;
  std::vector<std::vector<std::string>> numbers;  // per step that says it
  std::vector<std::string> steps;
};

void group_text(std::vector<Grouped>& groups, const std::string& text, const std::string& step) {
  NumberedText n = numbered(text);
  for (Grouped& g : groups) {
    if (g.text.parts != n.parts) continue;
    if (std::find(g.steps.begin(), g.steps.end(), step) != g.steps.end()) return;
    g.steps.push_back(step);
    g.numbers.push_back(n.numbers);
    return;
  }
  groups.push_back(Grouped{n, {n.numbers}, {step}});
}

// The grouped text and whether some number differs by step.
std::pair<std::string, bool> grouped_text(const Grouped& g) {
  std::string out = g.text.parts[0];
  bool varies = false;
  for (std::size_t k = 0; k < g.text.numbers.size(); ++k) {
    std::vector<std::string> values;
    for (const auto& n : g.numbers) values.push_back(n[k]);
    const bool same = std::all_of(values.begin(), values.end(),
                                  [&](const std::string& v) { return v == values.front(); });
    std::string v = values.front();
    if (!same) {
      v.clear();
      for (const auto& x : values) v += (v.empty() ? "" : "/") + x;
      varies = true;
    }
    out += v + g.text.parts[k + 1];
  }
  return {out, varies};
}

std::string steps_named(const View& a, const std::vector<std::string>& steps) {
  if (steps.size() == a.steps.size() && steps.size() > 1) return "all steps";
  std::string where;
  for (const auto& l : steps) where += (where.empty() ? "" : ", ") + l;
  return where;
}

std::string grouped_line(const View& a, const Grouped& g, std::size_t width, const char* mark) {
  const auto [text, varies] = grouped_text(g);
  std::string where = steps_named(a, g.steps);
  if (varies) where += "; values by step in that order";
  // The steps wrap with the words (a long step name never pushes a line past the width).
  return wrap("(" + where + ") " + text, width, std::string("  ") + mark + " ", "    ");
}

std::string heart_lung_section(const View& a, const Table& table, std::size_t width) {
  std::vector<const std::vector<Cell>*> per_step;
  std::vector<std::vector<Cell>> merged;
  for (const auto& h : a.heart_lung) {
    std::vector<Cell> m = h.estimated;
    m.insert(m.end(), h.observed.begin(), h.observed.end());
    merged.push_back(std::move(m));
  }
  per_step.reserve(merged.size());
  for (const auto& m : merged) per_step.push_back(&m);
  std::string out =
      "  Against " + a.references_text() +
      " (marked =). Estimates are ranges over the chest-wall share Ecw/Ers unless it was "
      "measured; observed changes are beside them.\n";
  out = wrap(out, width, "", "  ");
  out += table.render(rows_of(per_step, a.display));
  // A note said at several steps is one line naming them ("'PEEP 10': " leads a step's own).
  std::vector<Grouped> groups;
  for (const auto& h : a.heart_lung) {
    const std::string lead = "'" + h.step + "': ";
    for (const std::string& n : h.notes) {
      if (n.rfind(lead, 0) == 0) {
        group_text(groups, n.substr(lead.size()), h.step);
      } else {
        group_text(groups, n, "");
      }
    }
  }
  for (const Grouped& g : groups) {
    if (g.steps.size() == 1 && g.steps.front().empty()) {
      out += wrap(grouped_text(g).first, width, "  - ", "    ");
      continue;
    }
    Grouped named = g;
    named.steps.erase(std::remove(named.steps.begin(), named.steps.end(), std::string()),
                      named.steps.end());
    if (named.steps.empty()) {
      out += wrap(grouped_text(g).first, width, "  - ", "    ");
    } else {
      out += grouped_line(a, named, width, "-");
    }
  }
  return out;
}

std::string comparison_section(const View& a, std::size_t width) {
  if (a.comparison.empty()) return "  Nothing to compare (one step, or no comparable values).\n";
  std::string out;
  for (const report::Finding& f : a.comparison) {
    // Limit breaches stand once, under "Limits breached"; the trade-off leads the summary.
    if (f.key == to_string(FindingKind::limit_breach) || f.key == to_string(FindingKind::trade_off))
      continue;
    std::string text = f.text;
    if (!f.source.empty()) text += " [" + f.source + "]";
    out += wrap(text, width, f.flagged ? "  ! " : "  - ", "    ");
  }
  return out + "  These are findings, not a recommended setting.\n";
}

// Each limit breached once: a breach at several steps is one line naming them.
std::string limits_section(const View& a, std::size_t width) {
  std::vector<Grouped> groups;
  for (const auto& s : a.steps) {
    for (const auto& f : s.flags)
      group_text(groups, f.message + (f.source.empty() ? "" : " [" + f.source + "]"), s.label);
  }
  std::string out;
  for (const Grouped& g : groups) out += grouped_line(a, g, width, "!");
  return out;
}

// Method notes, each once, with the steps it applies to (the appendix).
std::string notes_section(const View& a, std::size_t width) {
  std::vector<Grouped> groups;
  for (const auto& s : a.steps) {
    for (const auto& n : s.notes) group_text(groups, n, s.label);
  }
  std::string out;
  for (const Grouped& g : groups) out += grouped_line(a, g, width, "-");
  for (const auto& n : a.notes) out += wrap(n, width, "  - ", "    ");
  return out;
}

// The answer first: the summary table, the trade-offs, what still applies where nothing could
// be read, the cautions in short.
std::string summary_section(const View& a, const Table& table, std::size_t width) {
  const report::Summary& sum = a.summary;
  std::vector<Row> rows;
  const std::size_t n = a.steps.size();
  for (const report::SummaryRow& r : sum.rows) {
    Row row{r.label, std::vector<std::string>(n, "-"), std::vector<std::string>(n)};
    for (std::size_t i = 0; i < n && i < r.cells.size(); ++i) {
      if (!r.cells[i]) continue;
      const Cell& c = *r.cells[i];
      if (c.shown && !c.shown->unit.empty())
        row.label = r.label + " [" + displayed_unit(c.key, c.shown->unit, a.display) + "]";
      row.cells[i] = cell_text(c, a.display);
      if (footnote_worthy(c)) row.notes[i] = c.note;
    }
    rows.push_back(std::move(row));
  }
  Row preload{"Preload statement", {}, std::vector<std::string>(n)};
  bool any_conditional = false, any_baseline = false;
  for (const auto& p : sum.preload) {
    preload.cells.push_back(summary_word(p));
    any_conditional = any_conditional || p.conditional;
    any_baseline = any_baseline || p.word == "baseline";
  }
  rows.push_back(preload);
  std::string out = table.render(rows);
  out += wrap(
      std::string("Preload: n/a = not assessable") +
          (any_baseline ? "; baseline = the baseline of a manoeuvre, read at the next step" : "") +
          (any_conditional ? "; ? = holds only if unrecorded conditions are met" : "") +
          " (see Preload).",
      width, "  ", "    ");
  for (const std::string& t : sum.stops) out += wrap(t, width, "  ! ", "    ");
  for (const std::string& t : sum.trade_offs) out += wrap(t, width, "  ! ", "    ");
  for (const report::NextStep& s : sum.next_steps) {
    std::string where;
    for (const auto& l : s.steps) where += (where.empty() ? "" : ", ") + l;
    out += wrap(where + ": " + s.text, width, "  > ", "    ");
  }
  return out;
}

}  // namespace

std::string report_text(const TrialAnalysis& analysis, std::size_t width) {
  const View a = report::view_of(analysis);
  Footnotes footnotes;
  const Table table(a, width, footnotes);
  std::ostringstream out;
  out << kToolName << " " << kVersion << " - heart-lung trial report\n";
  if (!a.file.empty()) out << "File: " << a.file << "\n";
  if (!a.trials.empty()) {
    std::string names;
    for (const auto& t : a.trials) names += (names.empty() ? "" : ", ") + t;
    out << wrap("Trials side by side: " + names +
                    " (each step is named by its trial; each trial is read against its own "
                    "first step)",
                width, "", "  ");
  } else if (!a.date.empty()) {
    out << "Trial date: " << a.date << "\n";
  }
  std::string patient = "Patient";
  if (!a.patient_label.empty()) patient += " '" + a.patient_label + "'";
  patient += ":";
  for (const Cell& c : a.patient) {
    patient += " " + c.label + " " + (c.shown ? format_shown(*c.shown) : c.text) + ";";
  }
  out << wrap(patient, width, "", "  ");
  const std::string reference = a.references.size() > 1 ? "Reference steps: " + a.references_text()
                                                        : "Reference step: '" + a.reference + "'";
  out << wrap(reference + " (marked =). [n]: numbered notes under each table.", width, "", "  ");

  if (!a.voided.empty()) {
    out << "Voided steps, left out of every table (the file keeps them):\n";
    for (const report::Voided& x : a.voided) out << wrap(x.text, width, "  - ", "    ");
  }
  out << section_title("Summary") << summary_section(a, table, width);
  std::string brief;
  for (const auto& c : a.cautions_short) brief += (brief.empty() ? "" : "; ") + c;
  out << wrap("Cautions in short: " + brief + " (in full after the details).", width, "", "  ");

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
         "  recorded or only not contradicted by the signals (it holds only if that is met),\n"
         "  baseline = the step a manoeuvre at the next step is read against\n"
      << table.render(preload_rows(a)) << preload_details(a, width);
  out << section_title("Heart-lung estimate") << heart_lung_section(a, table, width);
  out << section_title("Comparison") << comparison_section(a, width);
  const std::string limits = limits_section(a, width);
  if (!limits.empty()) out << section_title("Limits breached") << limits;
  out << section_title("Cautions");
  for (const auto& c : a.cautions) out << wrap(c, width, "  * ", "    ");
  const std::string notes = notes_section(a, width);
  if (!notes.empty()) out << section_title("Appendix: method notes") << notes;
  return out.str();
}

ReportFormat parse_report_format(std::string_view typed) {
  const std::string word = ascii_lower(typed);  // "JSON", "Html" read as json, html
  if (word == "text") return ReportFormat::text;
  if (word == "json") return ReportFormat::json;
  if (word == "csv") return ReportFormat::csv;
  if (word == "html") return ReportFormat::html;
  throw InputError("--format", std::string(typed), "is not a report format",
                   "text, json, csv or html");
}

std::string render_report(const TrialAnalysis& a, ReportFormat format) {
  switch (format) {
    case ReportFormat::text:
      return report_text(a);
    case ReportFormat::json:
      return report_json(a).dump(2) + "\n";
    case ReportFormat::csv:
      return report_csv(a);
    case ReportFormat::html:
      return report_html(a);
  }
  return report_text(a);
}

}  // namespace bb
