// Placeholder: this command is not built yet (see the open issues).
#include "commands.hpp"

namespace bb::cli {

void register_calc_ppv(CLI::App& /*calc*/) {}

}  // namespace bb::cli
