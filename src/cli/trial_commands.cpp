// Placeholder: this command is not built yet (see the open issues).
#include "commands.hpp"

namespace bb::cli {

void register_trial_commands(CLI::App& /*app*/) {}

}  // namespace bb::cli
