// Each command lives in its own file and registers itself on the parent app.
#pragma once

#include <CLI/CLI.hpp>

namespace bb::cli {

void register_calc_mechanics(CLI::App& calc);
void register_calc_oxygen(CLI::App& calc);
void register_calc_ppv(CLI::App& calc);
void register_calc_preload_test(CLI::App& calc);
void register_calc_ivc(CLI::App& calc);
void register_calc_echo(CLI::App& calc);
void register_calc_infusion(CLI::App& calc);
void register_demo(CLI::App& app);
void register_trial_commands(CLI::App& app);  // report, check, trial new/add-step
void register_wave(CLI::App& app);

}  // namespace bb::cli
