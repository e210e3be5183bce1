// The answers of `calc ppv` and `calc preload-test`, and the words of the
// typed notes and flags of breathbeat/haemodynamics.hpp. A note that names a
// field or a command says it in the reader's context (an option on the command
// line, a file key in a trial report).
#pragma once

#include <string>
#include <vector>

#include "breathbeat/answer.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {

// ---- calc ppv ---------------------------------------------------------------------

// One note of analyse_ppv as a sentence (the SVV note quotes r.svv_reading).
std::string ppv_note_text(const PpvNote& note, const PpvResults& r, const Thresholds& t,
                          FieldContext context);
std::vector<std::string> ppv_note_texts(const PpvResults& r, const Thresholds& t,
                                        FieldContext context);

Answer describe_ppv(const PpvInputs& in, const PpvResults& r, const Thresholds& t,
                    FieldContext context = FieldContext::command_line);

// ---- preload tests ------------------------------------------------------------------

std::string preload_note_text(PreloadNote note);
std::vector<std::string> preload_note_texts(const PreloadTestResult& r);
// The fluid record outside common practice, as flags "fluid_volume" and "fluid_duration".
std::vector<Flag> preload_test_flags(const PreloadTestResult& r);

Answer describe_preload_test(const PreloadTestInputs& in, const PreloadTestResult& r,
                             const Thresholds& t,
                             FieldContext context = FieldContext::command_line);

}  // namespace bb
