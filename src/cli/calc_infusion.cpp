// breathbeat calc infusion: parses options, calls the infusion module, prints.
//
// One infusion:     --drug norepinephrine --rate 12mL/h --concentration 64ug/mL --weight 80
//                   --drug norepinephrine --dose 0.1ug/kg/min --concentration 64ug/mL --weight 80
// Several (repeat): --infusion "norepinephrine:rate=12mL/h,conc=64ug/mL"
//                   --infusion "vasopressin:dose=0.03U/min"
// --drug and --infusion may be combined; the --drug infusion comes first.
#include "breathbeat/infusion.hpp"
#include "breathbeat/present/infusion.hpp"
#include "cli_common.hpp"
#include "commands.hpp"
#include "step_options.hpp"

namespace bb::cli {

namespace {

struct InfusionCommand {
  CommonOptions common;
  std::unique_ptr<FieldOptions> fields;
};

// The infusion described by --drug/--rate/--concentration/--dose, if any.
std::optional<InfusionInput> single_infusion(const FieldOptions& f) {
  const auto drug = f.text("drug");
  const auto rate = f.text("rate");
  const auto conc = f.text("concentration");
  const auto dose = f.text("dose");
  if (!drug) {
    if (!rate && !conc && !dose) return std::nullopt;
    throw InputError("drug", "", "is missing",
                     "--drug NAME with --rate, --concentration or --dose");
  }
  auto field = [&](const char* id) { return Field{f.shown_name(id), field_spec(id).default_unit}; };
  InfusionInput in;
  in.drug = parse_drug(*drug, field("drug"));
  const DoseBasis basis = drug_info(in.drug).basis;
  // The unit of a bare concentration or dose follows the drug (U/mL, U/min for vasopressin;
  // a dose of angiotensin II in ng/kg/min).
  if (rate) in.rate = parse_infusion_rate(*rate, field("rate"));
  if (conc)
    in.conc = parse_drug_concentration(*conc, basis, Field{f.shown_name("concentration"), ""});
  if (dose) in.dose = parse_drug_dose(*dose, in.drug, Field{f.shown_name("dose"), ""});
  return in;
}

InfusionSet read_inputs(const InfusionCommand& c) {
  const FieldOptions& f = *c.fields;
  InfusionSet set;
  set.weight = f.get<Mass>("weight");
  if (auto single = single_infusion(f)) set.infusions.push_back(*single);
  const std::string infusion = option_name(field_spec("infusion"));
  for (const auto& spec : f.texts("infusion")) {
    set.infusions.push_back(parse_infusion_spec(spec, Field{infusion, ""}));
  }
  if (set.infusions.empty()) {
    throw InputError("infusion", "", "no infusion given",
                     "--drug with --rate or --dose (and --concentration), or --infusion SPEC");
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
      "Several infusions: repeat --infusion \"DRUG:rate=12mL/h,conc=64mcg/mL\" or\n"
      "--infusion \"DRUG:dose=0.1mcg/kg/min[,conc=...]\"; may be combined with --drug.\n"
      "A bare dose is in mcg/kg/min; units/min for vasopressin, ng/kg/min for angiotensin-ii.\n"
      "Doses are set against usual ranges (presets/thresholds/infusion.toml): notes, not orders.");
  cmd->fields = std::make_unique<FieldOptions>(sub);
  cmd->fields->add("weight");
  // The same options as trial add-step's (step_options.hpp).
  add_infusion_options(*cmd->fields);
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
