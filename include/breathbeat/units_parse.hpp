// Turning user text such as "25", "2.45 kPa", "18mmHg" or "95%" into a
// quantity for a named field. Part of the units module.
//
// Each field has a default unit, used when the text is a bare number. For
// fraction fields (saturations, FiO2) a bare number of at most 1 is a fraction
// and a larger one a percentage, so "0.95", "95" and "95%" all mean 0.95.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/units.hpp"

namespace bb {

enum class Dimension {
  pressure,
  volume,
  flow,
  time,
  length,
  area,
  mass,
  haemoglobin,  // mass concentration, with mmol/L accepted for the Hb monomer
  lactate,      // amount concentration, with mg/dL accepted for lactate
  fraction,     // saturations, FiO2, percentages
  frequency,    // heart rate, respiratory rate
  power,        // mechanical power
  compliance,
  elastance,
  resistance,
  volume_per_mass,
  flow_per_area,  // cardiac index, DO2I
  // Infusions (breathbeat/infusion.hpp). Kept apart from the dimensions above:
  // a dose per kg has the SI dimension of a heart rate (1/s), and "U" counts
  // units of a drug, not a physical quantity.
  infusion_rate,            // pump rate, mL/h; SI m3/s
  drug_mass_concentration,  // ug/mL; SI kg/m3
  drug_unit_concentration,  // units per volume (vasopressin), U/mL; SI U/m3
  dose_per_kg,              // ug/kg/min; SI 1/s (kg per kg per s)
  mass_dose,                // ug/min; SI kg/s
  unit_dose,                // U/min; SI U/s
  number,                   // a plain number with no unit
};

// One accepted unit: the UCUM code, the spellings users may type (compared
// without case or spaces; "µ" and "mcg" are read as "u"), and the factor to SI.
struct UnitSpelling {
  std::string_view ucum;
  std::string_view shown;  // how the unit is printed to people
  std::vector<std::string_view> spellings;
  double to_si;
};

const std::vector<UnitSpelling>& units_for(Dimension dimension);

// The unit of a dimension with UCUM code `ucum`; throws std::logic_error when
// the table has none (a programming error).
const UnitSpelling& unit_of(Dimension dimension, std::string_view ucum);

// The unit of a dimension that `spelled` names (any accepted spelling, compared
// without case or spaces, "µ" and "mcg" read as "u"); nullptr when none does.
const UnitSpelling* find_unit(std::string_view spelled, Dimension dimension);

// "cmH2O, mmHg, kPa, Pa, hPa, mbar" for error messages and help.
std::string accepted_units(Dimension dimension);

// The units of `dimension`, other than the one `except` spells, in
// which `number` lies within [min_si, max_si]: for a bare number refused as
// implausible in its default unit, the units it may have been meant in
// ("9.1" mmHg is implausible for a PaO2; 9.1 kPa is not). In table order.
std::vector<const UnitSpelling*> units_placing_in_range(double number, Dimension dimension,
                                                        double min_si, double max_si,
                                                        std::string_view except);

// A field the user fills in: its name (as in options and files) and the unit a
// bare number is taken to be in.
struct Field {
  std::string_view name;
  std::string_view default_unit;
};

// The value of `text` in SI units. Throws InputError naming the field, the text
// and the units accepted, for empty text, NaN/inf, trailing junk or a unit of
// the wrong dimension. A decimal comma is read as a decimal point ("2,1 cm" is
// 2.1 cm) when it is the text's only comma and not followed by exactly three
// digits ("2,100" is refused: it may separate thousands).
double parse_in_si(std::string_view text, Dimension dimension, const Field& field);

// The SI factor of one spelled unit of a dimension; throws InputError if unknown.
double unit_factor(std::string_view unit, Dimension dimension, const Field& field);

// A number as typed and the unit text after it (trimmed; empty for a bare
// number). Throws InputError naming the field, with `expected`, for empty
// text, text that does not start with a number, NaN or infinity.
struct NumberAndUnit {
  double number = 0.0;
  std::string_view unit;
};
NumberAndUnit split_number_and_unit(std::string_view text, const Field& field,
                                    const std::string& expected);

// The number of `text` in the unit with UCUM code `ucum` of `dimension` (a bare
// number is in field.default_unit). Text written in that very unit gives the
// number exactly as typed. Throws InputError like parse_in_si.
double parse_in_unit(std::string_view text, Dimension dimension, std::string_view ucum,
                     const Field& field);

template <class Q>
struct DimensionOf;
template <>
struct DimensionOf<Pressure> {
  static constexpr Dimension value = Dimension::pressure;
};
template <>
struct DimensionOf<Volume> {
  static constexpr Dimension value = Dimension::volume;
};
template <>
struct DimensionOf<Flow> {
  static constexpr Dimension value = Dimension::flow;
};
template <>
struct DimensionOf<Time> {
  static constexpr Dimension value = Dimension::time;
};
template <>
struct DimensionOf<Length> {
  static constexpr Dimension value = Dimension::length;
};
template <>
struct DimensionOf<Area> {
  static constexpr Dimension value = Dimension::area;
};
template <>
struct DimensionOf<Mass> {
  static constexpr Dimension value = Dimension::mass;
};
template <>
struct DimensionOf<MassConcentration> {
  static constexpr Dimension value = Dimension::haemoglobin;
};
template <>
struct DimensionOf<AmountConcentration> {
  static constexpr Dimension value = Dimension::lactate;
};
template <>
struct DimensionOf<Ratio> {
  static constexpr Dimension value = Dimension::fraction;
};
template <>
struct DimensionOf<Frequency> {
  static constexpr Dimension value = Dimension::frequency;
};
template <>
struct DimensionOf<Power> {
  static constexpr Dimension value = Dimension::power;
};
template <>
struct DimensionOf<Compliance> {
  static constexpr Dimension value = Dimension::compliance;
};
template <>
struct DimensionOf<Elastance> {
  static constexpr Dimension value = Dimension::elastance;
};
template <>
struct DimensionOf<Resistance> {
  static constexpr Dimension value = Dimension::resistance;
};
template <>
struct DimensionOf<VolumePerMass> {
  static constexpr Dimension value = Dimension::volume_per_mass;
};
template <>
struct DimensionOf<FlowPerArea> {
  static constexpr Dimension value = Dimension::flow_per_area;
};

// Parses `text` as a quantity of type Q for `field`.
template <class Q>
Q parse_quantity(std::string_view text, const Field& field) {
  return Q::from_value(parse_in_si(text, DimensionOf<Q>::value, field));
}

// A plain number (counts, ratios without unit); rejects any unit text.
double parse_number(std::string_view text, const Field& field);

}  // namespace bb
