// `breathbeat wave --format html` (breathbeat/present/wave_html.hpp): the
// record summary, a decimated strip with the detected beats and breaths, and
// the PPV trend, drawn with breathbeat's own SVG panels.
#include "breathbeat/present/wave_html.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

#include "breathbeat/present/json.hpp"
#include "breathbeat/present/svg.hpp"
#include "breathbeat/present/wave.hpp"
#include "breathbeat/version.hpp"
#include "html_style.hpp"

namespace bb::wave {

namespace {

using svg::escape;

// A number as the JSON output writes it (to_json rounds to the shown decimals + 2).
std::string json_number(const Shown& s) {
  return svg::data_number(to_json(s)["value"].get<double>());
}
// A number as the --beats / --breaths CSV writes it (fixed decimals).
double fixed(double v, int decimals) {
  const double scale = std::pow(10.0, decimals);
  return std::round(v * scale) / scale;
}

// Lowest and highest sample of each bucket, in time order.
void decimate(const std::vector<double>& t, const std::vector<double>& v, std::size_t max_points,
              StripSignal& out) {
  const std::size_t n = v.size();
  const std::size_t buckets = std::max<std::size_t>(1, max_points / 2);
  if (n <= max_points) {
    out.time = t;
    out.value = v;
    return;
  }
  for (std::size_t b = 0; b < buckets; ++b) {
    const std::size_t from = b * n / buckets, to = (b + 1) * n / buckets;
    std::size_t lo = from, hi = from;
    bool any = false;
    for (std::size_t i = from; i < to; ++i) {
      if (!std::isfinite(v[i])) continue;
      if (!any || v[i] < v[lo]) lo = i;
      if (!any || v[i] > v[hi]) hi = i;
      any = true;
    }
    if (!any) {  // a gap: keep it visible as a break in the trace
      out.time.push_back(t[from]);
      out.value.push_back(std::numeric_limits<double>::quiet_NaN());
      continue;
    }
    for (std::size_t i : {std::min(lo, hi), std::max(lo, hi)}) {
      out.time.push_back(t[i]);
      out.value.push_back(v[i]);
    }
  }
}

std::string plain(std::string w) {
  std::replace(w.begin(), w.end(), '_', ' ');
  return w;
}

svg::Mark beat_mark(const Beat& b) {
  return b.verdict == BeatVerdict::accepted ? svg::Mark::valid : svg::Mark::invalid;
}

std::string list_html(const std::vector<std::string>& items) {
  std::ostringstream o;
  o << "<ul>\n";
  for (const std::string& i : items) o << "<li>" << escape(i) << "</li>\n";
  o << "</ul>\n";
  return o.str();
}

// The arterial trace with each beat's systolic peak marked (cross: a rejected beat).
std::string abp_panel(const Strip& strip) {
  svg::Plot p;
  p.id = "plot-strip-abp";
  p.title = "Arterial pressure with the detected beats";
  p.width = 700;
  p.height = 230;
  p.x.label = "Time from the start of the record [s]";
  p.x.min = strip.start;
  p.x.max = strip.start + strip.duration;
  p.y.label = "ABP [" + strip.abp->unit + "]";
  svg::Series trace;
  trace.key = "abp";
  trace.name = strip.abp->name + " (decimated for drawing)";
  trace.marks = false;
  for (std::size_t i = 0; i < strip.abp->time.size(); ++i) {
    svg::Point pt;
    pt.x = strip.abp->time[i];
    pt.y = strip.abp->value[i];
    trace.points.push_back(pt);
  }
  p.series.push_back(trace);
  svg::Series beats;
  beats.key = "beats";
  beats.name = "systolic peak of each detected beat";
  beats.line = false;
  beats.style = 0;
  for (const Beat& b : strip.beats) {
    svg::Point pt;
    pt.x = in_seconds(b.systolic_time);
    pt.y = in_mmHg(b.systolic);
    pt.data_x = svg::data_number(fixed(pt.x, 3));
    pt.data_y = svg::data_number(fixed(pt.y, 2));
    pt.mark = beat_mark(b);
    pt.title = "beat at " + format_number(pt.x, 2) + " s: systolic " + format_number(pt.y, 0) +
               " mmHg, " + to_string(b.verdict);
    beats.points.push_back(pt);
  }
  p.series.push_back(beats);
  return svg::render(p);
}

// The breath channel with each breath's start marked (cross: a breath across a gap).
std::string breath_panel(const Strip& strip, const RecordSummary& s) {
  svg::Plot p;
  p.id = "plot-strip-breath";
  p.title = "Breath signal with the detected breaths";
  p.width = 700;
  p.height = 230;
  p.x.label = "Time from the start of the record [s]";
  p.x.min = strip.start;
  p.x.max = strip.start + strip.duration;
  const std::string what = s.breath_signal == BreathSignal::airway_pressure ? "Paw" : "Breath";
  p.y.label = what + " [" + strip.breath->unit + "]";
  svg::Series trace;
  trace.key = "breath_signal";
  trace.name = strip.breath->name + " (decimated for drawing)";
  trace.marks = false;
  trace.style = 0;
  for (std::size_t i = 0; i < strip.breath->time.size(); ++i) {
    svg::Point pt;
    pt.x = strip.breath->time[i];
    pt.y = strip.breath->value[i];
    trace.points.push_back(pt);
  }
  p.series.push_back(trace);
  svg::Series starts;
  starts.key = "breaths";
  starts.name = "start of each detected breath";
  starts.line = false;
  for (const Breath& b : strip.breaths) {
    // Drawn on the trace: the sample nearest the start.
    const double t = in_seconds(b.start);
    double y = std::numeric_limits<double>::quiet_NaN();
    double best = std::numeric_limits<double>::infinity();
    for (std::size_t i = 0; i < strip.breath->time.size(); ++i) {
      const double d = std::abs(strip.breath->time[i] - t);
      if (d < best && std::isfinite(strip.breath->value[i])) {
        best = d;
        y = strip.breath->value[i];
      }
    }
    if (!std::isfinite(y)) continue;
    svg::Point pt;
    pt.x = t;
    pt.y = y;
    pt.data_x = svg::data_number(fixed(t, 3));
    pt.data_y = svg::data_number(y);
    pt.mark = b.gap ? svg::Mark::invalid : svg::Mark::valid;
    pt.title = "breath at " + format_number(t, 2) + " s" + (b.gap ? " (across a gap)" : "");
    starts.points.push_back(pt);
  }
  p.series.push_back(starts);
  return svg::render(p);
}

svg::Mark window_mark(const WindowResult& w) {
  if (!w.reading || w.reading->category == "not_interpretable") return svg::Mark::invalid;
  if (w.reading->conditional) return svg::Mark::conditional;
  return svg::Mark::valid;
}

// PPV per window: the median (marked by the window's reading), the 10th-90th centiles as a
// whisker, the grey zone as a band.
std::string trend_panel(const std::vector<WindowResult>& windows, const Thresholds& t) {
  svg::Plot p;
  p.id = "plot-ppv-trend";
  p.title = "PPV over the windows";
  p.width = 700;
  p.height = 260;
  p.x.label = "Time from the start of the record [s] (window middle)";
  if (!windows.empty()) {
    p.x.min = in_seconds(windows.front().start);
    p.x.max = in_seconds(windows.back().end);
  }
  p.y.label = "PPV [%]";
  p.y.include_zero = true;
  p.bands.push_back(html::ppv_grey_zone(t));
  p.whisker_name = "10th to 90th centile of the breaths";
  svg::Series median;
  median.key = "windows.ppv";
  median.name = "median PPV of the window";
  bool previous = false;
  for (const WindowResult& w : windows) {
    if (!w.ppv) {
      previous = false;
      continue;
    }
    const Shown m = as_percent(w.ppv->median, 1);
    const Shown start = as_seconds(w.start, 1);
    svg::Point pt;
    pt.x = (in_seconds(w.start) + in_seconds(w.end)) / 2;  // data-x: the start, as in the JSON
    pt.y = m.value;
    pt.data_x = json_number(start);
    pt.data_y = json_number(m);
    pt.step = format_number(in_seconds(w.start), 0) + " s";
    pt.mark = window_mark(w);
    pt.title = "window from " + format_number(in_seconds(w.start), 0) + " s: PPV " +
               format_shown(m) + (w.reading ? ", " + plain(w.reading->category) : "");
    median.points.push_back(pt);
    median.joined.push_back(previous);
    previous = true;
    svg::Whisker wh;
    wh.key = "windows.ppv_p10_p90";
    wh.x = pt.x;
    wh.low = in_percent(w.ppv->p10);
    wh.high = in_percent(w.ppv->p90);
    wh.data_x = pt.data_x;
    wh.data_low = json_number(as_percent(w.ppv->p10, 1));
    wh.data_high = json_number(as_percent(w.ppv->p90, 1));
    wh.step = pt.step;
    wh.title = "10th to 90th centile " + format_number(wh.low, 1) + " to " +
               format_number(wh.high, 1) + " %";
    p.whiskers.push_back(wh);
  }
  p.series.push_back(median);
  return svg::render(p);
}

}  // namespace

StripPlace strip_place(double from, double length) {
  // Beats are learnt over the first 10 s and breaths over the first 15 s (presets); the strip
  // starts after both when the stretch allows (common practice, no source).
  constexpr double kLearning = 20.0, kLength = 20.0;
  StripPlace p;
  p.duration = std::min(kLength, std::max(0.0, length));
  p.start = from + (length >= kLearning + kLength ? kLearning : 0.0);
  return p;
}

Strip read_strip(SignalSource& source, const ChannelChoice& choice, StripPlace place,
                 std::size_t max_points) {
  Strip strip;
  strip.start = place.start;
  strip.duration = place.duration;
  const int breath = choice.paw >= 0 ? choice.paw : choice.flow >= 0 ? choice.flow : choice.resp;
  const auto& channels = source.channels();
  std::vector<double> at, av, bt, bv;
  source.seek(place.start);
  Chunk chunk;
  const double end = place.start + place.duration;
  while (source.next(chunk, 5.0)) {
    auto take = [&](int ch, std::vector<double>& t, std::vector<double>& v) {
      if (ch < 0 || static_cast<std::size_t>(ch) >= chunk.samples.size()) return;
      const auto& s = chunk.samples[static_cast<std::size_t>(ch)];
      const double fs = channels[static_cast<std::size_t>(ch)].fs;
      for (std::size_t i = 0; i < s.size(); ++i) {
        const double time = chunk.start_time + static_cast<double>(i) / fs;
        if (time < place.start || time >= end) continue;
        t.push_back(time);
        v.push_back(s[i]);
      }
    };
    take(choice.abp, at, av);
    take(breath, bt, bv);
    if (chunk.start_time + chunk.duration >= end) break;
  }
  if (choice.abp >= 0) {
    StripSignal s{channels[static_cast<std::size_t>(choice.abp)].name,
                  channels[static_cast<std::size_t>(choice.abp)].unit,
                  {},
                  {}};
    decimate(at, av, max_points, s);
    strip.abp = s;
  }
  if (breath >= 0) {
    StripSignal s{channels[static_cast<std::size_t>(breath)].name,
                  channels[static_cast<std::size_t>(breath)].unit,
                  {},
                  {}};
    decimate(bt, bv, max_points, s);
    strip.breath = s;
  }
  return strip;
}

std::string record_html(const std::string& file, const RecordSummary& s, const Thresholds& t,
                        const std::vector<WindowResult>& windows, const Strip& strip) {
  const Answer a = describe_record(s, t);
  std::ostringstream o;
  o << "<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\" "
       "xml:lang=\"en\">\n"
       "<head>\n<meta charset=\"utf-8\"/>\n"
       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\"/>\n"
       "<title>Waveform record: "
    << escape(file) << " (breathbeat)</title>\n<style>" << html::kStyle
    << "</style>\n</head>\n<body>\n";
  o << "<header id=\"top\">\n<h1>Waveform record</h1>\n<p class=\"who\"><span>Record: <strong "
       "id=\"record-file\">"
    << escape(file) << "</strong></span><span>Analysed: <strong id=\"record-time\">"
    << format_number(in_seconds(s.start), 0) << " s to "
    << format_number(in_seconds(s.start) + in_seconds(s.duration), 0) << " s</strong> ("
    << format_number(in_seconds(s.duration), 0) << " s)</span></p>\n";
  o << "<section class=\"cautions\" id=\"cautions\">\n<h2>Before you act</h2>\n"
    << list_html(a.cautions) << "</section>\n</header>\n";

  o << "<section id=\"summary\">\n<h2>Summary</h2>\n";
  if (a.reading) o << "<p class=\"flagged\">" << escape(a.reading->text) << "</p>\n";
  o << "<table class=\"steps\" id=\"summary-table\">\n<tbody>\n";
  for (const Item& i : a.results) {
    const std::string unit =
        i.shown.unit.empty() || i.shown.unit == "1" ? "" : " [" + i.shown.unit + "]";
    o << "<tr><th scope=\"row\" class=\"label\">" << escape(i.label + unit) << "</th><td>"
      << escape(format_number(i.shown.value, i.shown.decimals)) << "</td><td class=\"label\">"
      << escape(i.note) << "</td></tr>\n";
  }
  o << "</tbody></table>\n";
  if (!a.gates.empty()) {
    o << "<h3>Conditions of PPV</h3>\n<ul>\n";
    for (const ShownGate& g : a.gates)
      o << "<li>" << escape(g.label) << ": <strong>" << escape(plain(to_string(g.state)))
        << "</strong>" << (g.detail.empty() ? "" : " (" + escape(g.detail) + ")") << "</li>\n";
    o << "</ul>\n";
  }
  o << "</section>\n";

  // No forced page break: the figures flow after the summary, none split over two pages.
  o << "<section id=\"plots\">\n<h2>Plots</h2>\n";
  if (strip.abp || strip.breath) {
    o << "<figure id=\"fig-strip\">\n<div class=\"panels\">\n";
    if (strip.abp) o << abp_panel(strip);
    if (strip.breath) o << breath_panel(strip, s);
    o << "</div>\n<figcaption>"
      << escape("A representative " + format_number(strip.duration, 0) + " s of the record (from " +
                format_number(strip.start, 0) +
                " s, after the detectors' learning period when the record allows), drawn from "
                "the lowest and highest sample of each short stretch. Filled circle: a beat "
                "accepted (or a breath detected); cross: a beat rejected (gap, out of range, "
                "clipping, damping, ectopic) or a breath across a gap.")
      << "</figcaption>\n</figure>\n";
  }
  if (std::any_of(windows.begin(), windows.end(), [](const WindowResult& w) { return w.ppv; })) {
    o << "<figure id=\"fig-trend\">\n<div class=\"panels\">\n"
      << trend_panel(windows, t) << "</div>\n<figcaption>"
      << escape(
             "PPV over the windows of the record: the median of the breaths of each window "
             "(filled circle valid, open circle conditional, cross not valid under its "
             "conditions) with its 10th to 90th centile; hatched band: the grey zone (" +
             t.source("ppv.grey_zone_low") + ").")
      << "</figcaption>\n</figure>\n";
  } else {
    o << "<p>No window gave a PPV.</p>\n";
  }
  o << "</section>\n";

  o << "<section id=\"details\">\n<h2>Notes</h2>\n";
  if (!a.notes.empty()) o << list_html(a.notes);
  std::vector<std::string> skipped;
  for (const Skipped& k : a.skipped) skipped.push_back(k.label + ": not computed");
  if (!skipped.empty()) o << list_html(skipped);
  o << "</section>\n<footer>" << escape(std::string(kToolName) + " " + kVersion)
    << ", waveform record " << escape(file)
    << ". Decision support only: read the cautions at the top.</footer>\n</body>\n</html>\n";
  return o.str();
}

}  // namespace bb::wave
