// breathbeat's own SVG panels (include/breathbeat/present/svg.hpp): plain
// black on white, series told apart by line style and legend words, readings
// by shape and word.
#include "breathbeat/present/svg.hpp"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <sstream>

namespace bb::svg {

std::string escape(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&':
        out += "&amp;";
        break;
      case '<':
        out += "&lt;";
        break;
      case '>':
        out += "&gt;";
        break;
      case '"':
        out += "&quot;";
        break;
      case '\'':
        out += "&#39;";
        break;
      default:
        out += c;
    }
  }
  return out;
}

std::string data_number(double v) {
  if (!std::isfinite(v)) return "";
  char buf[64];
  const auto r = std::to_chars(buf, buf + sizeof buf, v);
  return std::string(buf, r.ptr);
}

const char* mark_word(Mark m) {
  switch (m) {
    case Mark::valid:
      return "valid";
    case Mark::conditional:
      return "conditional";
    case Mark::invalid:
      return "not valid";
  }
  return "valid";
}

std::vector<double> nice_ticks(double lo, double hi, int wanted) {
  if (!(hi > lo)) return {lo};
  const double raw = (hi - lo) / std::max(1, wanted);
  const double magnitude = std::pow(10.0, std::floor(std::log10(raw)));
  // The round step (1, 2, 5 x 10^n) nearest the raw step, on a log scale.
  double step = magnitude;
  for (double m : {1.0, 2.0, 5.0, 10.0}) {
    if (std::abs(std::log(m * magnitude / raw)) < std::abs(std::log(step / raw)))
      step = m * magnitude;
  }
  std::vector<double> ticks;
  const double first = std::ceil(lo / step - 1e-9) * step;
  for (double t = first; t <= hi + step * 1e-9; t += step)
    ticks.push_back(std::abs(t) < step * 1e-9 ? 0.0 : t);
  return ticks;
}

