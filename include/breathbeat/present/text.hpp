// Plain-text presenters for a terminal, at most 100 columns.
#pragma once

#include <cstddef>
#include <string>

#include "breathbeat/answer.hpp"
#include "breathbeat/present/display.hpp"

namespace bb {

std::string to_text(const Answer& a);
// With blood gases and haemoglobin (inputs and results) in the site's display units.
std::string to_text(const Answer& a, const DisplayUnits& display);

// Wraps `text` at `width` columns, indenting continuation lines by `indent`.
std::string wrap(const std::string& text, std::size_t width, std::size_t indent);
// Pads to `width` displayed characters (UTF-8 aware); at least one space after.
std::string padded(const std::string& s, std::size_t width);

}  // namespace bb
