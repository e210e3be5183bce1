// breathbeat's own small SVG plotting: one panel with a numeric or a step
// axis, ticks, axis labels, points whose shape says whether the reading is
// valid, conditional or not valid, whiskers (ranges), bands, threshold lines
// and polylines (a waveform strip). The output is XML (usable inline in
// XHTML); every drawn point and whisker carries its numbers in data-x,
// data-y (data-low, data-high) attributes, as the report's JSON writes them,
// so that a test can compare the picture with the analysis. No scripts, no
// fonts, no colours that carry meaning alone.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace bb::svg {

// Text and attribute values escaped for XML (& < > " ').
std::string escape(std::string_view text);
// A number for a data attribute: the shortest text that reads back as the same double.
std::string data_number(double v);

// How a reading is marked: filled circle, open circle, cross (with the word in its title).
enum class Mark { valid, conditional, invalid };
const char* mark_word(Mark m);  // "valid", "conditional", "not valid"

struct Point {
  double x = 0.0;  // where it is drawn (axis units)
  double y = 0.0;
  std::string data_x;  // the numbers as the JSON report writes them (data-x, data-y)
  std::string data_y;
  std::string step;   // data-step
  std::string title;  // tooltip and accessible text ("PEEP 10: 31.0 mL/cmH2O")
  Mark mark = Mark::valid;
};

// A line through points (joined in the order given; a break where `joined` is false).
struct Series {
  std::string key;    // data-series
  std::string name;   // legend words ("Static compliance")
  int style = 0;      // 0 solid, 1 dashed, 2 dotted: tells series apart without colour
  bool line = true;   // join the points
  bool marks = true;  // draw each point (false: a plain trace, e.g. a waveform)
  std::vector<Point> points;
  std::vector<bool> joined;  // joined[i]: draw the segment from points[i-1] to points[i]
};

// A range at one x: low to high, with a tick at `mid` when there is one.
struct Whisker {
  std::string key;  // data-series
  double x = 0.0;
  double low = 0.0;
  double high = 0.0;
  std::optional<double> mid;
  std::string data_x, data_low, data_high, data_y;
  std::string step;
  std::string title;
};

// A shaded horizontal band (a grey zone) and a horizontal threshold line.
struct Band {
  double low = 0.0;
  double high = 0.0;
  std::string label;  // printed inside the band
};
struct Rule {
  double y = 0.0;
  std::string label;  // printed at the right end
};

struct Axis {
  std::string label;               // with the unit: "Total PEEP [cmH2O]"
  std::optional<double> min, max;  // widened to include the data when absent
  // A step axis: one tick per category at x = 0, 1, ...; empty: numeric.
  std::vector<std::string> categories;
  bool include_zero = false;
};

struct Plot {
  std::string id;     // data-plot, and the prefix of element ids
  std::string title;  // in <title> (accessible name)
  Axis x, y;
  std::vector<Band> bands;
  std::vector<Rule> rules;
  std::vector<Series> series;
  std::vector<Whisker> whiskers;
  std::string whisker_name;  // legend words for the whiskers ("estimated range")
  bool legend_marks = true;  // explain, in words, the marks the panel uses
  double width = 340;
  double height = 250;
  double point_radius = 4.0;
};

// The panel as one <svg> element (with xmlns), ending with a newline.
std::string render(const Plot& plot);

// Ticks between lo and hi: about `wanted` round numbers (1, 2 or 5 x 10^n apart).
std::vector<double> nice_ticks(double lo, double hi, int wanted = 5);

}  // namespace bb::svg
