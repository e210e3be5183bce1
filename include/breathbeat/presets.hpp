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

// One role of the channel label table (presets/channel_labels.toml): the
// labels, reduced to lower-case letters and digits, that name it.
struct ChannelLabels {
  std::string role;  // "arterial_pressure", "airway_pressure", "flow", ...
  std::vector<std::string> exact;
  std::vector<std::string> prefixes;
};
struct LabelTable {
  std::vector<ChannelLabels> channels;
  std::vector<std::string> time;  // labels of a CSV record's time column
};

// The built-in channel label table, read once; a malformed built-in table is a
// programming error (std::logic_error).
const LabelTable& channel_labels();

// A label reduced as the table compares it: its letters and digits, lower case
// ("ART 1" -> "art1").
std::string label_key(std::string_view label);

}  // namespace bb::presets
