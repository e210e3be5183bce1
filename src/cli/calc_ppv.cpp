// breathbeat calc ppv: parses options, calls the haemodynamics module, prints.
#include "breathbeat/haemodynamics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct PpvCommand {
  CommonOptions common;
  std::string cycles;
  std::string beats;
  std::string svv;
  FlagPair passive, regular, closed_chest, iah, rv_failure;
  std::unique_ptr<FieldOptions> fields;
};

PpvInputs read_inputs(const PpvCommand& c) {
  const FieldOptions& f = *c.fields;
  PpvInputs in;
  if (!c.cycles.empty()) in.cycles = parse_pulse_pressure_cycles(c.cycles, "cycles");
  if (!c.beats.empty()) in.beats = parse_beats_by_breath(c.beats, "beats");
  if (!c.svv.empty()) in.svv = parse_percent_points(c.svv, "svv");
  in.sbp = f.get<Pressure>("sbp");
  in.dbp = f.get<Pressure>("dbp");
  PpvConditions& k = in.conditions;
  k.hr = f.get<Frequency>("hr");
  k.rr = f.get<Frequency>("rr");
  k.vt_per_kg = f.get<VolumePerMass>("vt_per_kg");
  k.crs = f.get<Compliance>("crs");
  k.passive = c.passive.value();
  k.regular_rhythm = c.regular.value();
  k.closed_chest = c.closed_chest.value();
  k.intra_abdominal_hypertension = c.iah.value();
  k.rv_failure = c.rv_failure.value();
  return in;
}

}  // namespace

void register_calc_ppv(CLI::App& calc) {
  auto cmd = std::make_shared<PpvCommand>();
  CLI::App* sub = calc.add_subcommand(
      "ppv", "Pulse pressure variation, SPV, MAP estimate, HR/RR, with validity gates and reading");
  sub->footer(
      "Arterial pressures (mmHg unless a unit is written after a number, e.g. 8.1kPa):\n"
      "  --cycles 62/48,60/47,63/50          PPmax/PPmin of each breath, breaths separated by ','\n"
      "  --beats \"120/70,118/69;119/70,...\"   SBP/DBP of each beat, beats separated by ',',\n"
      "                                      breaths by ';' (quote it for the shell)\n"
      "At least 3 breaths. Conditions not stated are reported as unknown, and the reading is then\n"
      "conditional; a failed condition makes the reading not interpretable.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  sub->add_option("--cycles", cmd->cycles, "PPmax/PPmin per breath, e.g. 62/48,60/47,63/50");
  sub->add_option("--beats", cmd->beats,
                  "SBP/DBP per beat, ',' between beats, ';' between breaths");
  sub->add_option("--svv", cmd->svv, "Stroke volume variation from a device, in % (12 or 12%)");
  f.add("sbp", "mmHg", "Systolic pressure, for the MAP estimate with --cycles");
  f.add("dbp", "mmHg", "Diastolic pressure, for the MAP estimate with --cycles");
  f.add("hr", "/min", "Heart rate");
  f.add("rr", "/min", "Respiratory rate");
  f.add("vt_per_kg", "mL/kg", "Tidal volume per kg predicted body weight");
  f.add("crs", "mL/cmH2O", "Static respiratory-system compliance");
  add_flag_pair(sub, cmd->passive, "--passive", "--spontaneous",
                "Controlled ventilation, no spontaneous effort",
                "Spontaneous breathing effort present");
  add_flag_pair(sub, cmd->regular, "--regular", "--irregular", "Regular cardiac rhythm",
                "Irregular rhythm (e.g. AF, ectopy)");
  add_flag_pair(sub, cmd->closed_chest, "--closed-chest", "--open-chest", "Chest closed",
                "Chest open (sternotomy)");
  add_flag_pair(sub, cmd->iah, "--iah", "--no-iah", "Intra-abdominal hypertension present",
                "No intra-abdominal hypertension");
  add_flag_pair(sub, cmd->rv_failure, "--rv-failure", "--no-rv-failure",
                "Right-ventricular failure present", "No right-ventricular failure");
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
