// breathbeat calc infusion: parses options, calls the infusion module, prints.
//
// One infusion:     --drug norepinephrine --rate 12mL/h --conc 64ug/mL --weight 80
//                   --drug norepinephrine --dose 0.1ug/kg/min --conc 64ug/mL --weight 80
// Several (repeat): --infusion "norepinephrine:rate=12mL/h,conc=64ug/mL"
//                   --infusion "vasopressin:dose=0.03U/min"
// --drug and --infusion may be combined; the --drug infusion comes first.
#include "breathbeat/infusion.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {

struct InfusionCommand {
  CommonOptions common;
  std::string drug;
  std::string rate;
  std::string conc;
  std::string dose;
  std::vector<std::string> specs;
  std::unique_ptr<FieldOptions> fields;
  CLI::Option* rate_opt = nullptr;
  CLI::Option* conc_opt = nullptr;
  CLI::Option* dose_opt = nullptr;
};

// The infusion described by --drug/--rate/--conc/--dose, if any.
std::optional<InfusionInput> single_infusion(const InfusionCommand& c) {
  const bool parts = c.rate_opt->count() || c.conc_opt->count() || c.dose_opt->count();
  if (c.drug.empty()) {
    if (!parts) return std::nullopt;
    throw InputError("--drug", "", "is missing", "--drug NAME with --rate, --conc or --dose");
  }
  InfusionInput in;
  in.drug = parse_drug(c.drug, Field{"--drug", ""});
  const DoseBasis basis = drug_info(in.drug).basis;
  if (c.rate_opt->count()) in.rate = parse_infusion_rate(c.rate, Field{"--rate", "mL/h"});
  if (c.conc_opt->count()) in.conc = parse_drug_concentration(c.conc, basis, Field{"--conc", ""});
  if (c.dose_opt->count()) in.dose = parse_drug_dose(c.dose, basis, Field{"--dose", ""});
  return in;
}

InfusionSet read_inputs(const InfusionCommand& c) {
  InfusionSet set;
  set.weight = c.fields->get<Mass>("weight");
  if (auto single = single_infusion(c)) set.infusions.push_back(*single);
  for (const auto& spec : c.specs) {
    set.infusions.push_back(parse_infusion_spec(spec, Field{"--infusion", ""}));
  }
  return set;
}

}  // namespace

void register_calc_infusion(CLI::App& calc) {
  auto cmd = std::make_shared<InfusionCommand>();
  CLI::App* sub = calc.add_subcommand(
      "infusion", "Vasoactive dose <-> pump rate, and the norepinephrine-equivalent dose");
  sub->footer(
      "Drugs: norepinephrine, epinephrine, phenylephrine, dopamine, dobutamine, milrinone,\n"
      "vasopressin, metaraminol, angiotensin-ii.\n"
      "Several infusions: repeat --infusion \"DRUG:rate=12mL/h,conc=64ug/mL\" or\n"
      "--infusion \"DRUG:dose=0.1ug/kg/min[,conc=...]\"; may be combined with --drug.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  cmd->fields->add("weight", "kg", "Patient weight, for doses per kg");
  sub->add_option("--drug", cmd->drug, "Generic drug name of one infusion");
  cmd->rate_opt = sub->add_option("--rate", cmd->rate, "Pump rate [default unit mL/h]");
  cmd->conc_opt = sub->add_option("--conc", cmd->conc,
                                  "Concentration [default unit ug/mL; U/mL for vasopressin]");
  cmd->dose_opt = sub->add_option(
      "--dose", cmd->dose, "Dose [default unit ug/kg/min; U/min for vasopressin]; gives the rate");
  sub->add_option("--infusion", cmd->specs, "One infusion as DRUG:rate=..,conc=.. (repeatable)");
  add_common_options(sub, cmd->common);
  sub->callback([cmd] {
    const Thresholds limits = load_thresholds(cmd->common);
    const InfusionSet set = read_inputs(*cmd);
    validate_infusions(set, limits);
    const InfusionResults r = analyse_infusions(set, limits);
    print_answer(describe_infusions(set, r), cmd->common);
  });
}

}  // namespace bb::cli
