// What every calculator answer is made of, and how it is printed.
//
// A domain module computes with unit-typed quantities; to show a result it
// turns each into a Shown value (number + UCUM code + the unit people read)
// and fills an Answer. The command line prints an Answer as text or as one
// JSON object: {"tool", "version", "command", "inputs", "results", "skipped",
// "flags", "gates", "reading", "notes", "cautions"}.
#pragma once

#include <nlohmann/json.hpp>
#include <optional>
#include <string>
#include <variant>
#include <vector>

#include "breathbeat/units.hpp"

namespace bb {

// A number with its unit. `ucum` is the UCUM code written to JSON/CSV;
// `unit` is how people read it in text ("cmH2O", "mL/cmH2O").
struct Shown {
  double value = 0.0;
  std::string ucum;
  std::string unit;
  int decimals = 1;
  std::optional<double> low;   // a range, when the answer is a range
  std::optional<double> high;
};

// Presenters: a quantity in the unit the bedside reads it in.
Shown as_cmH2O(Pressure p, int decimals = 1);
Shown as_mmHg(Pressure p, int decimals = 0);
Shown as_kPa(Pressure p, int decimals = 2);
Shown as_mL(Volume v, int decimals = 0);
Shown as_L(Volume v, int decimals = 2);
Shown as_L_per_min(Flow f, int decimals = 1);
Shown as_mL_per_min(Flow f, int decimals = 0);
Shown as_L_per_s(Flow f, int decimals = 2);
Shown as_seconds(Time t, int decimals = 2);
Shown as_cm(Length l, int decimals = 1);
Shown as_mm(Length l, int decimals = 0);
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
Shown as_fraction(Ratio r, int decimals = 2);
Shown as_number(double v, int decimals = 2);  // UCUM "1"

// One computed result.
struct Item {
  std::string key;    // JSON key, e.g. "driving_pressure"
  std::string label;  // text label, e.g. "Driving pressure (Pplat - PEEP)"
  Shown shown;
  std::string note;   // short method or assumption, printed beside the value
};

// An input as the calculator understood it.
struct InputItem {
  std::string key;
  std::variant<Shown, std::string> value;
};

// A result the inputs did not allow, and what it needs.
struct Skipped {
  std::string key;
  std::string label;
  std::vector<std::string> needs;  // option names, e.g. "--ti"
};

// A published limit the values breach.
struct Flag {
  std::string key;
  std::string message;
  std::string source;
};

// A validity condition of an index: met, failed, or unknown from what was given.
enum class GateState { met, failed, unknown };
const char* to_string(GateState s);

struct Gate {
  std::string key;
  std::string label;
  GateState state = GateState::unknown;
  std::string detail;
  std::string source;
};

// The interpretation of an index or of a set of indices.
struct Reading {
  std::string key;       // which index, e.g. "ppv"
  std::string category;  // machine word, e.g. "grey_zone", "not_interpretable"
  std::string text;      // sentence for people
  std::vector<std::string> basis;  // indices or gates it rests on
};

struct Answer {
  std::string command;  // "calc mechanics"
  std::string title;    // "Respiratory mechanics"
  std::vector<InputItem> inputs;
  std::vector<Item> results;
  std::vector<Skipped> skipped;
  std::vector<Flag> flags;
  std::vector<Gate> gates;
  std::optional<Reading> reading;
  std::vector<std::string> notes;
  std::vector<std::string> cautions;
};

// Numbers in JSON, rounded to two more decimals than the text shows.
nlohmann::ordered_json to_json(const Shown& s);
nlohmann::ordered_json to_json(const Gate& g);
nlohmann::ordered_json to_json(const Reading& r);
nlohmann::ordered_json to_json(const Answer& a);

// Plain text for a terminal, at most 100 columns.
std::string to_text(const Answer& a);

// "15.0 cmH2O", "33.3 mL/cmH2O", "8 (5-10) mmHg".
std::string format_shown(const Shown& s);
std::string format_number(double v, int decimals);

}  // namespace bb
