// Respiratory mechanics in words: the typed results of analyse_mechanics as an
// Answer (labels, notes as sentences, flags' messages).
#pragma once

#include <string>
#include <vector>

#include "breathbeat/answer.hpp"
#include "breathbeat/mechanics.hpp"

namespace bb {

// Published limits the results breach (mechanics_breaches), with their messages.
std::vector<Flag> mechanics_flags(const MechanicsInputs& in, const MechanicsResults& r,
                                  const Thresholds& limits,
                                  FieldContext context = FieldContext::command_line);

// One note as a sentence; a field it names is named as in `context`.
std::string mechanics_note_text(MechanicsNote note, const MechanicsResults& r,
                                FieldContext context = FieldContext::command_line);

// The results as an Answer (inputs, results, skipped, flags, notes, cautions).
Answer describe_mechanics(const MechanicsInputs& in, const MechanicsResults& r,
                          const Thresholds& limits,
                          FieldContext context = FieldContext::command_line);

}  // namespace bb
