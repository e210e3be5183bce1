#include "breathbeat/presets.hpp"

namespace bb::presets {

std::optional<std::string_view> find(std::string_view path) {
  for (const auto& f : embedded_files()) {
    if (f.path == path) return std::string_view(f.text);
  }
  return std::nullopt;
}

}  // namespace bb::presets