namespace {

// Coordinates in the SVG, two decimals.
std::string c(double v) {
  std::ostringstream s;
  s.setf(std::ios::fixed);
  s.precision(2);
  s << v;
  std::string t = s.str();
  while (!t.empty() && t.back() == '0') t.pop_back();
  if (!t.empty() && t.back() == '.') t.pop_back();
  return t == "-0" ? "0" : t;
}

// A tick label: as few decimals as the step needs.
std::string tick_text(double v, double step) {
  int decimals = 0;
  while (decimals < 4 && std::abs(step * std::pow(10.0, decimals) -
                                  std::round(step * std::pow(10.0, decimals))) > 1e-6)
    ++decimals;
  std::ostringstream s;
  s.setf(std::ios::fixed);
  s.precision(decimals);
  s << v;
  std::string t = s.str();
  if (t.rfind("-0", 0) == 0 && std::stod(t) == 0.0) t = t.substr(1);
  return t;
}

struct Range {
  double lo = std::numeric_limits<double>::infinity();
  double hi = -std::numeric_limits<double>::infinity();
  void add(double v) {
    if (!std::isfinite(v)) return;
    lo = std::min(lo, v);
    hi = std::max(hi, v);
  }
  bool empty() const { return !(hi >= lo); }
};

// The axis range and its ticks: the data widened to round ticks.
struct Scale {
  double lo = 0.0, hi = 1.0;
  std::vector<double> ticks;
  double step = 1.0;
};

Scale numeric_scale(Range r, const Axis& a) {
  if (a.include_zero) r.add(0.0);
  if (a.min) r.lo = *a.min;
  if (a.max) r.hi = *a.max;
  if (r.empty()) r = Range{0.0, 1.0};
  if (r.hi - r.lo < 1e-9) {
    const double pad = std::max(1.0, std::abs(r.lo) * 0.1);
    r.lo -= pad;
    r.hi += pad;
  }
  Scale s;
  std::vector<double> t = nice_ticks(r.lo, r.hi, 5);
  s.step = t.size() > 1 ? t[1] - t[0] : 1.0;
  s.lo = a.min ? *a.min : std::floor(r.lo / s.step + 1e-9) * s.step;
  s.hi = a.max ? *a.max : std::ceil(r.hi / s.step - 1e-9) * s.step;
  // Some room so that a point on the edge is not cut.
  if (!a.min && std::abs(s.lo - r.lo) < s.step * 1e-6 && !(a.include_zero && r.lo == 0.0))
    s.lo -= s.step;
  if (!a.max && std::abs(s.hi - r.hi) < s.step * 1e-6) s.hi += s.step;
  for (double v = std::ceil(s.lo / s.step - 1e-9) * s.step; v <= s.hi + s.step * 1e-9; v += s.step)
    s.ticks.push_back(std::abs(v) < s.step * 1e-9 ? 0.0 : v);
  return s;
}

const char* dash_of(int style) {
  switch (style % 3) {
    case 1:
      return " stroke-dasharray=\"6 3\"";
    case 2:
      return " stroke-dasharray=\"1.5 2.5\"";
    default:
      return "";
  }
}

// The mark of a reading at (px, py).
std::string mark_shape(Mark m, double px, double py, double r) {
  std::ostringstream o;
  switch (m) {
    case Mark::valid:
      o << "<circle cx=\"" << c(px) << "\" cy=\"" << c(py) << "\" r=\"" << c(r)
        << "\" fill=\"#000\" stroke=\"#000\" stroke-width=\"1\"/>";
      break;
    case Mark::conditional:
      o << "<circle cx=\"" << c(px) << "\" cy=\"" << c(py) << "\" r=\"" << c(r)
        << "\" fill=\"#fff\" stroke=\"#000\" stroke-width=\"1.6\"/>";
      break;
    case Mark::invalid: {
      const double d = r + 0.5;
      o << "<path d=\"M" << c(px - d) << " " << c(py - d) << " L" << c(px + d) << " " << c(py + d)
        << " M" << c(px - d) << " " << c(py + d) << " L" << c(px + d) << " " << c(py - d)
        << "\" stroke=\"#000\" stroke-width=\"2\" fill=\"none\"/>";
      break;
    }
  }
  return o.str();
}

constexpr double kLeft = 54, kRight = 14, kTop = 12, kAxisBelow = 44, kLegendRow = 15;

}  // namespace

