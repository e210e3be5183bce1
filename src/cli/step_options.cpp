#include "step_options.hpp"

#include <algorithm>
#include <stdexcept>

#include "breathbeat/infusion.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb::cli {

namespace {

// What each measure's before/after values are: their dimension, and the unit a
// bare number is read in (parse_preload_value).
struct MeasureUnit {
  PreloadMeasure measure;
  Dimension dimension;
  const char* unit;
};
constexpr MeasureUnit kMeasureUnits[] = {
    {PreloadMeasure::vti, Dimension::length, "cm"},
    {PreloadMeasure::cardiac_output, Dimension::flow, "L/min"},
    {PreloadMeasure::stroke_volume, Dimension::volume, "mL"},
    {PreloadMeasure::ppv, Dimension::fraction, "%"},
};

const char* unit_of(PreloadMeasure m) {
  for (const MeasureUnit& u : kMeasureUnits) {
    if (u.measure == m) return u.unit;
  }
  throw std::logic_error("preload measure without a unit");
}

std::string option_of(std::string_view id) {
  return option_name(field_spec(id));
}

// "16 L/min for cardiac output, 16 mL for stroke volume": the measures in their units.
std::string in_their_units(const std::vector<PreloadMeasure>& measures, const std::string& number) {
  std::string out;
  for (std::size_t i = 0; i < measures.size(); ++i) {
    out += (i == 0                     ? ""
            : i + 1 == measures.size() ? " or "
                                       : ", ") +
           number + " " + unit_of(measures[i]) + " for " + display_name(measures[i]);
  }
  return out;
}

// A before/after value as typed: its text, the field and the measure its unit
// names (cm -> VTI, L/min -> CO, mL -> SV, % -> PPV, or any unit of those
// dimensions); no measure for a bare number.
struct Typed {
  std::string text;
  const char* id;
  std::optional<PreloadMeasure> measure;
  std::string number;  // the number as typed, for suggestions
};

Typed typed_value(const FieldOptions& f, const char* id) {
  Typed t{f.text(id).value(), id, std::nullopt, ""};  // required options
  const std::string expected =
      "a number with the unit of its measure: " +
      in_their_units({PreloadMeasure::cardiac_output, PreloadMeasure::stroke_volume,
                      PreloadMeasure::vti, PreloadMeasure::ppv},
                     "16");
  const NumberAndUnit nu = split_number_and_unit(t.text, Field{id, ""}, expected);
  if (nu.unit.empty()) {
    t.number = std::string(trim_view(t.text));
    return t;
  }
  t.number = std::string(trim_view(std::string_view(t.text).substr(
      0, static_cast<std::size_t>(nu.unit.data() - t.text.data()))));
  for (const MeasureUnit& u : kMeasureUnits) {
    if (find_unit(nu.unit, u.dimension)) {
      t.measure = u.measure;
      return t;
    }
  }
  throw InputError(id, t.text, "has a unit that names no measure of a preload test", expected);
}

PreloadMeasure measure_of(const FieldOptions& f, PreloadTestKind kind, const Typed& before,
                          const Typed& after) {
  if (before.measure && after.measure && *before.measure != *after.measure) {
    throw InputError(after.id, after.text,
                     std::string("measures ") + display_name(*after.measure) + " while " +
                         option_of(before.id) + " measures " + display_name(*before.measure),
                     std::string("both in the unit of one measure, e.g. ") + after.number + " " +
                         unit_of(*before.measure));
  }
  const Typed& with_unit = before.measure ? before : after;
  const std::optional<PreloadMeasure> by_unit = with_unit.measure;
  const auto word = f.choice("measure");
  if (word) {
    const auto stated = preload_measure_from_word(*word);
    if (!stated) throw std::logic_error("field measure: choice '" + *word + "' is not a measure");
    if (by_unit && *by_unit != *stated) {
      throw InputError("measure", *word,
                       "does not match the unit of " + option_of(with_unit.id) + " ('" +
                           with_unit.text + "' measures " + display_name(*by_unit) + ")",
                       option_of("measure") + " " + to_string(*by_unit) + ", or " +
                           option_of(with_unit.id) + " in " + unit_of(*stated));
    }
    return *stated;
  }
  const std::vector<PreloadMeasure> accepted = accepted_measures(kind);
  if (by_unit) {
    if (std::find(accepted.begin(), accepted.end(), *by_unit) == accepted.end()) {
      throw InputError(with_unit.id, with_unit.text,
                       std::string("measures ") + display_name(*by_unit) +
                           ", which does not judge the " + display_name(kind),
                       in_their_units(accepted, with_unit.number));
    }
    return *by_unit;
  }
  if (accepted.size() == 1) return accepted.front();
  std::string words;
  for (PreloadMeasure m : accepted) words += (words.empty() ? "" : "|") + std::string(to_string(m));
  throw InputError(before.id, before.text,
                   std::string("has no unit, and the ") + display_name(kind) +
                       " is judged by more than one measure",
                   "the unit that says which: " + in_their_units(accepted, before.number) +
                       "; or " + option_of("measure") + " " + words);
}

}  // namespace

void add_infusion_options(FieldOptions& f) {
  for (const char* id : {"drug", "rate", "concentration", "dose"}) f.add(id);
  f.add_repeated("infusion");
}

std::vector<InfusionText> infusion_texts(const FieldOptions& f) {
  std::vector<InfusionText> out;
  const auto drug = f.text("drug");
  const auto rate = f.text("rate");
  const auto conc = f.text("concentration");
  const auto dose = f.text("dose");
  if (drug) {
    out.push_back({*drug, rate, conc, dose, f.shown_name("drug")});
  } else if (rate || conc || dose) {
    throw InputError("drug", "", "is missing",
                     "--drug NAME with --rate, --concentration or --dose");
  }
  const std::string option = option_name(field_spec("infusion"));
  for (const std::string& spec : f.texts("infusion")) {
    const InfusionSpecParts p = split_infusion_spec(spec, Field{option, ""});
    out.push_back({p.drug, p.rate, p.conc, p.dose, option});
  }
  return out;
}

PreloadOptions add_preload_test_options(FieldOptions& f) {
  PreloadOptions o;
  o.kind = f.add("kind");
  f.add("measure");
  o.before = f.add("before");
  o.after = f.add("after");
  for (const char* id : {"hold", "volume", "duration", "fluid"}) f.add(id);
  return o;
}

PreloadTestKind preload_kind(const FieldOptions& f) {
  const std::string word = f.choice("kind").value();
  if (const auto kind = preload_test_kind_from_id(word)) return *kind;
  throw std::logic_error("field kind: choice '" + word + "' is not a preload test");
}

PreloadMeasure preload_measure(const FieldOptions& f, PreloadTestKind kind) {
  const Typed before = typed_value(f, "before");
  const Typed after = typed_value(f, "after");
  return measure_of(f, kind, before, after);
}

}  // namespace bb::cli
