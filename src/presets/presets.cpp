#include "breathbeat/presets.hpp"

#include <toml++/toml.h>
#include <cctype>
#include <stdexcept>

namespace bb::presets {

std::optional<std::string_view> find(std::string_view path) {
  for (const auto& f : embedded_files()) {
    if (f.path == path) return std::string_view(f.text);
  }
  return std::nullopt;
}

std::string label_key(std::string_view label) {
  std::string out;
  for (const char ch : label) {
    const auto c = static_cast<unsigned char>(ch);
    if (c < 128 && std::isalnum(c)) out.push_back(static_cast<char>(std::tolower(c)));
  }
  return out;
}

namespace {

constexpr std::string_view kLabelFile = "channel_labels.toml";

std::vector<std::string> words(const toml::table& t, std::string_view key) {
  std::vector<std::string> out;
  const toml::node* node = t.get(key);
  if (node == nullptr) return out;
  const toml::array* array = node->as_array();
  if (array == nullptr)
    throw std::logic_error("presets/channel_labels.toml: " + std::string(key) + " is not a list");
  for (const auto& w : *array) {
    const auto* s = w.as_string();
    if (s == nullptr || label_key(s->get()).empty())
      throw std::logic_error("presets/channel_labels.toml: a word of " + std::string(key) +
                             " is not a label");
    out.push_back(label_key(s->get()));
  }
  return out;
}

LabelTable read_labels() {
  const auto text = find(kLabelFile);
  if (!text) throw std::logic_error("presets/channel_labels.toml is not embedded");
  toml::table root;
  try {
    root = toml::parse(*text, std::string_view("presets/channel_labels.toml"));
  } catch (const toml::parse_error& e) {
    throw std::logic_error(std::string("presets/channel_labels.toml: ") +
                           std::string(e.description()));
  }
  LabelTable table;
  if (const auto* channels = root["channel"].as_array()) {
    for (const auto& node : *channels) {
      const auto* t = node.as_table();
      const auto* role = t ? t->get_as<std::string>("role") : nullptr;
      if (role == nullptr)
        throw std::logic_error("presets/channel_labels.toml: a [[channel]] without a role");
      table.channels.push_back({role->get(), words(*t, "exact"), words(*t, "prefixes")});
    }
  }
  if (const auto* time = root["time"].as_table()) table.time = words(*time, "exact");
  if (table.channels.empty() || table.time.empty())
    throw std::logic_error("presets/channel_labels.toml: no [[channel]] or [time] labels");
  return table;
}

}  // namespace

const LabelTable& channel_labels() {
  static const LabelTable table = read_labels();
  return table;
}

}  // namespace bb::presets
