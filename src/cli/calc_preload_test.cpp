// breathbeat calc preload-test: parses options, calls the haemodynamics module, prints.
#include <stdexcept>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/present/haemodynamics.hpp"
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

PreloadMeasure measure_of(const FieldOptions& f, PreloadTestKind kind) {
  const auto word = f.choice("measure");
  if (!word) return default_measure(kind);
  if (const auto measure = preload_measure_from_word(*word)) return *measure;
  throw std::logic_error("field measure: choice '" + *word + "' is not a measure");
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
  in.measure = measure_of(f, in.kind);
  in.before = parse_preload_value(f.text("before").value(), in.measure, "before");
  in.after = parse_preload_value(f.text("after").value(), in.measure, "after");
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
         " follows the measure (a bare number is in that unit):\n" +
         line(K::vt_challenge, "PPV in %, VT " + per_kg_text("preload_tests.vt_challenge_vt_low") +
                                   " -> " + per_kg_text("preload_tests.vt_challenge_vt_high") +
                                   " mL/kg PBW (rise >= " +
                                   pct("preload_tests.vt_challenge_ppv_rise") + " points)") +
         line(K::end_expiratory_occlusion,
              "CO in L/min (or " + measure + " sv, mL); " +
                  short_number(in_seconds(t.get<Time>("preload_tests.eeo_hold_min"))) +
                  " s end-expiratory hold (rise >= " + pct("preload_tests.eeo_co_rise") + " %)") +
         line(K::passive_leg_raising,
              "CO in L/min (or " + measure +
                  " sv, mL / vti, cm) (rise >= " + pct("preload_tests.plr_co_rise") + " %)") +
         line(K::fluid_challenge, "CO in L/min (or " + measure +
                                      " sv, mL) (rise >= " + pct("preload_tests.fluid_rise_low") +
                                      " % and >= " + pct("preload_tests.fluid_rise_high") +
                                      " % both shown)") +
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
