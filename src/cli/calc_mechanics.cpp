// breathbeat calc mechanics: parses options, calls the mechanics module, prints.
#include "breathbeat/mechanics.hpp"
#include "breathbeat/present/mechanics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

// The fields this command reads, in the order of its --help.
constexpr const char* kMechanicsFields[] = {"sex",
                                            "height",
                                            "mode",
                                            "vt",
                                            "peep_total",
                                            "set_peep",
                                            "pplat",
                                            "ppeak",
                                            "pc_pressure_total",
                                            "pc_pressure_above_peep",
                                            "rr",
                                            "ti",
                                            "flow",
                                            "pes_ee",
                                            "pes_ei",
                                            "ve",
                                            "paco2"};

// The old field that does not say whether the PC pressure is total or above PEEP: accepted
// as an option only to be refused with a question (hidden from --help).
constexpr const char* kRefused = "pinsp";

// Refuses the ambiguous PC pressure, asking which of the two fields is meant.
void refuse_ambiguous_pinsp(const FieldOptions& f) {
  const auto text = f.text(kRefused);
  if (!text) return;
  throw InputError(kRefused, *text,
                   "does not say whether the set PC pressure is total or above PEEP",
                   "which one is meant: " + option_name(field_spec("pc_pressure_total")) +
                       " (total, PEEP included) or " +
                       option_name(field_spec("pc_pressure_above_peep")) + " (above set PEEP)");
}

struct MechanicsCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

MechanicsInputs read_mechanics_inputs(const FieldOptions& f) {
  MechanicsInputs in;
  if (auto sex = f.choice("sex")) in.sex = *sex == "male" ? Sex::male : Sex::female;
  if (auto mode = f.choice("mode")) {
    in.mode = *mode == "pc" ? VentMode::pressure_control : VentMode::volume_control;
  }
  in.height = f.get<Length>("height");
  in.vt = f.get<Volume>("vt");
  in.peep_total = f.get<Pressure>("peep_total");
  in.set_peep = f.get<Pressure>("set_peep");
  in.pplat = f.get<Pressure>("pplat");
  in.ppeak = f.get<Pressure>("ppeak");
  in.pc_pressure_total = f.get<Pressure>("pc_pressure_total");
  in.pc_pressure_above_peep = f.get<Pressure>("pc_pressure_above_peep");
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
  for (const char* id : kMechanicsFields) cmd->fields->add(id);
  cmd->fields->add(kRefused)->group("");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    refuse_ambiguous_pinsp(*cmd->fields);
    const MechanicsInputs in = read_mechanics_inputs(*cmd->fields);
    validate_mechanics(in, limits);
    const MechanicsResults r = analyse_mechanics(in);
    print_answer(describe_mechanics(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
