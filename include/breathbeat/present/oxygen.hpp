// Oxygen transport and gas exchange in words: the typed results of
// analyse_oxygen as an Answer (labels, the Berlin gate and reading, notes as
// sentences, flags' messages).
#pragma once

#include <string>
#include <vector>

#include "breathbeat/answer.hpp"
#include "breathbeat/oxygen.hpp"

namespace bb {

// Published limits and usual ranges the results breach (oxygen_breaches), with
// their messages.
std::vector<Flag> oxygen_flags(const OxygenInputs& in, const OxygenResults& r,
                               const Thresholds& limits,
                               FieldContext context = FieldContext::command_line);

// One note as a sentence; a field it names is named as in `context`.
std::string oxygen_note_text(OxygenNote note, const OxygenInputs& in, const OxygenResults& r,
                             const Thresholds& limits,
                             FieldContext context = FieldContext::command_line);

// The results as an Answer: results, Berlin PEEP gate and category as the
// reading, flags, skipped, notes and cautions.
Answer describe_oxygen(const OxygenInputs& in, const OxygenResults& r, const Thresholds& limits,
                       FieldContext context = FieldContext::command_line);

}  // namespace bb
