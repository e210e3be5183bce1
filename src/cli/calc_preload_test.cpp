// breathbeat calc preload-test: parses options, calls the haemodynamics module, prints.
#include "breathbeat/haemodynamics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct PreloadCommand {
  CommonOptions common;
  std::string kind;
  std::string measure;
  std::string before;
  std::string after;
  std::string fluid;
  bool passive = false, spontaneous = false, iah = false, no_iah = false;
  std::unique_ptr<FieldOptions> fields;
};

PreloadTestKind kind_of(const std::string& word) {
  for (PreloadTestKind k :
       {PreloadTestKind::vt_challenge, PreloadTestKind::end_expiratory_occlusion,
        PreloadTestKind::passive_leg_raising, PreloadTestKind::fluid_challenge,
        PreloadTestKind::mini_fluid_challenge}) {
    if (word == to_string(k)) return k;
  }
  throw InputError("--kind", word, "is not a preload test",
                   "vt-challenge, eeo, plr, fluid or mini-fluid");
}

PreloadMeasure measure_of(const std::string& word, PreloadTestKind kind) {
  if (word.empty()) return default_measure(kind);
  for (PreloadMeasure m : {PreloadMeasure::ppv, PreloadMeasure::cardiac_output,
                           PreloadMeasure::stroke_volume, PreloadMeasure::vti}) {
    if (word == to_string(m)) return m;
  }
  throw InputError("--measure", word, "is not a measure", "ppv, co, sv or vti");
}

std::optional<bool> either(bool yes, bool no) {
  if (yes) return true;
  if (no) return false;
  return std::nullopt;
}

PreloadTestInputs read_inputs(const PreloadCommand& c) {
  const FieldOptions& f = *c.fields;
  PreloadTestInputs in;
  in.kind = kind_of(c.kind);
  in.measure = measure_of(c.measure, in.kind);
  in.before = parse_preload_value(c.before, in.measure, "--before");
  in.after = parse_preload_value(c.after, in.measure, "--after");
  in.fluid.volume = f.get<Volume>("volume");
  in.fluid.duration = f.get<Time>("duration");
  if (!c.fluid.empty()) in.fluid.fluid = c.fluid;
  in.vt_before_per_kg = f.get<VolumePerMass>("vt_before");
  in.vt_after_per_kg = f.get<VolumePerMass>("vt_after");
  in.hold = f.get<Time>("hold");
  in.passive = either(c.passive, c.spontaneous);
  in.intra_abdominal_hypertension = either(c.iah, c.no_iah);
  return in;
}

}  // namespace

void register_calc_preload_test(CLI::App& calc) {
  auto cmd = std::make_shared<PreloadCommand>();
  CLI::App* sub = calc.add_subcommand(
      "preload-test", "Paired before/after preload test: change, cut-off, conditions and reading");
  sub->footer(
      "The unit of --before/--after follows the measure (a bare number is in that unit):\n"
      "  vt-challenge  PPV in %, VT 6 -> 8 mL/kg PBW (rise >= 3.5 points)\n"
      "  eeo           CO in L/min (or --measure sv, mL); 15 s end-expiratory hold (rise >= 5 %)\n"
      "  plr           CO in L/min (or --measure sv, mL / vti, cm) (rise >= 10 %)\n"
      "  fluid         CO in L/min (or --measure sv, mL) (rise >= 10 % and >= 15 % both shown)\n"
      "  mini-fluid    LVOT VTI in cm, 100 mL over 1 min (rise >= 10 %)\n"
      "Cut-offs come from presets/thresholds/haemodynamics.toml (override with --thresholds).");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  sub->add_option("--kind", cmd->kind, "Which test: vt-challenge, eeo, plr, fluid, mini-fluid")
      ->required()
      ->check(CLI::IsMember({"vt-challenge", "eeo", "plr", "fluid", "mini-fluid"}));
  sub->add_option("--measure", cmd->measure,
                  "What was measured: ppv, co, sv or vti (default by kind)")
      ->check(CLI::IsMember({"ppv", "co", "sv", "vti"}));
  sub->add_option("--before", cmd->before, "Value before the test")->required();
  sub->add_option("--after", cmd->after, "Value after (at the peak of) the test")->required();
  f.add("vt_before", "mL/kg", "vt-challenge: tidal volume per kg PBW before");
  f.add("vt_after", "mL/kg", "vt-challenge: tidal volume per kg PBW during the challenge");
  f.add("hold", "s", "eeo: duration of the end-expiratory hold");
  f.add("volume", "mL", "fluid/mini-fluid: volume given");
  f.add("duration", "min", "fluid/mini-fluid: time over which it was given");
  sub->add_option("--fluid", cmd->fluid, "fluid/mini-fluid: fluid type")
      ->check(CLI::IsMember({"crystalloid", "balanced", "saline", "albumin", "gelatin", "blood"}));
  sub->add_flag("--passive", cmd->passive, "Controlled ventilation, no spontaneous effort")
      ->excludes(
          sub->add_flag("--spontaneous", cmd->spontaneous, "Spontaneous breathing effort present"));
  sub->add_flag("--iah", cmd->iah, "Intra-abdominal hypertension present")
      ->excludes(sub->add_flag("--no-iah", cmd->no_iah, "No intra-abdominal hypertension"));
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
