// Echo stroke volume, cardiac output and index in words: the typed results of
// analyse_echo as an Answer.
#pragma once

#include <string>

#include "breathbeat/answer.hpp"
#include "breathbeat/echo.hpp"

namespace bb {

// One note as a sentence.
std::string echo_note_text(EchoNote note, const EchoResults& r);

// The results as an Answer (command "calc echo"); keys stroke_volume (mL),
// cardiac_output (L/min), cardiac_index (L/min/m2), lvot_area (cm2), bsa (m2).
Answer describe_echo(const EchoInputs& in, const EchoResults& r,
                     FieldContext context = FieldContext::command_line);

}  // namespace bb
