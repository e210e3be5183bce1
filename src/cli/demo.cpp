// breathbeat demo: the mechanics of a built-in, invented example patient.
// (Until the trial report exists; then the demo runs the full report.)
#include "breathbeat/mechanics.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

void register_demo(CLI::App& app) {
  auto common = std::make_shared<CommonOptions>();
  CLI::App* sub = app.add_subcommand("demo", "Run breathbeat on its built-in invented example");
  add_common_options(sub, *common);
  sub->callback([common] {
    const Thresholds limits = load_thresholds(*common);
    // An invented adult, not a real patient.
    MechanicsInputs in;
    in.sex = Sex::female;
    in.height = cm(165);
    in.mode = VentMode::volume_control;
    in.vt = mL(420);
    in.set_peep = cmH2O(8);
    in.peep_total = cmH2O(9);
    in.pplat = cmH2O(24);
    in.ppeak = cmH2O(31);
    in.rr = per_min(22);
    in.ti = seconds(0.9);
    in.flow = L_per_min(45);
    in.paco2 = mmHg(48);
    validate_mechanics(in, limits);
    Answer a = describe_mechanics(in, analyse_mechanics(in), limits);
    a.command = "demo";
    a.title = "demo: respiratory mechanics of an invented example patient";
    print_answer(a, *common);
  });
}

}  // namespace bb::cli
