// Did-you-mean on the command line: the option nearest an unknown one, the
// word nearest a wrong choice, and the unit a bare number refused as
// implausible was most likely meant in. No physiology here.
#pragma once

#include <CLI/CLI.hpp>
#include <string>
#include <vector>

#include "breathbeat/errors.hpp"

namespace bb::cli {

// A CLI11 check accepting one of `words` without regard to case (the value
// becomes the word as listed: "JSON" is json); any other word fails with the
// words and the nearest of them.
CLI::Validator one_of(std::vector<std::string> words);

// The deepest subcommand the command line chose (`app` itself if none).
const CLI::App& chosen_command(const CLI::App& app);

// After CLI11 refused arguments it did not expect (CLI::ExtrasError): an
// InputError naming the first unknown option with the nearest option of the
// chosen subcommand, or, for a stray value, the arguments not expected.
InputError unexpected_arguments(const CLI::App& app);

// An "outside the plausible range" error of a field typed as a bare number on
// the command line, with the units of its dimension in which that number is
// plausible added as a suggestion ("did you mean 9.1kPa?"). Any other error,
// or a number plausible in no other unit, comes back as it was.
InputError with_unit_suggestion(const InputError& e, const CLI::App& app);

// Beside a first "outside the plausible range" error (named by option): every other
// quantity typed for the chosen command that is also outside its plausible range,
// so that one run lists them all. Empty for any other error.
std::vector<InputError> implausible_beside(const InputError& first, const CLI::App& app);

}  // namespace bb::cli
