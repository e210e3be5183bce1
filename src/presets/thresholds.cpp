#include "breathbeat/thresholds.hpp"

#include <toml++/toml.h>
#include <algorithm>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include "breathbeat/presets.hpp"

namespace bb {

namespace {

SourcePlace place_of(const toml::node& node, const std::string& file) {
  const auto& src = node.source();
  return SourcePlace{file, static_cast<int>(src.begin.line), static_cast<int>(src.begin.column)};
}

std::string shown_number(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

// Which dimension a written unit belongs to (the first that knows the spelling).
std::optional<Dimension> dimension_of_unit(const std::string& unit) {
  static constexpr Dimension kAll[] = {
      Dimension::pressure, Dimension::volume, Dimension::flow, Dimension::time, Dimension::length,
      Dimension::area, Dimension::mass, Dimension::haemoglobin, Dimension::lactate,
      Dimension::fraction, Dimension::frequency, Dimension::power, Dimension::compliance,
      Dimension::elastance, Dimension::resistance, Dimension::volume_per_mass,
      Dimension::flow_per_area,
      // infusions (usual dose ranges)
      Dimension::infusion_rate, Dimension::drug_mass_concentration,
      Dimension::drug_unit_concentration, Dimension::dose_per_kg, Dimension::mass_dose,
      Dimension::unit_dose};
  if (unit.empty()) return Dimension::number;
  for (Dimension d : kAll) {
    try {
      unit_factor(unit, d, Field{"unit", ""});
      return d;
    } catch (const InputError&) {
    }
  }
  return std::nullopt;
}

template <typename Value>
std::vector<std::string> keys_of(const std::map<std::string, Value, std::less<>>& m) {
  std::vector<std::string> out;
  out.reserve(m.size());
  for (const auto& [k, v] : m) out.push_back(k);
  return out;
}

}  // namespace

Thresholds Thresholds::built_in() {
  Thresholds t;
  for (const auto& file : presets::embedded_files()) {
    const bool is_threshold = file.path.rfind("thresholds/", 0) == 0;
    if (is_threshold || file.path == "plausibility.toml") {
      t.load_text(file.text, "built-in presets/" + file.path, false);
    }
  }
  return t;
}

void Thresholds::load_overrides(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  if (!in) {
    throw InputError("thresholds", file.string(), "cannot open the site thresholds file",
                     "a readable TOML file");
  }
  std::stringstream ss;
  ss << in.rdbuf();
  load_overrides_text(ss.str(), file.string());
}

void Thresholds::load_overrides_text(std::string_view text, const std::string& name) {
  load_text(text, name, true);
}

void Thresholds::load_text(std::string_view text, const std::string& name, bool overriding) {
  toml::table root;
  try {
    root = toml::parse(text, name);
  } catch (const toml::parse_error& e) {
    const auto& b = e.source().begin;
    throw InputError("", "", std::string(e.description()), "valid TOML",
                     SourcePlace{name, static_cast<int>(b.line), static_cast<int>(b.column)});
  }

  auto walk = [&](auto&& self, const toml::table& table, const std::string& prefix) -> void {
    for (const auto& [k, bound_node] : table) {
      // A lambda below uses it; clang 14 cannot capture a structured binding.
      const toml::node& node = bound_node;
      const std::string key =
          prefix.empty() ? std::string(k.str()) : prefix + "." + std::string(k.str());
      const toml::table* sub = node.as_table();
      if (!sub) {
        throw InputError(key, "", "is not a threshold table", "a table with value, unit and source",
                         place_of(node, name));
      }
      if (sub->contains("bias")) {
        load_bias(key, (*sub)["bias"].value_or(std::string()),
                  (*sub)["source"].value_or(std::string()), place_of(node, name), name, overriding);
        continue;
      }
      const bool is_range = key.rfind("plausibility.", 0) == 0 && sub->contains("min");
      const bool is_entry = sub->contains("value");
      if (!is_range && !is_entry) {
        self(self, *sub, key);
        continue;
      }
      auto num = [&](std::string_view field) -> double {
        const toml::node* n = sub->get(field);
        if (!n || !(n->is_integer() || n->is_floating_point())) {
          throw InputError(key + "." + std::string(field), "", "is missing or not a number",
                           "a number", place_of(n ? *n : node, name));
        }
        return n->value<double>().value_or(0.0);
      };
      const std::string unit = (*sub)["unit"].value_or(std::string());
      const std::string source = (*sub)["source"].value_or(std::string());
      if (!overriding && source.empty()) {
        throw std::logic_error(name + ": " + key + " has no source");
      }
      if (is_range) {
        const std::string field = key.substr(std::string("plausibility.").size());
        PlausibleRange r{num("min"), num("max"), unit, source};
        if (overriding) {
          auto it = ranges_.find(field);
          if (it == ranges_.end()) {
            std::string expected = "an existing field";
            if (auto near = closest_match(field, keys_of(ranges_)))
              expected += " (did you mean 'plausibility." + *near + "'?)";
            throw InputError(key, "", "is not a plausibility range breathbeat knows", expected,
                             place_of(node, name));
          }
          if (dimension_of_unit(unit) != dimension_of_unit(it->second.unit)) {
            throw InputError(key + ".unit", unit, "has the wrong dimension",
                             "a unit like '" + it->second.unit + "'", place_of(node, name));
          }
          if (r.source.empty()) r.source = "site file " + name;
        }
        ranges_[field] = r;
        continue;
      }
      ThresholdEntry e{num("value"), unit, source, name};
      if (overriding) {
        auto it = entries_.find(key);
        if (it == entries_.end()) {
          std::string expected = "a threshold breathbeat knows";
          if (auto near = closest_match(key, keys_of(entries_)))
            expected += " (did you mean '" + *near + "'?)";
          throw InputError(key, "", "is not a known threshold", expected, place_of(node, name));
        }
        if (dimension_of_unit(unit) != dimension_of_unit(it->second.unit)) {
          throw InputError(key + ".unit", unit, "has the wrong dimension",
                           "a unit like '" + it->second.unit + "'", place_of(node, name));
        }
        if (e.source.empty()) e.source = "site file " + name;
      } else if (!dimension_of_unit(unit)) {
        throw std::logic_error(name + ": " + key + " has an unknown unit '" + unit + "'");
      }
      entries_[key] = e;
    }
  };
  walk(walk, root, "");
}

void Thresholds::load_bias(const std::string& key, const std::string& word, std::string source,
                           const SourcePlace& place, const std::string& name, bool overriding) {
  if (word != "falsely_low" && word != "falsely_high" && word != "either") {
    throw InputError(key + ".bias", word, "is not a direction a condition can bias an index",
                     "\"falsely_low\", \"falsely_high\" or \"either\"", place);
  }
  if (!overriding && source.empty()) throw std::logic_error(name + ": " + key + " has no source");
  if (overriding) {
    if (biases_.find(key) == biases_.end()) {
      std::vector<std::string> known;
      for (const auto& [k, v] : biases_) known.push_back(k);
      std::string expected = "a condition breathbeat knows";
      if (auto near = closest_match(key, known)) expected += " (did you mean '" + *near + "'?)";
      throw InputError(key, "", "is not a known condition", expected, place);
    }
    if (source.empty()) source = "site file " + name;
  }
  biases_[key] = BiasEntry{word, source, name};
}

const BiasEntry* Thresholds::bias(std::string_view key) const {
  auto it = biases_.find(key);
  return it == biases_.end() ? nullptr : &it->second;
}

double Thresholds::to_si(const ThresholdEntry& e, Dimension dimension, std::string_view key) {
  if (dimension == Dimension::number) return e.value;
  if (dimension == Dimension::fraction) {
    if (e.unit == "%") return e.value / 100.0;
    if (e.unit.empty()) return e.value;
  }
  try {
    return e.value * unit_factor(e.unit, dimension, Field{key, ""});
  } catch (const InputError&) {
    throw std::logic_error("threshold " + std::string(key) + " has unit '" + e.unit +
                           "', not of the dimension asked for");
  }
}

double Thresholds::number(std::string_view key) const {
  return to_si(entry(key), Dimension::number, key);
}

const ThresholdEntry& Thresholds::entry(std::string_view key) const {
  auto it = entries_.find(key);
  if (it == entries_.end()) throw std::logic_error("no threshold named " + std::string(key));
  return it->second;
}

bool Thresholds::has(std::string_view key) const {
  return entries_.find(key) != entries_.end();
}

std::optional<PlausibleRange> Thresholds::plausible_range(std::string_view field) const {
  auto it = ranges_.find(field);
  if (it == ranges_.end()) return std::nullopt;
  return it->second;
}

void Thresholds::check_plausible_si(std::string_view field, double value_in_si,
                                    Dimension dimension) const {
  if (allow_implausible_) return;
  auto range = plausible_range(field);
  if (!range) return;
  double factor = 1.0;
  if (dimension == Dimension::fraction) {
    factor = range->unit == "%" ? 0.01 : 1.0;
  } else if (dimension != Dimension::number) {
    factor = unit_factor(range->unit, dimension, Field{field, ""});
  }
  const double v = value_in_si / factor;
  const double eps = 1e-9 * std::max(1.0, std::abs(range->max));
  if (v >= range->min - eps && v <= range->max + eps) return;
  throw InputError(
      std::string(field), shown_number(v) + " " + range->unit, "is outside the plausible range",
      shown_number(range->min) + " to " + shown_number(range->max) + " " + range->unit + " (" +
          range->source + "); if the value is real, pass --allow-implausible");
}

std::vector<std::string> Thresholds::units_meant(std::string_view field, std::string_view text,
                                                 Dimension dimension,
                                                 std::string_view default_unit) const {
  const NumberAndUnit nu = split_number_and_unit(text, Field{field, ""}, "");
  if (!nu.unit.empty()) return {};  // a unit was typed: it was meant
  const std::optional<PlausibleRange> range = plausible_range(field);
  if (!range) return {};
  const double factor = unit_factor(range->unit, dimension, Field{field, default_unit});
  std::vector<std::string> meant;
  for (const UnitSpelling* u : units_placing_in_range(nu.number, dimension, range->min * factor,
                                                      range->max * factor, default_unit)) {
    meant.emplace_back(u->shown);
  }
  return meant;
}

}  // namespace bb
