// breathbeat calc oxygen: parses options, calls the oxygen module, prints.
#include <cctype>

#include "breathbeat/oxygen.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct OxygenCommand {
  CommonOptions common;
  std::string sex;
  std::string ci;  // a flow per m2 of body surface: L/min/m2 or mL/min/m2
  std::string bsa_formula = "dubois";
  std::unique_ptr<FieldOptions> fields;
};

OxygenInputs read_inputs(const OxygenCommand& c) {
  const FieldOptions& f = *c.fields;
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
  if (!c.ci.empty()) in.ci = parse_quantity<FlowPerArea>(c.ci, Field{"--ci", "L/min/m2"});
  in.pmean = f.get<Pressure>("pmean");
  in.peco2 = f.get<Pressure>("peco2");
  in.peep = f.get<Pressure>("peep");
  if (!c.sex.empty()) in.sex = parse_sex_word(c.sex) == SexWord::male ? Sex::male : Sex::female;
  in.height = f.get<Length>("height");
  in.weight = f.get<Mass>("weight");
  in.bsa = f.get<Area>("bsa");
  in.bsa_formula = c.bsa_formula == "mosteller" ? BsaFormula::mosteller : BsaFormula::du_bois;
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
  f.add("hb", "g/dL", "Haemoglobin (g/dL, g/L or mmol/L)");
  f.add("sao2", "", "Arterial O2 saturation, from the blood gas (0.98, 98 or 98%)");
  f.add("spo2", "", "Pulse-oximetry saturation (for SpO2/FiO2 and OSI)");
  f.add("pao2", "mmHg", "Arterial PO2");
  f.add("paco2", "mmHg", "Arterial PCO2");
  f.add("fio2", "", "Inspired O2 fraction (0.21 to 1.0, or 21 to 100 %)");
  f.add("pb", "mmHg", "Barometric pressure (default: the preset, 760 mmHg)");
  f.add("ph2o", "mmHg", "Water vapour pressure (default: the preset, 47 mmHg at 37 degC)");
  f.add("rq", "", "Respiratory quotient R, a plain number (default: the preset, 0.8)");
  f.add("svo2", "", "Mixed venous O2 saturation (ScvO2 may stand in, with a caveat)");
  f.add("pvo2", "mmHg", "Mixed venous PO2");
  f.add("co", "L/min", "Cardiac output");
  sub->add_option("--ci", cmd->ci, "Cardiac index [default unit L/min/m2]");
  f.add("pmean", "cmH2O", "Mean airway pressure (for OI and OSI)");
  f.add("peco2", "mmHg", "Mixed expired PCO2, not end-tidal (for VD/VT)");
  f.add("peep", "cmH2O", "Total PEEP (the Berlin categories need PEEP >= 5 cmH2O)");
  sub->add_option("--sex", cmd->sex, "Sex (recorded; no oxygen formula depends on it)")
      ->check(CLI::IsMember({"male", "female", "m", "f"}));
  f.add("height", "cm", "Height (for body surface area)");
  f.add("weight", "kg", "Actual body weight (for body surface area)");
  f.add("bsa", "m2", "Body surface area, if known (otherwise from height and weight)");
  sub->add_option("--bsa-formula", cmd->bsa_formula,
                  "Body surface area formula: dubois (default) or mosteller")
      ->check(CLI::IsMember({"dubois", "du-bois", "mosteller"}));
  f.add("age", "", "Age in years (for the expected A-a gradient)");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const OxygenInputs in = read_inputs(*cmd);
    validate_oxygen(in, limits);
    const OxygenResults r = analyse_oxygen(in, limits);
    print_answer(describe_oxygen(in, r, limits), cmd->common);
  });
}

}  // namespace bb::cli
