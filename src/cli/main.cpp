// breathbeat: a thin command line over the breathbeat library.
// Exit codes: 0 ok, 2 bad usage or bad input (message on stderr, nothing on
// stdout), 1 internal failure.
#include <iostream>

#include "breathbeat/errors.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/version.hpp"
#include "cli_suggest.hpp"
#include "commands.hpp"

namespace {

// Library errors name fields by registry id ("pplat"); on the command line
// they are named by option ("--pplat").
bb::InputError on_command_line(const bb::InputError& e) {
  if (e.where() || !bb::find_field(e.field())) return e;
  return bb::InputError(bb::field_name(e.field(), bb::FieldContext::command_line), e.value(),
                        e.problem(), e.expected());
}

int run(int argc, char** argv) {
  CLI::App app{
      "breathbeat: heart-lung interactions at the bedside of a ventilated, hypotensive patient.\n"
      "Supports and does not replace clinical judgement; local protocols decide.",
      "breathbeat"};
  app.set_version_flag("--version", std::string(bb::kToolName) + " " + bb::kVersion);
  app.require_subcommand(1);
  CLI::App* calc = app.add_subcommand("calc", "Single calculators: mechanics, oxygen, ppv, ...");
  calc->require_subcommand(1);

  bb::cli::register_calc_mechanics(*calc);
  bb::cli::register_calc_oxygen(*calc);
  bb::cli::register_calc_ppv(*calc);
  bb::cli::register_calc_preload_test(*calc);
  bb::cli::register_calc_ivc(*calc);
  bb::cli::register_calc_echo(*calc);
  bb::cli::register_calc_infusion(*calc);
  bb::cli::register_trial_commands(app);
  bb::cli::register_wave(app);
  bb::cli::register_demo(app);

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ExtrasError&) {
    // An unknown option (a typo): named, with the nearest option of the command.
    std::cerr << "breathbeat: error: " << bb::cli::unexpected_arguments(app).what() << "\n";
    return 2;
  } catch (const CLI::ParseError& e) {
    if (!app.remaining(true).empty()) {
      // A missing option or command reported beside an unknown one: the unknown
      // one (a typo) is the likelier cause, with its did-you-mean.
      std::cerr << "breathbeat: error: " << bb::cli::unexpected_arguments(app).what() << "\n";
      return 2;
    }
    std::cerr << "breathbeat: error: " << e.what() << "\n"
              << "Run with --help for the options.\n";
    return 2;
  } catch (const bb::InputErrors& e) {
    std::vector<bb::InputError> errors;
    for (const bb::InputError& one : e.errors())
      errors.push_back(bb::cli::with_unit_suggestion(one, app));
    const std::size_t count = errors.size();
    std::cerr << "breathbeat: " << count << " problem(s):\n"
              << bb::InputErrors(std::move(errors)).what() << "\n";
    return 2;
  } catch (const bb::InputError& e) {
    // A bare number implausible in its default unit: the unit it may have meant;
    // and every other implausible value typed, so that one run lists them all.
    const bb::InputError first = on_command_line(e);
    std::vector<bb::InputError> errors{bb::cli::with_unit_suggestion(first, app)};
    for (const bb::InputError& other : bb::cli::implausible_beside(first, app))
      errors.push_back(bb::cli::with_unit_suggestion(other, app));
    if (errors.size() == 1) {
      std::cerr << "breathbeat: error: " << errors.front().what() << "\n";
    } else {
      const std::size_t count = errors.size();
      std::cerr << "breathbeat: " << count << " problem(s):\n"
                << bb::InputErrors(std::move(errors)).what() << "\n";
    }
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "breathbeat: internal failure: " << e.what() << "\n";
    return 1;
  }
  return 0;
}

}  // namespace

// Whatever escapes run() (setting up the commands, or a failure while reporting an error) is an
// internal failure, exit 1, not a crash.
int main(int argc, char** argv) {
  try {
    return run(argc, argv);
  } catch (const std::exception& e) {
    std::cerr << "breathbeat: internal failure: " << e.what() << "\n";
  } catch (...) {
    std::cerr << "breathbeat: internal failure\n";
  }
  return 1;
}
