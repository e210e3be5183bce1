#include "breathbeat/cautions.hpp"

namespace bb {

std::vector<std::string> standard_cautions() {
  return {
      "breathbeat is an aid to clinical judgement and never a substitute for it.",
      "Every index is valid only under the conditions shown beside it; a reading whose "
      "conditions are unmet or unknown is marked so and must not be relied on.",
      "Check each number against the patient, the ventilator and the monitors before acting.",
      "Treatment is decided by local protocols and by clinicians licensed to practise, "
      "not by this tool.",
  };
}

}  // namespace bb
