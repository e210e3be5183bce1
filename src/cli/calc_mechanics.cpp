// breathbeat calc mechanics: parses options, calls the mechanics module, prints.
#include "breathbeat/mechanics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct MechanicsCommand {
  CommonOptions common;
  std::string sex;
  std::string mode;
  std::unique_ptr<FieldOptions> fields;
};

MechanicsInputs read_inputs(const MechanicsCommand& c) {
  const FieldOptions& f = *c.fields;
  MechanicsInputs in;
  if (!c.sex.empty()) in.sex = parse_sex_word(c.sex) == SexWord::male ? Sex::male : Sex::female;
  if (!c.mode.empty()) in.mode = c.mode == "pc" ? VentMode::pressure_control : VentMode::volume_control;
  in.height = f.get<Length>("height");
  in.vt = f.get<Volume>("vt");
  in.peep_total = f.get<Pressure>("peep");
  in.set_peep = f.get<Pressure>("set_peep");
  in.pplat = f.get<Pressure>("pplat");
  in.ppeak = f.get<Pressure>("ppeak");
  in.pinsp = f.get<Pressure>("pinsp");
  in.rr = f.get<Frequency>("rr");
  in.ti = f.get<Time>("ti");
  in.flow = f.get<Flow>("flow");
  in.pes_ee = f.get<Pressure>("pes_ee");
  in.pes_ei = f.get<Pressure>("pes_ei");
  in.ve = f.get<Flow>("ve");
  in.paco2 = f.get<Pressure>("paco2");
  return in;
}

}  // namespace

void register_calc_mechanics(CLI::App& calc) {
  auto cmd = std::make_shared<MechanicsCommand>();
  CLI::App* sub = calc.add_subcommand(
      "mechanics", "Respiratory mechanics: PBW, driving pressure, compliance, power, ...");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  sub->add_option("--sex", cmd->sex, "Sex for predicted body weight")->check(
      CLI::IsMember({"male", "female", "m", "f"}));
  f.add("height", "cm", "Height");
  sub->add_option("--mode", cmd->mode, "Breath type: vc (volume control) or pc (pressure control)")
      ->check(CLI::IsMember({"vc", "pc"}));
  f.add("vt", "mL", "Tidal volume");
  f.add("peep", "cmH2O", "Total PEEP, from an end-expiratory hold");
  f.add("set_peep", "cmH2O", "PEEP set on the ventilator");
  f.add("pplat", "cmH2O", "Plateau pressure, end-inspiratory hold");
  f.add("ppeak", "cmH2O", "Peak airway pressure");
  f.add("pinsp", "cmH2O", "PC: total inspiratory pressure above atmosphere (not above PEEP)");
  f.add("rr", "/min", "Respiratory rate");
  f.add("ti", "s", "Inspiratory time");
  f.add("flow", "L/min", "Constant inspiratory flow (VC)");
  f.add("pes_ee", "cmH2O", "Oesophageal pressure at end-expiration");
  f.add("pes_ei", "cmH2O", "Oesophageal pressure at end-inspiration");
  f.add("ve", "L/min", "Minute ventilation");
  f.add("paco2", "mmHg", "Arterial PCO2");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const MechanicsInputs in = read_inputs(*cmd);
    validate_mechanics(in, limits);
    const MechanicsResults r = analyse_mechanics(in);
    print_answer(describe_mechanics(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
