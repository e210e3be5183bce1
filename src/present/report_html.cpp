// The report as one self-contained XHTML-compatible page: inline CSS and
// inline SVG panels drawn by breathbeat/present/svg.hpp; no scripts, fonts or
// images from anywhere. Built from the same view as the text and JSON reports
// (report_view.hpp); every plotted point carries the JSON report's number in
// data-x/data-y. Style: black on white, readable on A4 in black and white.
#include <algorithm>
#include <cmath>
#include <map>
#include <set>
#include <sstream>

#include "breathbeat/present/display.hpp"
#include "breathbeat/present/json.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/present/svg.hpp"
#include "breathbeat/version.hpp"
#include "html_style.hpp"
#include "report_view.hpp"

namespace bb {

namespace {

using report::Cell;
using svg::escape;

// The number the JSON report writes for a value of `s` (to_json rounds).
std::string json_number(const Shown& s, double v) {
  Shown t = s;
  t.value = v;
  return svg::data_number(to_json(t)["value"].get<double>());
}

const Cell* find_cell(const std::vector<Cell>& cells, std::string_view key) {
  for (const Cell& c : cells) {
    if (c.key == key) return &c;
  }
  return nullptr;
}

// Which section of a step a key is looked up in.
enum class Section { settings, mechanics, gas, circulation };
const std::vector<Cell>& section_of(const report::Step& s, Section sec) {
  switch (sec) {
    case Section::settings:
      return s.settings;
    case Section::mechanics:
      return s.mechanics;
    case Section::gas:
      return s.gas_exchange;
    case Section::circulation:
      return s.circulation;
  }
  return s.settings;
}
const char* json_section(Section sec) {
  switch (sec) {
    case Section::settings:
      return "settings";
    case Section::mechanics:
      return "mechanics";
    case Section::gas:
      return "gas_exchange";
    case Section::circulation:
      return "circulation";
  }
  return "settings";
}

// A cell's value as people read it, in the site's display unit.
std::string cell_text(const Cell& c, const DisplayUnits& d) {
  if (!c.shown) return c.text;
  Shown s = displayed(c.key, *c.shown, d);
  s.low.reset();
  s.high.reset();
  std::string t = format_number(s.value, s.decimals);
  if (c.shown->low && c.shown->high) {
    const Shown r = displayed(c.key, *c.shown, d);
    t += " (" + format_number(*r.low, r.decimals) + " to " + format_number(*r.high, r.decimals) +
         ")";
  }
  return t;
}
std::string unit_of(const Cell& c, const DisplayUnits& d) {
  if (!c.shown) return "";
  return displayed(c.key, *c.shown, d).unit;
}

// ---- the x axis of the step plots ----------------------------------------------

// Total PEEP when every step has it and it differs between steps; otherwise the steps.
struct XAxis {
  bool peep = false;
  std::vector<double> x;            // per step, drawn
  std::vector<std::string> data_x;  // per step, as the JSON writes it (or the step's index)
  std::vector<std::string> steps;
  std::string label;
  std::vector<bool> join;       // per step: join it to the previous candidate setting
  double min = 0.0, max = 0.0;  // the PEEP axis, the same on every panel
};

XAxis x_axis(const report::View& v, const TrialAnalysis& a) {
  XAxis ax;
  std::set<double> distinct;
  bool all = !v.steps.empty();
  for (const report::Step& s : v.steps) {
    ax.steps.push_back(s.label);
    const Cell* c = find_cell(s.mechanics, "peep_total");
    if (!c || !c->shown) {
      all = false;
      continue;
    }
    distinct.insert(c->shown->value);
  }
  ax.peep = all && distinct.size() > 1;
  for (std::size_t i = 0; i < v.steps.size(); ++i) {
    if (ax.peep) {
      const Shown& s = *find_cell(v.steps[i].mechanics, "peep_total")->shown;
      ax.x.push_back(s.value);
      ax.data_x.push_back(json_number(s, s.value));
    } else {
      ax.x.push_back(static_cast<double>(i));
      ax.data_x.push_back(std::to_string(i));
    }
    // A tidal-volume challenge step, or a step marked as a manoeuvre, is a brief manoeuvre: not
    // joined to the settings' line.
    auto brief = [&](std::size_t k) {
      return k < a.steps.size() && (a.steps[k].vt_challenge_from || a.steps[k].manoeuvre_from);
    };
    const bool manoeuvre = brief(i);
    ax.join.push_back(i > 0 && !manoeuvre && !(i >= 1 && brief(i - 1)));
  }
  if (ax.peep) {
    const double lo = *distinct.begin(), hi = *distinct.rbegin();
    const std::vector<double> ticks = svg::nice_ticks(lo, hi, 5);
    const double step = ticks.size() > 1 ? ticks[1] - ticks[0] : 1.0;
    ax.min = std::floor(lo / step) * step;
    ax.max = std::ceil(hi / step) * step;
    if (ax.min == lo) ax.min -= step;
    if (ax.max == hi) ax.max += step;
  }
  ax.label = ax.peep ? "Total PEEP (expiratory hold) [cmH2O]" : "Step (PEEP the same at each)";
  return ax;
}

void set_x_axis(svg::Plot& p, const XAxis& ax) {
  p.x.label = ax.label;
  if (!ax.peep) {
    p.x.categories = ax.steps;
  } else {
    p.x.min = ax.min;
    p.x.max = ax.max;
  }
}

// One quantity of the step sections as a series (steps without it left out).
svg::Series step_series(const report::View& v, const XAxis& ax, Section sec, const char* key,
                        const std::string& name, const DisplayUnits& d, int style = 0) {
  svg::Series s;
  s.key = std::string(json_section(sec)) + "." + key;
  s.name = name;
  s.style = style;
  bool previous = false;
  for (std::size_t i = 0; i < v.steps.size(); ++i) {
    const Cell* c = find_cell(section_of(v.steps[i], sec), key);
    if (!c || !c->shown) {
      previous = false;
      continue;
    }
    const Shown shown = displayed(c->key, *c->shown, d);
    svg::Point p;
    p.x = ax.x[i];
    p.y = shown.value;
    p.data_x = ax.data_x[i];
    p.data_y = json_number(*c->shown, c->shown->value);
    p.step = v.steps[i].label;
    p.title = v.steps[i].label + ": " + format_shown(shown);
    s.points.push_back(p);
    s.joined.push_back(previous && ax.join[i]);
    previous = true;
  }
  return s;
}

std::string unit_label(const report::View& v, Section sec, const char* key, const DisplayUnits& d) {
  for (const report::Step& s : v.steps) {
    if (const Cell* c = find_cell(section_of(s, sec), key); c && c->shown)
      return displayed(c->key, *c->shown, d).unit;
  }
  return "";
}

// A threshold as the text shows it ("15 cmH2O").
std::string threshold_text(const Thresholds& t, std::string_view key) {
  const ThresholdEntry& e = t.entry(key);
  return format_number(e.value, e.value == static_cast<long long>(e.value) ? 0 : 1) +
         (e.unit.empty() ? "" : " " + e.unit);
}

// ---- page parts --------------------------------------------------------------------

struct Figure {
  std::string caption;
  std::vector<std::string> panels;  // rendered <svg>
};

std::string figure_html(const std::string& id, const Figure& f) {
  std::ostringstream o;
  o << "<figure id=\"" << escape(id) << "\">\n<div class=\"panels\">\n";
  for (const std::string& p : f.panels) o << p;
  o << "</div>\n<figcaption>" << escape(f.caption) << "</figcaption>\n</figure>\n";
  return o.str();
}

bool any_points(const svg::Plot& p) {
  for (const auto& s : p.series)
    if (!s.points.empty()) return true;
  return !p.whiskers.empty();
}

// A panel with one quantity, or nothing when no step has it.
std::optional<std::string> single_panel(const report::View& v, const XAxis& ax, Section sec,
                                        const char* key, const std::string& id,
                                        const std::string& name, const DisplayUnits& d,
                                        const std::vector<svg::Rule>& rules = {},
                                        bool zero = false) {
  svg::Plot p;
  p.id = id;
  p.title = name;
  set_x_axis(p, ax);
  p.y.label = name + " [" + unit_label(v, sec, key, d) + "]";
  p.y.include_zero = zero;
  p.series.push_back(step_series(v, ax, sec, key, "", d));
  p.rules = rules;
  if (!any_points(p)) return std::nullopt;
  return svg::render(p);
}

svg::Mark mark_of(const PreloadIndexReading& r) {
  if (r.direction == PreloadDirection::not_valid) return svg::Mark::invalid;
  if (r.conditional) return svg::Mark::conditional;
  return svg::Mark::valid;
}

std::string plain(std::string w) {
  std::replace(w.begin(), w.end(), '_', ' ');
  return w;
}

// The points of one preload index value (e.g. "ppv" of the index "ppv"), marked by its reading.
svg::Series index_series(const report::View& v, const XAxis& ax, const std::string& index,
                         const std::string& value_key, const std::string& name, int style,
                         const DisplayUnits& d) {
  svg::Series s;
  s.key = "preload." + index + "." + value_key;
  s.name = name;
  s.style = style;
  bool previous = false;
  for (std::size_t i = 0; i < v.steps.size(); ++i) {
    const report::Index* found = nullptr;
    for (const report::Index& r : v.steps[i].preload)
      if (r.key == index) found = &r;
    const Cell* c = found ? find_cell(found->values, value_key) : nullptr;
    if (!c || !c->shown || !found->reading) {
      previous = false;
      continue;
    }
    const Shown shown = displayed(c->key, *c->shown, d);
    svg::Point p;
    p.x = ax.x[i];
    p.y = shown.value;
    p.data_x = ax.data_x[i];
    p.data_y = json_number(*c->shown, c->shown->value);
    p.step = v.steps[i].label;
    p.mark = mark_of(*found->reading);
    p.title = v.steps[i].label + ": " + name + " " + format_shown(shown) + ", " +
              plain(found->reading->reading.category);
    s.points.push_back(p);
    s.joined.push_back(previous && ax.join[i]);
    previous = true;
  }
  return s;
}

// ---- the figures ------------------------------------------------------------------------

std::vector<std::string> figures(const report::View& v, const TrialAnalysis& a,
                                 const DisplayUnits& d) {
  const XAxis ax = x_axis(v, a);
  const Thresholds& t = a.limits;
  const std::string against = ax.peep ? "against total PEEP" : "by step";
  const std::string joined =
      " Points are joined in the order the steps were done (a tidal-volume challenge step stands "
      "apart).";
  std::vector<std::string> out;

  // Lung: compliance and driving pressure.
  {
    Figure f;
    if (auto p = single_panel(v, ax, Section::mechanics, "compliance_static", "plot-compliance",
                              "Static compliance", d, {}, true))
      f.panels.push_back(*p);
    std::vector<svg::Rule> rules;
    if (t.has("mechanics.driving_pressure_max"))
      rules.push_back({t.entry("mechanics.driving_pressure_max").value,
                       "limit " + threshold_text(t, "mechanics.driving_pressure_max")});
    if (auto p = single_panel(v, ax, Section::mechanics, "driving_pressure",
                              "plot-driving-pressure", "Driving pressure", d, rules, true))
      f.panels.push_back(*p);
    f.caption = "Respiratory-system static compliance and driving pressure (Pplat - total PEEP) " +
                against + "; the dashed line is the driving-pressure limit (" +
                t.source("mechanics.driving_pressure_max") + ")." + joined;
    if (!f.panels.empty()) out.push_back(figure_html("fig-lung", f));
  }
  // Oxygen: PaO2/FiO2 and DO2.
  {
    Figure f;
    if (auto p = single_panel(v, ax, Section::gas, "pf_ratio", "plot-pf-ratio", "PaO2/FiO2", d, {},
                              true))
      f.panels.push_back(*p);
    if (auto p =
            single_panel(v, ax, Section::gas, "do2", "plot-do2", "O2 delivery (DO2)", d, {}, true))
      f.panels.push_back(*p);
    f.caption = "Oxygenation (PaO2/FiO2) and oxygen delivery (DO2 = CO x CaO2) " + against +
                ": what a setting gains in the lung, and whether it reaches the tissues." + joined;
    if (!f.panels.empty()) out.push_back(figure_html("fig-oxygen", f));
  }
  // Circulation: CO (or CI) and MAP.
  {
    Figure f;
    const bool has_co = std::any_of(v.steps.begin(), v.steps.end(), [](const report::Step& s) {
      const Cell* c = find_cell(s.circulation, "co");
      return c && c->shown;
    });
    if (auto p = single_panel(v, ax, Section::circulation, has_co ? "co" : "ci", "plot-co",
                              has_co ? "Cardiac output" : "Cardiac index", d, {}, true))
      f.panels.push_back(*p);
    std::vector<svg::Rule> rules;
    if (t.has("trial.map_target"))
      rules.push_back(
          {t.entry("trial.map_target").value, "target " + threshold_text(t, "trial.map_target")});
    if (auto p = single_panel(v, ax, Section::circulation, "map", "plot-map",
                              "Mean arterial pressure", d, rules))
      f.panels.push_back(*p);
    f.caption = std::string(has_co ? "Cardiac output" : "Cardiac index") +
                " and mean arterial pressure " + against + "; the dashed line is the MAP target (" +
                t.source("trial.map_target") + ")." + joined;
    if (!f.panels.empty()) out.push_back(figure_html("fig-circulation", f));
  }
  // Preload: PPV with its grey zone, IVC indices with their cut-offs.
  {
    Figure f;
    svg::Plot p;
    p.id = "plot-ppv";
    p.title = "Pulse pressure variation";
    set_x_axis(p, ax);
    p.y.label = "PPV [%]";
    p.y.include_zero = true;
    p.bands.push_back(html::ppv_grey_zone(t));
    p.series.push_back(index_series(v, ax, "ppv", "ppv", "PPV (pulse-pressure cycles)", 0, d));
    p.series.push_back(index_series(v, ax, "ppv_monitor", "ppv", "PPV (monitor)", 1, d));
    p.series.push_back(index_series(v, ax, "ppv_signals", "ppv", "PPV (recorded waveform)", 2, d));
    p.series.erase(std::remove_if(p.series.begin(), p.series.end(),
                                  [](const svg::Series& s) { return s.points.empty(); }),
                   p.series.end());
    if (p.series.size() == 1) p.series[0].name.clear();
    if (any_points(p)) f.panels.push_back(svg::render(p));

    svg::Plot q;
    q.id = "plot-ivc";
    q.title = "IVC respiratory change";
    set_x_axis(q, ax);
    q.y.label = "IVC index [%]";
    q.y.include_zero = true;
    q.series.push_back(
        index_series(v, ax, "ivc", "ivc_distensibility", "distensibility (Dmax-Dmin)/Dmin", 0, d));
    q.series.push_back(
        index_series(v, ax, "ivc", "ivc_variation", "variation (Dmax-Dmin)/mean", 1, d));
    const double dist = in_percent(t.get<Ratio>("ivc.distensibility_responsive_above"));
    const double var = in_percent(t.get<Ratio>("ivc.variation_responsive_above"));
    q.rules.push_back({dist, "distensibility " + format_number(dist, 0) + " %"});
    q.rules.push_back({var, "variation " + format_number(var, 0) + " %"});
    if (any_points(q)) f.panels.push_back(svg::render(q));
    f.caption = "Preload indices " + against +
                ", each marked by its reading: filled circle "
                "valid, open circle conditional (holds only if an unrecorded condition is met), "
                "cross not valid (a condition failed). Hatched band: the PPV grey zone (" +
                t.source("ppv.grey_zone_low") + "); dashed lines: the IVC cut-offs (" +
                t.source("ivc.distensibility_responsive_above") + "; " +
                t.source("ivc.variation_responsive_above") + ").";
    if (!f.panels.empty()) out.push_back(figure_html("fig-preload", f));
  }
  // Heart-lung: estimated ranges beside the observed change.
  {
    Figure f;
    auto panel = [&](const char* id, const char* title, const char* est_key, const char* obs_key,
                     const std::string& y_label, const std::string& obs_name) {
      svg::Plot p;
      p.id = id;
      p.title = title;
      set_x_axis(p, ax);
      p.y.label = y_label;
      p.y.include_zero = true;
      p.whisker_name = "estimated (range, central value)";
      svg::Series obs;
      obs.key = std::string("heart_lung.observed.") + obs_key;
      obs.name = obs_name;
      obs.line = false;
      // Beside the estimate: a small offset on the drawing only.
      const double offset = ax.peep ? 0.35 : 0.12;
      for (const report::HeartLung& h : v.heart_lung) {
        std::size_t i = 0;
        while (i < v.steps.size() && v.steps[i].label != h.step) ++i;
        if (i == v.steps.size()) continue;
        if (const Cell* c = find_cell(h.estimated, est_key); c && c->shown) {
          const Shown& s = *c->shown;
          svg::Whisker w;
          w.key = std::string("heart_lung.estimated.") + est_key;
          w.x = ax.x[i] - offset;
          w.data_x = ax.data_x[i];
          w.step = h.step;
          w.low = s.low ? *s.low : s.value;
          w.high = s.high ? *s.high : s.value;
          w.mid = s.value;
          w.data_low = json_number(s, w.low);
          w.data_high = json_number(s, w.high);
          w.data_y = json_number(s, s.value);
          w.title = h.step + ": estimated " + format_shown(s);
          p.whiskers.push_back(w);
        }
        if (const Cell* c = find_cell(h.observed, obs_key); c && c->shown) {
          svg::Point pt;
          pt.x = ax.x[i] + offset;
          pt.y = c->shown->value;
          pt.data_x = ax.data_x[i];
          pt.data_y = json_number(*c->shown, c->shown->value);
          pt.step = h.step;
          pt.title = h.step + ": observed " + format_shown(*c->shown);
          obs.points.push_back(pt);
        }
      }
      p.series.push_back(obs);
      if (any_points(p)) f.panels.push_back(svg::render(p));
    };
    panel("plot-rap-change", "Right-atrial pressure change", "right_atrial_pressure_change",
          "observed_cvp_change", "RAP or CVP change [mmHg]", "CVP change, observed");
    panel("plot-venous-return", "Venous-return gradient and cardiac output",
          "venous_return_gradient_change", "observed_co_change", "Change [%]",
          "CO change, observed");
    f.caption = "Heart-lung estimate against " + v.references_text() +
                ": left, the estimated rise in right-atrial pressure (whisker: the range from "
                "the assumed Ecw/Ers; bar: the central value) beside the CVP change measured; "
                "right, the estimated change in the venous-return gradient (an upper bound) "
                "beside the measured change in cardiac output.";
    if (!f.panels.empty()) out.push_back(figure_html("fig-heart-lung", f));
  }
  return out;
}

// ---- tables ---------------------------------------------------------------------------------

// Notes become numbered footnotes of the table they are in.
struct Footnotes {
  std::vector<std::string> texts;
  std::size_t number(const std::string& note) {
    for (std::size_t i = 0; i < texts.size(); ++i)
      if (texts[i] == note) return i + 1;
    texts.push_back(note);
    return texts.size();
  }
  std::string html() const {
    if (texts.empty()) return "";
    std::ostringstream o;
    o << "<ol class=\"footnotes\">\n";
    for (const std::string& t : texts) o << "<li>" << escape(t) << "</li>\n";
    o << "</ol>\n";
    return o.str();
  }
};

std::string step_header(const report::View& v, const std::string& first) {
  std::ostringstream o;
  o << "<thead><tr><th scope=\"col\" class=\"label\">" << escape(first) << "</th>";
  for (const report::Step& s : v.steps) {
    o << "<th scope=\"col\">" << escape(s.label);
    if (v.is_reference(s.label)) o << " <span class=\"ref\">(reference)</span>";
    if (!s.time.empty()) o << "<br/><span class=\"time\">" << escape(s.time) << "</span>";
    o << "</th>";
  }
  o << "</tr></thead>\n";
  return o.str();
}

// A table of one section: a row per key in the order first met, a column per step.
std::string section_table(const report::View& v, Section sec, const std::string& id,
                          const DisplayUnits& d) {
  std::vector<std::pair<std::string, std::string>> rows;  // key, label [unit]
  for (const report::Step& s : v.steps) {
    for (const Cell& c : section_of(s, sec)) {
      if (std::none_of(rows.begin(), rows.end(), [&](const auto& r) { return r.first == c.key; })) {
        const std::string unit = unit_of(c, d);
        rows.push_back({c.key, c.label + (unit.empty() ? "" : " [" + unit + "]")});
      }
    }
  }
  if (rows.empty()) return "";
  Footnotes notes;
  std::ostringstream o;
  o << "<table class=\"steps\" id=\"" << escape(id) << "\">\n" << step_header(v, "");
  o << "<tbody>\n";
  for (const auto& [key, label] : rows) {
    o << "<tr><th scope=\"row\" class=\"label\">" << escape(label) << "</th>";
    for (const report::Step& s : v.steps) {
      const Cell* c = find_cell(section_of(s, sec), key);
      o << "<td>";
      if (!c) {
        o << "-";
      } else {
        o << escape(cell_text(*c, d));
        if (!c->note.empty()) o << "<sup>" << notes.number(c->note) << "</sup>";
      }
      o << "</td>";
    }
    o << "</tr>\n";
  }
  o << "</tbody></table>\n" << notes.html();
  return o.str();
}

// The summary (report::Summary): one column per step, the quantities a decision rests on, and
// the preload statement with its conditional mark.
std::string summary_table(const report::View& v, const DisplayUnits& d) {
  std::ostringstream o;
  o << "<table class=\"steps summary\" id=\"summary-table\">\n" << step_header(v, "");
  o << "<tbody>\n";
  for (const report::SummaryRow& r : v.summary.rows) {
    std::string unit;
    for (const auto& c : r.cells) {
      if (c && unit.empty()) unit = unit_of(*c, d);
    }
    o << "<tr data-key=\"" << escape(r.key) << "\"><th scope=\"row\" class=\"label\">"
      << escape(r.label) << (unit.empty() ? "" : " [" + escape(unit) + "]") << "</th>";
    for (const auto& c : r.cells) o << "<td>" << (c ? escape(cell_text(*c, d)) : "-") << "</td>";
    o << "</tr>\n";
  }
  o << "<tr class=\"statement\"><th scope=\"row\" class=\"label\">Preload</th>";
  for (const report::SummaryPreload& p : v.summary.preload) {
    o << "<td>" << escape(p.word);
    if (p.conditional) o << " <span class=\"cond\">(conditional)</span>";
    o << "</td>";
  }
  o << "</tr>\n</tbody></table>\n";
  return o.str();
}

std::string list_html(const std::vector<std::string>& items, const char* cls = nullptr) {
  if (items.empty()) return "";
  std::ostringstream o;
  o << "<ul" << (cls ? std::string(" class=\"") + cls + "\"" : "") << ">\n";
  for (const std::string& i : items) o << "<li>" << escape(i) << "</li>\n";
  o << "</ul>\n";
  return o.str();
}

}  // namespace

std::string report_html(const TrialAnalysis& analysis) {
  const report::View v = report::view_of(analysis);
  const DisplayUnits& d = v.display;
  std::ostringstream o;
  const std::string who = v.patient_label.empty() ? "(no label)" : v.patient_label;
  o << "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\" "
       "xml:lang=\"en\">\n"
       "<head>\n<meta charset=\"utf-8\"/>\n"
       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n"
       "<title>PEEP trial: "
    << escape(who) << " (breathbeat)</title>\n<style>" << html::kStyle
    << "</style>\n</head>\n<body>\n";

  // The top of the page: who, when, the cautions.
  std::string first_time, last_time;
  for (const report::Step& s : v.steps) {
    if (s.time.empty()) continue;
    if (first_time.empty()) first_time = s.time;
    last_time = s.time;
  }
  o << "<header id=\"top\">\n<h1>PEEP trial, setting by setting</h1>\n<p class=\"who\">"
    << "<span>Patient: <strong id=\"patient-label\">" << escape(who) << "</strong></span>"
    << "<span>Trial: <strong id=\"trial-time\">"
    << escape(v.trials.size() > 1 ? ""
              : v.date.empty()    ? ""
                                  : v.date + ", ")
    << escape(v.trials.size() > 1       ? std::string("several trials side by side")
              : first_time.empty()      ? std::string("time not recorded")
              : first_time == last_time ? first_time
                                        : first_time + " to " + last_time)
    << "</strong></span><span>" << v.steps.size() << " step" << (v.steps.size() == 1 ? "" : "s")
    << ", " << escape(v.references_text()) << "</span></p>\n";
  o << "<section class=\"cautions\" id=\"cautions\">\n<h2>Before you act</h2>\n"
    << list_html(v.cautions) << "</section>\n";
  if (!v.voided.empty()) {
    std::vector<std::string> voided;
    for (const report::Voided& x : v.voided) voided.push_back(x.text);
    o << "<section id=\"voided\">\n<h2>Voided steps</h2>\n<p>Left out of every table and "
         "plot; the trial file keeps them.</p>\n"
      << list_html(voided) << "</section>\n";
  }
  o << "</header>\n";

  // The answer first.
  o << "<section id=\"summary\">\n<h2>Summary</h2>\n<div class=\"wide\">\n"
    << summary_table(v, d) << "</div>\n";
  std::vector<std::string> statements;
  for (const report::Step& s : v.steps)
    if (!s.statement.text.empty()) statements.push_back(s.label + ": " + s.statement.text);
  if (!statements.empty())
    o << "<h3>Preload, step by step</h3>\n" << list_html(statements, "statements");
  std::vector<std::string> answer = v.summary.stops;
  answer.insert(answer.end(), v.summary.trade_offs.begin(), v.summary.trade_offs.end());
  for (const report::NextStep& n : v.summary.next_steps) {
    std::string at;
    for (const std::string& step : n.steps) at += (at.empty() ? "" : ", ") + step;
    answer.push_back((at.empty() ? "" : at + ": ") + n.text);
  }
  if (!answer.empty())
    o << (v.summary.stops.empty() ? "<h3>Trade-offs and what still applies</h3>\n"
                                  : "<h3>Stop, trade-offs and what still applies</h3>\n")
      << list_html(answer);
  o << "</section>\n";

  // The plots.
  const std::vector<std::string> figs = figures(v, analysis, d);
  o << "<section id=\"plots\" class=\"page\">\n<h2>Plots</h2>\n";
  for (const std::string& f : figs) o << f;
  o << "</section>\n";

  // Details.
  o << "<section id=\"details\" class=\"page\">\n<h2>Details</h2>\n";
  struct Part {
    Section sec;
    const char* title;
    const char* id;
  };
  for (const Part& p : {Part{Section::settings, "Settings", "table-settings"},
                        Part{Section::mechanics, "Mechanics", "table-mechanics"},
                        Part{Section::gas, "Gas exchange and O2 transport", "table-gas-exchange"},
                        Part{Section::circulation, "Circulation", "table-circulation"}}) {
    const std::string t = section_table(v, p.sec, p.id, d);
    if (!t.empty()) o << "<h3>" << p.title << "</h3>\n<div class=\"wide\">\n" << t << "</div>\n";
  }
  o << "<h3>Comparison of the steps</h3>\n<ul class=\"findings\">\n";
  for (const report::Finding& f : v.comparison) {
    o << "<li" << (f.flagged ? " class=\"flagged\"" : "") << ">" << escape(f.text);
    if (!f.source.empty()) o << " <span class=\"source\">(" << escape(f.source) << ")</span>";
    o << "</li>\n";
  }
  o << "</ul>\n";
  o << "<h3>Preload readings</h3>\n<ul class=\"statements\">\n";
  for (const report::Step& s : v.steps) {
    for (const report::Index& r : s.preload) {
      if (!r.reading) continue;
      o << "<li><strong>" << escape(s.label) << "</strong>, " << escape(r.label) << " ("
        << svg::mark_word(mark_of(*r.reading)) << "): " << escape(reading_text(r.reading->reading))
        << "</li>\n";
    }
  }
  o << "</ul>\n";
  std::vector<std::string> flags;
  for (const report::Step& s : v.steps)
    for (const Flag& f : s.flags)
      flags.push_back(s.label + ": " + f.message + " (" + f.source + ")");
  if (!flags.empty()) o << "<h3>Limits breached</h3>\n" << list_html(flags);
  std::vector<std::string> hl_notes;
  for (const report::HeartLung& h : v.heart_lung) {
    for (const std::string& n : h.notes)
      if (std::find(hl_notes.begin(), hl_notes.end(), n) == hl_notes.end()) hl_notes.push_back(n);
  }
  if (!hl_notes.empty()) o << "<h3>Heart-lung estimate: method</h3>\n" << list_html(hl_notes);
  std::vector<std::string> step_notes;
  for (const report::Step& s : v.steps)
    for (const std::string& n : s.notes) step_notes.push_back(s.label + ": " + n);
  for (const std::string& n : v.notes) step_notes.push_back(n);
  if (!step_notes.empty()) o << "<h3>Notes</h3>\n" << list_html(step_notes);
  std::vector<std::string> limits;
  for (const auto& [k, text] : v.thresholds_used) limits.push_back(k + ": " + text);
  if (!limits.empty()) o << "<h3>Thresholds used</h3>\n" << list_html(limits);
  o << "</section>\n";

  o << "<footer>" << escape(std::string(kToolName) + " " + kVersion) << ", report of "
    << escape(v.file) << ". Decision support only: read the cautions at the top.</footer>\n";
  o << "</body>\n</html>\n";
  return o.str();
}

}  // namespace bb
