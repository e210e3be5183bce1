// The inferior vena cava in words: the typed results of analyse_ivc as an
// Answer (labels, gates naming the fields they rest on, the reading, notes as
// sentences).
#pragma once

#include <string>

#include "breathbeat/answer.hpp"
#include "breathbeat/ivc.hpp"

namespace bb {

// One note as a sentence.
std::string ivc_note_text(IvcNote note);

// The results as an Answer (command "calc ivc"); a field that a gate, the
// reading or a skipped result needs is named as in `context`.
Answer describe_ivc(const IvcInputs& in, const IvcResults& r, const Thresholds& limits,
                    FieldContext context = FieldContext::command_line);

}  // namespace bb
