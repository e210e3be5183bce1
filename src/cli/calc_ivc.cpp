// breathbeat calc ivc: parses options, calls the IVC module, prints.
#include "breathbeat/ivc.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct IvcCommand {
  CommonOptions common;
  std::string breathing;
  FlagPair effort;
  FlagPair iah;
  FlagPair rv_failure;
  std::unique_ptr<FieldOptions> fields;
};

IvcInputs read_inputs(const IvcCommand& c) {
  const FieldOptions& f = *c.fields;
  IvcInputs in;
  in.dmax = f.get<Length>("dmax");
  in.dmin = f.get<Length>("dmin");
  in.vt_per_kg = f.get<VolumePerMass>("vt_per_kg");
  if (!c.breathing.empty()) {
    in.breathing = c.breathing == "passive" ? Breathing::passive : Breathing::spontaneous;
  }
  in.effort_seen = c.effort.value();
  in.iah = c.iah.value();
  in.rv_failure = c.rv_failure.value();
  return in;
}

}  // namespace

void register_calc_ivc(CLI::App& calc) {
  auto cmd = std::make_shared<IvcCommand>();
  CLI::App* sub = calc.add_subcommand(
      "ivc", "IVC collapsibility, distensibility, variation; RAP estimate (spontaneous)");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  f.add("dmax", "cm", "Widest IVC diameter over the breath (cm or mm)")->required();
  f.add("dmin", "cm", "Narrowest IVC diameter over the breath (cm or mm)")->required();
  sub->add_option("--breathing", cmd->breathing,
                  "passive (controlled ventilation) or spontaneous; decides which index applies")
      ->required()
      ->check(CLI::IsMember({"passive", "spontaneous"}));
  f.add("vt_per_kg", "mL/kg", "Tidal volume per kg predicted body weight");
  add_flag_pair(sub, cmd->effort, "--effort", "--no-effort", "Breathing effort was seen",
                "Patient fully passive: no breathing effort seen");
  add_flag_pair(sub, cmd->iah, "--iah", "--no-iah", "Intra-abdominal hypertension present",
                "No intra-abdominal hypertension");
  add_flag_pair(sub, cmd->rv_failure, "--rv-failure", "--no-rv-failure",
                "Severe RV failure or severe tricuspid regurgitation present",
                "No severe RV failure or severe tricuspid regurgitation");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const IvcInputs in = read_inputs(*cmd);
    validate_ivc(in, limits);
    const IvcResults r = analyse_ivc(in, limits);
    print_answer(describe_ivc(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
