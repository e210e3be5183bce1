// Validity conditions of an index and what an index reads as: the domain
// vocabulary every calculator and the waveform engine share. No JSON, no
// command line: presenters (breathbeat/present/) turn these into words.
#pragma once

#include <string>
#include <vector>

namespace bb {

// A validity condition of an index: met, failed, or unknown from what was given.
enum class GateState { met, failed, unknown };
inline const char* to_string(GateState s) {
  switch (s) {
    case GateState::met: return "met";
    case GateState::failed: return "failed";
    case GateState::unknown: return "unknown";
  }
  return "unknown";
}

struct Gate {
  std::string key;  // condition id, e.g. "vt_per_kg_pbw"
  std::string label;
  GateState state = GateState::unknown;
  std::string detail;
  std::string source;
};

// The interpretation of an index or of a set of indices.
struct Reading {
  std::string key;       // which index, e.g. "ppv"
  std::string category;  // machine word, e.g. "grey_zone", "not_interpretable"
  std::string text;      // sentence for people
  std::vector<std::string> basis;  // indices or gates it rests on
};

// What a result that could not be computed needs: a field of the registry
// (breathbeat/fields/registry.hpp) by id, optionally with the value it must
// have ("mode" = "vc"), or another set of fields that would do instead.
struct Need {
  std::string field;
  std::string value = {};
  std::vector<std::string> or_fields = {};  // "ve, or vt and rr"
};

// A result the inputs did not allow, and what it needs.
struct Skipped {
  std::string key;    // result key, e.g. "driving_pressure"
  std::string label;  // people's name of the result
  std::vector<Need> needs;
};

}  // namespace bb
