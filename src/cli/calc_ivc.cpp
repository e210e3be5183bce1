// breathbeat calc ivc: parses options, calls the IVC module, prints.
#include "breathbeat/ivc.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

// A condition stated with a pair of flags (--iah / --no-iah); neither = not stated.
struct StatedPair {
  bool yes = false;
  bool no = false;
  std::optional<bool> value() const {
    if (yes) return true;
    if (no) return false;
    return std::nullopt;
  }
};

struct IvcCommand {
  CommonOptions common;
  std::string breathing;
  StatedPair effort;
  StatedPair iah;
  StatedPair rv_failure;
  std::unique_ptr<FieldOptions> fields;
};

void add_pair(CLI::App* sub, StatedPair& pair, const std::string& yes, const std::string& no,
              const std::string& yes_help, const std::string& no_help) {
  CLI::Option* y = sub->add_flag(yes, pair.yes, yes_help);
  CLI::Option* n = sub->add_flag(no, pair.no, no_help);
  y->excludes(n);
}

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
  add_pair(sub, cmd->effort, "--effort", "--no-effort", "Breathing effort was seen",
           "Patient fully passive: no breathing effort seen");
  add_pair(sub, cmd->iah, "--iah", "--no-iah", "Intra-abdominal hypertension present",
           "No intra-abdominal hypertension");
  add_pair(sub, cmd->rv_failure, "--rv-failure", "--no-rv-failure",
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
