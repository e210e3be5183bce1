// What a calculator answer is made of: results as Shown values (number, UCUM
// code, the unit people read), skipped results with what they need, flags,
// gates, a reading, notes and cautions. JSON-free: breathbeat/present/json.hpp
// and breathbeat/present/text.hpp print it.
#pragma once

#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "breathbeat/fields/registry.hpp"
#include "breathbeat/text/strings.hpp"
#include "breathbeat/units.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// A number with its unit. `ucum` is the UCUM code written to JSON/CSV;
// `unit` is how people read it in text ("cmH2O", "mL/cmH2O").
struct Shown {
  double value = 0.0;
  std::string ucum;
  std::string unit;
  int decimals = 1;
  std::optional<double> low;  // a range, when the answer is a range
  std::optional<double> high;
};

// A quantity in the unit the bedside reads it in.
Shown as_cmH2O(Pressure p, int decimals = 1);
Shown as_mmHg(Pressure p, int decimals = 0);
Shown as_mL(Volume v, int decimals = 0);
Shown as_L_per_min(Flow f, int decimals = 1);
Shown as_mL_per_min(Flow f, int decimals = 0);
Shown as_seconds(Time t, int decimals = 2);
Shown as_cm(Length l, int decimals = 1);
Shown as_m2(Area a, int decimals = 2);
Shown as_cm2(Area a, int decimals = 2);
Shown as_kg(Mass m, int decimals = 1);
Shown as_per_min(Frequency f, int decimals = 0);
Shown as_J_per_min(Power p, int decimals = 2);
Shown as_g_per_dL(MassConcentration c, int decimals = 1);
Shown as_mmol_per_L(AmountConcentration c, int decimals = 1);
Shown as_mL_per_cmH2O(Compliance c, int decimals = 1);
Shown as_cmH2O_per_L(Elastance e, int decimals = 1);
Shown as_cmH2O_per_L_per_s(Resistance r, int decimals = 1);
Shown as_mL_per_kg(VolumePerMass v, int decimals = 1);
Shown as_percent(Ratio r, int decimals = 1);
// A difference of two percentages (PPV after - before) in percentage points. UCUM has no
// code for points: JSON and CSV write "%" labelled "points"; text writes "points".
Shown as_percentage_points(Ratio difference, int decimals = 1);
Shown as_fraction(Ratio r, int decimals = 2);
Shown as_number(double v, int decimals = 2);  // UCUM "1"

// One computed result.
struct Item {
  std::string key;    // JSON key, e.g. "driving_pressure"
  std::string label;  // text label, e.g. "Driving pressure (Pplat - PEEP)"
  Shown shown;
  std::string note;  // short method or assumption, printed beside the value
};

// An input as the calculator understood it; `key` is the field id.
struct InputItem {
  std::string key;
  std::variant<Shown, std::string> value;
  std::string label = {};  // people's name; empty: the field registry's label of `key`
};

// A published limit the values breach.
struct Flag {
  std::string key;
  std::string message;
  std::string source;
};

// A validity condition in words (present/gate_words.hpp makes it from a Gate).
struct ShownGate {
  std::string key;
  std::string label;
  GateState state = GateState::unknown;
  std::string detail;
  std::string source;
  Bias bias = Bias::either;
  std::string bias_source = {};
};

// A reading in words (present/gate_words.hpp makes it from a Reading).
struct ShownReading {
  std::string key;
  std::string category;
  std::string text;
  std::vector<std::string> basis;
  bool conditional = false;
  std::vector<std::string> open_conditions = {};
  std::vector<std::string> one_sided = {};
};

struct Answer {
  std::string command;  // "calc mechanics"
  std::string title;    // "Respiratory mechanics"
  // How fields are named to the reader (options on the command line, keys in
  // a trial file): skipped results name what they need in these terms.
  FieldContext context = FieldContext::command_line;
  std::vector<InputItem> inputs;
  std::vector<Item> results;
  std::vector<Skipped> skipped;
  std::vector<Flag> flags;
  std::vector<ShownGate> gates;
  std::optional<ShownReading> reading;
  std::vector<std::string> notes;
  std::vector<std::string> cautions;
};

// "--ve (or --vt and --rr)", "--mode vc": one need named in a context.
std::string need_text(const Need& need, FieldContext context);
// Every need of a skipped result, in a context.
std::vector<std::string> need_texts(const Skipped& s, FieldContext context);

// "15.0 cmH2O", "33.3 mL/cmH2O", "8 (5 to 10) mmHg".
std::string format_shown(const Shown& s);

}  // namespace bb
