// Placeholder: this command is not built yet (see the open issues).
#include "commands.hpp"

namespace bb::cli {

void register_wave(CLI::App& /*app*/) {}

}  // namespace bb::cli
