// JSON presenters: the only place (with the other presenters) that includes
// the JSON library. Numbers are rounded to two more decimals than the text shows.
#pragma once

#include <nlohmann/json.hpp>

#include "breathbeat/answer.hpp"

namespace bb {

nlohmann::ordered_json to_json(const Shown& s);
nlohmann::ordered_json to_json(const Gate& g);  // in words (present/gate_words.hpp)
nlohmann::ordered_json to_json(const ShownGate& g);
nlohmann::ordered_json to_json(const Reading& r);
nlohmann::ordered_json to_json(const ShownReading& r);
// {"tool", "version", "command", "inputs", "results", "skipped", "flags",
//  "gates", "reading", "notes", "cautions"}
nlohmann::ordered_json to_json(const Answer& a);

}  // namespace bb
