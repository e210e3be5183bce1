// breathbeat calc echo: parses options, calls the echo module, prints.
#include "breathbeat/echo.hpp"
#include "breathbeat/present/echo.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

// The fields this command reads, in the order of its --help.
constexpr const char* kEchoFields[] = {"lvot_diameter", "vti", "hr",         "height",
                                       "weight",        "bsa", "bsa_formula"};

struct EchoCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

EchoInputs read_echo_inputs(const FieldOptions& f) {
  EchoInputs in;
  in.lvot = f.get<Length>("lvot_diameter");
  in.vti = f.get<Length>("vti");
  in.hr = f.get<Frequency>("hr");
  in.height = f.get<Length>("height");
  in.weight = f.get<Mass>("weight");
  in.bsa = f.get<Area>("bsa");
  if (auto formula = f.choice("bsa_formula")) {
    in.bsa_formula = *formula == "mosteller" ? BsaFormula::mosteller : BsaFormula::du_bois;
  }
  require_field(in.lvot, "lvot_diameter");
  require_field(in.vti, "vti");
  return in;
}

}  // namespace

void register_calc_echo(CLI::App& calc) {
  auto cmd = std::make_shared<EchoCommand>();
  CLI::App* sub = calc.add_subcommand(
      "echo", "Stroke volume, cardiac output and index from LVOT diameter and VTI");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  for (const char* id : kEchoFields) {
    // The heart rate that counts here is the one during the VTI.
    if (std::string_view(id) == "hr") {
      f.add(id, "Heart rate during the VTI");
    } else {
      f.add(id);
    }
  }
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const EchoInputs in = read_echo_inputs(*cmd->fields);
    validate_echo(in, limits);
    const EchoResults r = analyse_echo(in);
    print_answer(describe_echo(in, r), cmd->common);
  });
}

}  // namespace bb::cli