std::string render(const Plot& p) {
  Range xr, yr;
  for (const Series& s : p.series) {
    for (const Point& pt : s.points) {
      xr.add(pt.x);
      yr.add(pt.y);
    }
  }
  for (const Whisker& w : p.whiskers) {
    xr.add(w.x);
    yr.add(w.low);
    yr.add(w.high);
    if (w.mid) yr.add(*w.mid);
  }
  for (const Band& b : p.bands) {
    yr.add(b.low);
    yr.add(b.high);
  }
  for (const Rule& r : p.rules) yr.add(r.y);

  const bool steps = !p.x.categories.empty();
  Scale xs;
  if (steps) {
    xs.lo = -0.5;
    xs.hi = static_cast<double>(p.x.categories.size()) - 0.5;
    for (std::size_t i = 0; i < p.x.categories.size(); ++i)
      xs.ticks.push_back(static_cast<double>(i));
  } else {
    xs = numeric_scale(xr, p.x);
  }
  const Scale ys = numeric_scale(yr, p.y);

  // Legend rows: one per named series, one for the whiskers, one for the marks.
  int rows = 0;
  for (const Series& s : p.series)
    if (!s.name.empty()) ++rows;
  if (!p.whisker_name.empty()) ++rows;
  // The marks in use, in the order valid, conditional, not valid.
  std::vector<Mark> used;
  for (Mark m : {Mark::valid, Mark::conditional, Mark::invalid}) {
    for (const Series& s : p.series) {
      if (s.marks &&
          std::any_of(s.points.begin(), s.points.end(),
                      [m](const Point& pt) { return pt.mark == m; }) &&
          std::find(used.begin(), used.end(), m) == used.end())
        used.push_back(m);
    }
  }
  if (p.legend_marks && !used.empty()) ++rows;
  const double x0 = kLeft, x1 = p.width - kRight;
  const double y0 = kTop, y1 = p.height - kAxisBelow - rows * kLegendRow;
  auto px = [&](double v) { return x0 + (v - xs.lo) / (xs.hi - xs.lo) * (x1 - x0); };
  auto py = [&](double v) { return y1 - (v - ys.lo) / (ys.hi - ys.lo) * (y1 - y0); };
  auto clamp_y = [&](double v) { return std::clamp(v, ys.lo, ys.hi); };

  std::ostringstream o;
  o << "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"plot\" data-plot=\"" << escape(p.id)
    << "\" width=\"" << c(p.width) << "\" height=\"" << c(p.height) << "\" viewBox=\"0 0 "
    << c(p.width) << " " << c(p.height)
    << "\" font-family=\"sans-serif\" font-size=\"11\" role=\"img\" aria-labelledby=\""
    << escape(p.id) << "-title\">\n";
  o << "<title id=\"" << escape(p.id) << "-title\">" << escape(p.title) << "</title>\n";
  o << "<rect x=\"0\" y=\"0\" width=\"" << c(p.width) << "\" height=\"" << c(p.height)
    << "\" fill=\"#fff\"/>\n";

  // Bands under everything: light grey with a hatch, so that they survive a grey printer.
  for (std::size_t i = 0; i < p.bands.size(); ++i) {
    const Band& b = p.bands[i];
    const std::string pat = p.id + "-hatch-" + std::to_string(i);
    o << "<defs><pattern id=\"" << escape(pat)
      << "\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
         "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#e6e6e6\"/>"
         "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" stroke=\"#b0b0b0\" stroke-width=\"1\"/>"
         "</pattern></defs>\n";
    const double top = py(clamp_y(b.high)), bottom = py(clamp_y(b.low));
    o << "<g class=\"band\" data-low=\"" << data_number(b.low) << "\" data-high=\""
      << data_number(b.high) << "\"><rect x=\"" << c(x0) << "\" y=\"" << c(top) << "\" width=\""
      << c(x1 - x0) << "\" height=\"" << c(std::max(0.0, bottom - top)) << "\" fill=\"url(#"
      << escape(pat) << ")\"/>";
    if (!b.label.empty())
      o << "<text x=\"" << c(x0 + 4) << "\" y=\"" << c(top + 11) << "\" fill=\"#333\">"
        << escape(b.label) << "</text>";
    o << "</g>\n";
  }

  // Grid and ticks.
  o << "<g class=\"axes\" stroke=\"#000\" stroke-width=\"1\">\n";
  for (double t : ys.ticks) {
    const double y = py(t);
    o << "<line x1=\"" << c(x0) << "\" y1=\"" << c(y) << "\" x2=\"" << c(x1) << "\" y2=\"" << c(y)
      << "\" stroke=\"#d0d0d0\" stroke-width=\"0.6\"/>";
    o << "<line x1=\"" << c(x0 - 4) << "\" y1=\"" << c(y) << "\" x2=\"" << c(x0) << "\" y2=\""
      << c(y) << "\"/>";
    o << "<text x=\"" << c(x0 - 6) << "\" y=\"" << c(y + 3.5)
      << "\" text-anchor=\"end\" stroke=\"none\" fill=\"#000\">" << tick_text(t, ys.step)
      << "</text>\n";
  }
  for (std::size_t i = 0; i < xs.ticks.size(); ++i) {
    const double t = xs.ticks[i];
    const double x = px(t);
    o << "<line x1=\"" << c(x) << "\" y1=\"" << c(y1) << "\" x2=\"" << c(x) << "\" y2=\""
      << c(y1 + 4) << "\"/>";
    const std::string label = steps ? p.x.categories[i] : tick_text(t, xs.step);
    o << "<text x=\"" << c(x) << "\" y=\"" << c(y1 + 15)
      << "\" text-anchor=\"middle\" stroke=\"none\" fill=\"#000\""
      << (steps ? " font-size=\"10\"" : "") << ">" << escape(label) << "</text>\n";
  }
  o << "<rect x=\"" << c(x0) << "\" y=\"" << c(y0) << "\" width=\"" << c(x1 - x0) << "\" height=\""
    << c(y1 - y0) << "\" fill=\"none\"/>\n";
  o << "</g>\n";
  o << "<text class=\"axis-label\" x=\"" << c((x0 + x1) / 2) << "\" y=\"" << c(y1 + 32)
    << "\" text-anchor=\"middle\" font-weight=\"bold\">" << escape(p.x.label) << "</text>\n";
  o << "<text class=\"axis-label\" transform=\"translate(13 " << c((y0 + y1) / 2)
    << ") rotate(-90)\" text-anchor=\"middle\" font-weight=\"bold\">" << escape(p.y.label)
    << "</text>\n";

  // Threshold lines, dashed, labelled at the right end.
  for (const Rule& r : p.rules) {
    if (r.y < ys.lo || r.y > ys.hi) continue;
    const double y = py(r.y);
    o << "<g class=\"rule\" data-y=\"" << data_number(r.y) << "\"><line x1=\"" << c(x0)
      << "\" y1=\"" << c(y) << "\" x2=\"" << c(x1) << "\" y2=\"" << c(y)
      << "\" stroke=\"#000\" stroke-width=\"1.2\" stroke-dasharray=\"8 3 2 3\"/>";
    if (!r.label.empty())
      o << "<text x=\"" << c(x1 - 3) << "\" y=\"" << c(y - 3)
        << "\" text-anchor=\"end\" fill=\"#000\">" << escape(r.label) << "</text>";
    o << "</g>\n";
  }

  // Whiskers: a vertical line with caps, a short bar at the central value.
  for (const Whisker& w : p.whiskers) {
    const double x = px(w.x), lo = py(clamp_y(w.low)), hi = py(clamp_y(w.high));
    o << "<g class=\"whisker\" data-series=\"" << escape(w.key) << "\" data-step=\""
      << escape(w.step) << "\" data-x=\"" << w.data_x << "\" data-low=\"" << w.data_low
      << "\" data-high=\"" << w.data_high << "\"";
    if (!w.data_y.empty()) o << " data-y=\"" << w.data_y << "\"";
    o << " stroke=\"#000\" stroke-width=\"1.6\"><title>" << escape(w.title) << "</title>";
    o << "<line x1=\"" << c(x) << "\" y1=\"" << c(lo) << "\" x2=\"" << c(x) << "\" y2=\"" << c(hi)
      << "\"/>";
    o << "<line x1=\"" << c(x - 5) << "\" y1=\"" << c(lo) << "\" x2=\"" << c(x + 5) << "\" y2=\""
      << c(lo) << "\"/>";
    o << "<line x1=\"" << c(x - 5) << "\" y1=\"" << c(hi) << "\" x2=\"" << c(x + 5) << "\" y2=\""
      << c(hi) << "\"/>";
    if (w.mid) {
      const double m = py(clamp_y(*w.mid));
      o << "<rect x=\"" << c(x - 3.5) << "\" y=\"" << c(m - 1.5)
        << "\" width=\"7\" height=\"3\" fill=\"#000\"/>";
    }
    o << "</g>\n";
  }

  // Series: the line first, then the marks on top.
  static const char* const kInk[] = {"#000000", "#0a4d8c", "#8c3a00"};  // dark, print as black
  for (std::size_t si = 0; si < p.series.size(); ++si) {
    const Series& s = p.series[si];
    const char* ink = kInk[s.style % 3];
    if (s.line && s.points.size() > 1) {
      std::string d;
      for (std::size_t i = 0; i < s.points.size(); ++i) {
        if (!std::isfinite(s.points[i].y)) continue;
        const bool join =
            i > 0 && std::isfinite(s.points[i - 1].y) && (s.joined.size() <= i || s.joined[i]);
        d += (join ? " L" : (d.empty() ? "M" : " M")) + c(px(s.points[i].x)) + " " +
             c(py(clamp_y(s.points[i].y)));
      }
      o << "<path class=\"series-line\" data-series=\"" << escape(s.key) << "\" d=\"" << d
        << "\" fill=\"none\" stroke=\"" << ink << "\" stroke-width=\"" << (s.marks ? "1.4" : "1")
        << "\"" << dash_of(s.style) << "/>\n";
    }
    for (const Point& pt : s.points) {
      if (!s.marks) break;
      o << "<g class=\"point "
        << (pt.mark == Mark::valid         ? "valid"
            : pt.mark == Mark::conditional ? "conditional"
                                           : "invalid")
        << "\" data-series=\"" << escape(s.key) << "\" data-step=\"" << escape(pt.step)
        << "\" data-x=\"" << pt.data_x << "\" data-y=\"" << pt.data_y << "\" data-mark=\""
        << mark_word(pt.mark) << "\"><title>" << escape(pt.title) << " (" << mark_word(pt.mark)
        << ")</title>" << mark_shape(pt.mark, px(pt.x), py(clamp_y(pt.y)), p.point_radius)
        << "</g>\n";
    }
  }

  // The legend, in words.
  double ly = y1 + 40 + kLegendRow;
  o << "<g class=\"legend\" font-size=\"10\">\n";
  for (const Series& s : p.series) {
    if (s.name.empty()) continue;
    if (s.line) {
      o << "<line x1=\"" << c(x0) << "\" y1=\"" << c(ly - 3.5) << "\" x2=\"" << c(x0 + 22)
        << "\" y2=\"" << c(ly - 3.5) << "\" stroke=\"" << kInk[s.style % 3]
        << "\" stroke-width=\"1.4\"" << dash_of(s.style) << "/>";
    } else {
      o << mark_shape(Mark::valid, x0 + 11, ly - 3.5, 3.5);
    }
    o << "<text x=\"" << c(x0 + 27) << "\" y=\"" << c(ly) << "\">" << escape(s.name) << "</text>\n";
    ly += kLegendRow;
  }
  if (!p.whisker_name.empty()) {
    const double x = x0 + 11;
    o << "<g stroke=\"#000\" stroke-width=\"1.4\"><line x1=\"" << c(x0 + 2) << "\" y1=\""
      << c(ly - 3.5) << "\" x2=\"" << c(x0 + 20) << "\" y2=\"" << c(ly - 3.5) << "\"/><line x1=\""
      << c(x0 + 2) << "\" y1=\"" << c(ly - 7) << "\" x2=\"" << c(x0 + 2) << "\" y2=\"" << c(ly)
      << "\"/><line x1=\"" << c(x0 + 20) << "\" y1=\"" << c(ly - 7) << "\" x2=\"" << c(x0 + 20)
      << "\" y2=\"" << c(ly) << "\"/><rect x=\"" << c(x - 1.5) << "\" y=\"" << c(ly - 7)
      << "\" width=\"3\" height=\"7\" fill=\"#000\"/></g><text x=\"" << c(x0 + 27) << "\" y=\""
      << c(ly) << "\">" << escape(p.whisker_name) << "</text>\n";
    ly += kLegendRow;
  }
  if (p.legend_marks && !used.empty()) {
    double x = x0 + 4;
    for (Mark m : used) {
      o << mark_shape(m, x, ly - 3.5, 3.5) << "<text x=\"" << c(x + 8) << "\" y=\"" << c(ly)
        << "\">" << mark_word(m) << "</text>";
      x += m == Mark::valid ? 50 : 76;
    }
    o << "\n";
  }
  o << "</g>\n</svg>\n";
  return o.str();
}

}  // namespace bb::svg
