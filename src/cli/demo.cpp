// breathbeat demo: the full trial report of the built-in invented scenario
// (presets/demo/trial.toml: not a real patient).
#include <iostream>

#include "breathbeat/present/report.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "cli_common.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {
struct DemoCommand {
  std::string format = "text";
  std::string reference;
  std::string thresholds_file;
};
}  // namespace

void register_demo(CLI::App& app) {
  auto cmd = std::make_shared<DemoCommand>();
  CLI::App* sub = app.add_subcommand(
      "demo",
      "The full report of a built-in, invented PEEP trial (copy presets/demo/trial.toml to start)");
  sub->add_option("--format", cmd->format, "text (default), json or csv");
  sub->add_option("--reference", cmd->reference,
                  "Label of the reference step (default: the first)");
  sub->add_option("--thresholds", cmd->thresholds_file, "Site thresholds file (TOML)");
  sub->callback([cmd] {
    const ReportFormat format = parse_report_format(cmd->format);
    const auto text = presets::find("demo/trial.toml");
    if (!text) throw std::logic_error("the demo trial is not built in");
    TrialReadOptions options;
    options.thresholds_file = cmd->thresholds_file;
    const LoadedTrial loaded = load_trial_text(*text, "presets/demo/trial.toml", options);
    const TrialAnalysis analysis = analyse_with_reference(loaded, cmd->reference);
    std::cout << render_report(analysis, format) << std::flush;
  });
}

}  // namespace bb::cli
