// The files under presets/, built into the library so the tool runs from any
// folder. A site changes them at run time with --thresholds FILE.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace bb::presets {

struct EmbeddedFile {
  std::string path;  // relative to presets/, e.g. "thresholds/mechanics.toml"
  std::string text;
};

// Every presets/**/*.toml, sorted by path (generated at build time).
const std::vector<EmbeddedFile>& embedded_files();

// The text of one embedded preset, if present.
std::optional<std::string_view> find(std::string_view path);

}  // namespace bb::presets
