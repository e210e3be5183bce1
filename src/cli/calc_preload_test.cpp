// breathbeat calc preload-test: parses options, calls the haemodynamics module, prints.
#include <algorithm>
#include <stdexcept>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct PreloadCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

PreloadTestKind kind_of(const FieldOptions& f) {
  const std::string word = f.choice("kind").value();  // a required option
  if (const auto kind = preload_test_kind_from_id(word)) return *kind;
  throw std::logic_error("field kind: choice '" + word + "' is not a preload test");
}

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

// The measure: --measure when given (it must agree with a unit typed), else the
// one the units of --before/--after name, else the test's only measure. A bare
// number for a test judged by several measures is refused: 16 might be cm of
// VTI as well as L/min of cardiac output.
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

// On the command line the tidal volumes of the challenge are per kg PBW, read
// like vt_per_kg (a trial file gives them in mL and the patient's PBW).
std::optional<VolumePerMass> per_kg(const FieldOptions& f, std::string_view id) {
  const auto text = f.text(id);
  if (!text) return std::nullopt;
  return parse_quantity<VolumePerMass>(*text, Field{id, field_spec("vt_per_kg").default_unit});
}

PreloadTestInputs read_inputs(const PreloadCommand& c) {
  const FieldOptions& f = *c.fields;
  PreloadTestInputs in;
  in.kind = kind_of(f);
  const Typed before = typed_value(f, "before");
  const Typed after = typed_value(f, "after");
  in.measure = measure_of(f, in.kind, before, after);
  in.before = parse_preload_value(before.text, in.measure, "before");
  in.after = parse_preload_value(after.text, in.measure, "after");
  in.fluid.volume = f.get<Volume>("volume");
  in.fluid.duration = f.get<Time>("duration");
  in.fluid.fluid = f.text("fluid");
  in.vt_before_per_kg = per_kg(f, "vt_before");
  in.vt_after_per_kg = per_kg(f, "vt_after");
  in.hold = f.get<Time>("hold");
  in.passive = f.flag("passive");
  in.intra_abdominal_hypertension = f.flag("iah");
  return in;
}

// "3.5", "10": a cut-off as people write it.
std::string short_number(double v) {
  std::string s = format_number(v, 1);
  if (s.size() > 2 && s.compare(s.size() - 2, 2, ".0") == 0) s.resize(s.size() - 2);
  return s;
}

// The footer of --help: the built-in cut-off of each test (a site file given
// with --thresholds may change them).
std::string footer() {
  const Thresholds t = Thresholds::built_in();
  const auto pct = [&](const char* key) { return short_number(in_percent(t.get<Ratio>(key))); };
  const auto per_kg_text = [&](const char* key) {
    return short_number(in_mL_per_kg(t.get<VolumePerMass>(key)));
  };
  const std::string measure = option_name(field_spec("measure"));
  const auto line = [](PreloadTestKind kind, const std::string& text) {
    std::string name = id_of(kind);
    name.resize(std::max<std::size_t>(name.size() + 1, 17), ' ');
    return "  " + name + text + "\n";
  };
  using K = PreloadTestKind;
  return "The unit of " + option_name(field_spec("before")) + "/" +
         option_name(field_spec("after")) +
         " names the measure: cm LVOT VTI, L/min cardiac output, mL stroke\n"
         "volume, % PPV. A bare number is in the unit of " +
         measure + " or of the test's only measure;\nfor a test with several it is refused.\n" +
         line(K::vt_challenge, "PPV in %, VT " + per_kg_text("preload_tests.vt_challenge_vt_low") +
                                   " -> " + per_kg_text("preload_tests.vt_challenge_vt_high") +
                                   " mL/kg PBW (rise >= " +
                                   pct("preload_tests.vt_challenge_ppv_rise") + " points)") +
         line(K::end_expiratory_occlusion,
              "CO in L/min or SV in mL; " +
                  short_number(in_seconds(t.get<Time>("preload_tests.eeo_hold_min"))) +
                  " s end-expiratory hold (rise >= " + pct("preload_tests.eeo_co_rise") + " %)") +
         line(K::passive_leg_raising, "CO in L/min, SV in mL or LVOT VTI in cm (rise >= " +
                                          pct("preload_tests.plr_co_rise") + " %)") +
         line(K::fluid_challenge,
              "CO in L/min or SV in mL (rise >= " + pct("preload_tests.fluid_rise_low") +
                  " % and >= " + pct("preload_tests.fluid_rise_high") + " % both shown)") +
         line(K::mini_fluid_challenge,
              "LVOT VTI in cm, " +
                  short_number(in_mL(t.get<Volume>("preload_tests.mini_fluid_volume"))) +
                  " mL over " +
                  short_number(in_minutes(t.get<Time>("preload_tests.mini_fluid_duration"))) +
                  " min (rise >= " + pct("preload_tests.mini_fluid_vti_rise") + " %)") +
         "Cut-offs come from presets/thresholds/haemodynamics.toml (override with --thresholds).";
}

}  // namespace

void register_calc_preload_test(CLI::App& calc) {
  auto cmd = std::make_shared<PreloadCommand>();
  CLI::App* sub = calc.add_subcommand(
      "preload-test", "Paired before/after preload test: change, cut-off, conditions and reading");
  sub->footer(std::function<std::string()>(footer));
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  f.add("kind")->required();
  f.add("measure");
  f.add("before")->required();
  f.add("after")->required();
  f.add("vt_before", "tidal-volume challenge: tidal volume per kg PBW before (mL/kg)");
  f.add("vt_after", "tidal-volume challenge: tidal volume per kg PBW during the challenge (mL/kg)");
  f.add("hold");
  f.add("volume");
  f.add("duration");
  f.add("fluid");
  f.add("passive");
  f.add("iah");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const PreloadTestInputs in = read_inputs(*cmd);
    validate_preload_test(in, limits);
    const PreloadTestResult r = analyse_preload_test(in, limits);
    print_answer(describe_preload_test(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
