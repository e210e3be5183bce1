// breathbeat demo: the full trial report of the built-in invented scenario
// (presets/demo/trial.toml: not a real patient).
#include <iostream>

#include "breathbeat/io/atomic_file.hpp"
#include "breathbeat/present/report.hpp"
#include "breathbeat/presets.hpp"
#include "breathbeat/trial/analysis.hpp"
#include "breathbeat/trial/trial_file.hpp"
#include "cli_common.hpp"
#include "command_files.hpp"
#include "commands.hpp"

namespace bb::cli {

namespace {
struct DemoCommand {
  std::string format = "text";
  std::string out;
  std::string reference;
  std::string thresholds_file;
  bool force = false;
};
}  // namespace

void register_demo(CLI::App& app) {
  auto cmd = std::make_shared<DemoCommand>();
  CLI::App* sub = app.add_subcommand(
      "demo",
      "The full report of a built-in, invented PEEP trial (copy presets/demo/trial.toml to start)");
  sub->add_option("--format", cmd->format, "text (default), json, csv or html");
  sub->add_option("-o,--output", cmd->out,
                  "Write the report to this file (atomically) instead of stdout");
  add_force_flag(sub, cmd->force, "Replace an existing --output file (never a trial file)");
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
    const std::string report = render_report(analysis, format);
    if (cmd->out.empty()) {
      std::cout << report << std::flush;
      return;
    }
    // The output is never the thresholds file, and never replaces a trial file.
    CommandFiles files;
    if (!cmd->thresholds_file.empty()) files.add_input("--thresholds", cmd->thresholds_file);
    files.add_output(
        "--output", cmd->out,
        looks_like_trial_file(cmd->out) ? ExistingOutput::never : existing_output(cmd->force));
    write_file_atomically(cmd->out, report);
    std::cout << "Report written to " << cmd->out << "\n";
  });
}

}  // namespace bb::cli
