// breathbeat calc ppv: parses options, calls the haemodynamics module, prints.
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/present/haemodynamics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct PpvCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

PpvInputs read_inputs(const PpvCommand& c) {
  const FieldOptions& f = *c.fields;
  PpvInputs in;
  if (const auto text = f.text("pp_cycles"))
    in.cycles =
        parse_pulse_pressure_cycles(*text, "pp_cycles", field_spec("pp_cycles").default_unit);
  if (const auto text = f.text("beats"))
    in.beats = parse_beats_by_breath(*text, "beats", field_spec("beats").default_unit);
  // A bare number is a percentage here, never a fraction ("0.5" is 0.5 %).
  if (const auto text = f.text("svv")) in.svv = parse_percent_points(*text, "svv");
  in.sbp = f.get<Pressure>("sbp");
  in.dbp = f.get<Pressure>("dbp");
  PpvConditions& k = in.conditions;
  k.hr = f.get<Frequency>("hr");
  k.rr = f.get<Frequency>("rr");
  k.vt_per_kg = f.get<VolumePerMass>("vt_per_kg");
  k.crs = f.get<Compliance>("crs");
  k.passive = f.flag("passive");
  k.regular_rhythm = f.flag("regular_rhythm");
  k.closed_chest = f.flag("closed_chest");
  k.intra_abdominal_hypertension = f.flag("iah");
  k.rv_failure = f.flag("rv_failure");
  return in;
}

}  // namespace

void register_calc_ppv(CLI::App& calc) {
  auto cmd = std::make_shared<PpvCommand>();
  CLI::App* sub = calc.add_subcommand(
      "ppv", "Pulse pressure variation, SPV, MAP estimate, HR/RR, with validity gates and reading");
  const std::string cycles = option_name(field_spec("pp_cycles"));
  const std::string beats = option_name(field_spec("beats"));
  sub->footer(
      "Arterial pressures (mmHg unless a unit is written after a number, e.g. 8.1kPa):\n"
      "  " +
      cycles +
      " 62/48,60/47,63/50       PPmax/PPmin of each breath, breaths separated by ','\n"
      "  " +
      beats +
      " \"120/70,118/69;119/70,...\"   SBP/DBP of each beat, beats separated by ',',\n"
      "                                      breaths by ';' (quote it for the shell)\n"
      "At least 3 breaths. Conditions not stated are reported as unknown, and the reading is then\n"
      "conditional; a failed condition makes the reading not interpretable.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  f.add("pp_cycles");
  f.add("beats");
  f.add("svv");
  f.add("sbp", "Systolic pressure, for the MAP estimate with " + cycles);
  f.add("dbp", "Diastolic pressure, for the MAP estimate with " + cycles);
  f.add("hr");
  f.add("rr");
  f.add("vt_per_kg");
  f.add("crs");
  f.add("passive");
  f.add("regular_rhythm");
  f.add("closed_chest");
  f.add("iah");
  f.add("rv_failure");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const PpvInputs in = read_inputs(*cmd);
    validate_ppv(in, limits);
    const PpvResults r = analyse_ppv(in, limits);
    print_answer(describe_ppv(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
