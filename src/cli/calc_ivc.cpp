// breathbeat calc ivc: parses options, calls the IVC module, prints.
#include <stdexcept>

#include "breathbeat/ivc.hpp"
#include "breathbeat/present/ivc.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

// The fields this command reads, in the order of its --help.
constexpr const char* kIvcFields[] = {"ivc_dmax", "ivc_dmin", "ivc_breathing", "vt_per_kg",
                                      "passive",  "iah",      "rv_failure"};

struct IvcCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

IvcInputs read_ivc_inputs(const FieldOptions& f) {
  IvcInputs in;
  in.dmax = f.get<Length>("ivc_dmax");
  in.dmin = f.get<Length>("ivc_dmin");
  if (auto word = f.choice("ivc_breathing")) {
    in.breathing = breathing_from_word(*word);
    if (!in.breathing) {
      throw std::logic_error("field ivc_breathing: choice '" + *word + "' is not a state");
    }
  }
  in.vt_per_kg = f.get<VolumePerMass>("vt_per_kg");
  if (auto passive = f.flag("passive")) in.effort_seen = !*passive;
  in.iah = f.flag("iah");
  in.rv_failure = f.flag("rv_failure");
  require_field(in.dmax, "ivc_dmax");
  require_field(in.dmin, "ivc_dmin");
  require_field(in.breathing, "ivc_breathing");
  return in;
}

}  // namespace

void register_calc_ivc(CLI::App& calc) {
  auto cmd = std::make_shared<IvcCommand>();
  CLI::App* sub = calc.add_subcommand(
      "ivc", "IVC collapsibility, distensibility, variation; RAP estimate (unassisted breathing)");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  for (const char* id : kIvcFields) cmd->fields->add(id);
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const IvcInputs in = read_ivc_inputs(*cmd->fields);
    validate_ivc(in, limits);
    const IvcResults r = analyse_ivc(in, limits);
    print_answer(describe_ivc(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
