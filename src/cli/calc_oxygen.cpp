// breathbeat calc oxygen: parses options, calls the oxygen module, prints.
#include "breathbeat/oxygen.hpp"
#include "breathbeat/present/oxygen.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

// The fields this command reads, in the order of its --help.
constexpr const char* kOxygenFields[] = {
    "hb",  "sao2",   "spo2",   "pao2", "paco2",       "fio2",  "pb",    "ph2o",
    "rq",  "svo2",   "pvo2",   "co",   "ci",          "pmean", "peco2", "peep_total",
    "sex", "height", "weight", "bsa",  "bsa_formula", "age"};

struct OxygenCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

OxygenInputs read_oxygen_inputs(const FieldOptions& f) {
  OxygenInputs in;
  in.hb = f.get<MassConcentration>("hb");
  in.sao2 = f.get<Ratio>("sao2");
  in.spo2 = f.get<Ratio>("spo2");
  in.pao2 = f.get<Pressure>("pao2");
  in.paco2 = f.get<Pressure>("paco2");
  in.fio2 = f.get<Ratio>("fio2");
  in.pb = f.get<Pressure>("pb");
  in.ph2o = f.get<Pressure>("ph2o");
  if (auto rq = f.number("rq")) in.rq = fraction(*rq);
  in.svo2 = f.get<Ratio>("svo2");
  in.pvo2 = f.get<Pressure>("pvo2");
  in.co = f.get<Flow>("co");
  in.ci = f.get<FlowPerArea>("ci");
  in.pmean = f.get<Pressure>("pmean");
  in.peco2 = f.get<Pressure>("peco2");
  in.peep = f.get<Pressure>("peep_total");
  if (auto sex = f.choice("sex")) in.sex = *sex == "male" ? Sex::male : Sex::female;
  in.height = f.get<Length>("height");
  in.weight = f.get<Mass>("weight");
  in.bsa = f.get<Area>("bsa");
  if (auto formula = f.choice("bsa_formula")) {
    in.bsa_formula = *formula == "mosteller" ? BsaFormula::mosteller : BsaFormula::du_bois;
  }
  in.age_years = f.number("age");
  return in;
}

}  // namespace

void register_calc_oxygen(CLI::App& calc) {
  auto cmd = std::make_shared<OxygenCommand>();
  CLI::App* sub = calc.add_subcommand(
      "oxygen", "Oxygen transport and gas exchange: CaO2, DO2, VO2, PAO2, A-a, P/F, S/F, OI, ...");
  sub->footer(
      "Saturations and FiO2 may be written as a fraction (0.95), a percentage (95) or 95%.\n"
      "PaO2, PaCO2, PvO2, PECO2 and Pb take mmHg or kPa; Hb takes g/dL, g/L or mmol/L.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  FieldOptions& f = *cmd->fields;
  for (const char* id : kOxygenFields) {
    // The registry's help for sex speaks of predicted body weight, which this command has not.
    if (std::string_view(id) == "sex") {
      f.add(id, "Sex (recorded; no oxygen formula depends on it)");
    } else {
      f.add(id);
    }
  }
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const OxygenInputs in = read_oxygen_inputs(*cmd->fields);
    validate_oxygen(in, limits);
    const OxygenResults r = analyse_oxygen(in, limits);
    print_answer(describe_oxygen(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
