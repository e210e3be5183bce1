// Placeholder: this command is not built yet (see the open issues).
#include "commands.hpp"

namespace bb::cli {

void register_calc_preload_test(CLI::App& /*calc*/) {}

}  // namespace bb::cli
