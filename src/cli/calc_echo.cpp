// breathbeat calc echo: parses options, calls the echo module, prints.
#include "breathbeat/echo.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct EchoCommand {
  CommonOptions common;
  std::string bsa_formula = "dubois";
  std::unique_ptr<FieldOptions> fields;
};

EchoInputs read_inputs(const EchoCommand& c) {
  const FieldOptions& f = *c.fields;
  EchoInputs in;
  in.lvot = f.get<Length>("lvot");
  in.vti = f.get<Length>("vti");
  in.hr = f.get<Frequency>("hr");
  in.height = f.get<Length>("height");
  in.weight = f.get<Mass>("weight");
  in.bsa = f.get<Area>("bsa");
  in.bsa_formula = c.bsa_formula == "mosteller" ? BsaFormula::mosteller : BsaFormula::du_bois;
  return in;
}

}  // namespace

void register_calc_echo(CLI::App& calc) {
  auto cmd = std::make_shared<EchoCommand>();
  CLI::App* sub = calc.add_subcommand(
      "echo", "Stroke volume, cardiac output and index from LVOT diameter and VTI");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  f.add("lvot", "cm", "LVOT diameter, mid-systole (cm or mm)")->required();
  f.add("vti", "cm", "LVOT velocity-time integral (pulsed-wave Doppler)")->required();
  f.add("hr", "/min", "Heart rate during the VTI");
  f.add("height", "cm", "Height, for body surface area");
  f.add("weight", "kg", "Weight, for body surface area");
  f.add("bsa", "m2", "Body surface area, if known (instead of height and weight)");
  sub->add_option("--bsa-formula", cmd->bsa_formula, "dubois (default) or mosteller")
      ->check(CLI::IsMember({"dubois", "mosteller"}));
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const EchoInputs in = read_inputs(*cmd);
    validate_echo(in, limits);
    const EchoResults r = analyse_echo(in);
    print_answer(describe_echo(in, r), cmd->common);
  });
}

}  // namespace bb::cli
