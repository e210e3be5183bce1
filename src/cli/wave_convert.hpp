// breathbeat wave convert: registered on the `wave` subcommand by src/cli/wave.cpp.
#pragma once

#include <CLI/CLI.hpp>

namespace bb::cli {

void register_wave_convert(CLI::App& wave);

}  // namespace bb::cli
