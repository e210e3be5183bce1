// The words of validity gates and readings: the one place that turns the typed
// facts of a Gate (its state, why, values and cut-offs, what the signals showed)
// into its label, detail and failure words, and a Reading into its sentence.
#pragma once

#include <string>

#include "breathbeat/answer.hpp"
#include "breathbeat/validity.hpp"

namespace bb {

// "Tidal volume at least 6.0 mL/kg PBW"
std::string gate_label(const Gate& g);
// "VT 5.0 mL/kg PBW is below 6.0 mL/kg PBW: the tidal swing may be too small ..."
std::string gate_detail(const Gate& g);
// Short words for the failure: "a low tidal volume".
std::string gate_failed_as(const Gate& g);

// The reading as a sentence: the subject, what it finds, the conditions that
// spoil it or make it one-sided, and the open conditions first ("Conditional on ...").
std::string reading_text(const Reading& r);

ShownGate shown_gate(const Gate& g);
std::vector<ShownGate> shown_gates(const std::vector<Gate>& gates);
ShownReading shown_reading(const Reading& r);

}  // namespace bb
