// breathbeat calc preload-test: parses options, calls the haemodynamics module, prints.
#include <algorithm>
#include <stdexcept>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"
#include "cli_common.hpp"
#include "commands.hpp"
#include "step_options.hpp"

namespace bb::cli {

namespace {

struct PreloadCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

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
  in.kind = preload_kind(f);
  in.measure = preload_measure(f, in.kind);
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
  const PreloadOptions shared = add_preload_test_options(f);
  shared.kind->required();
  shared.before->required();
  shared.after->required();
  // Read per kg PBW here (the trial file's vt_before/vt_after are in mL): the help says so
  // instead of the registry's default unit.
  f.add("vt_before")
      ->description("tidal-volume challenge: tidal volume per kg PBW before, in mL/kg (e.g. 6)");
  f.add("vt_after")
      ->description(
          "tidal-volume challenge: tidal volume per kg PBW during the challenge, in mL/kg (e.g. "
          "8)");
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
