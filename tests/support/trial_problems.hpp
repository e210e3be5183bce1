// The problems a trial file's reader reports, for tests of its refusals.
#pragma once

#include <string>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/trial/trial_file.hpp"

namespace bb::test {

// The problems of one file read, each as "field: problem; expected".
inline std::vector<std::string> trial_problems(const std::string& text) {
  std::vector<std::string> out;
  try {
    load_trial_text(text, "t.toml", {});
  } catch (const InputErrors& es) {
    for (const InputError& e : es.errors())
      out.push_back(e.field() + ": " + e.problem() + "; " + e.expected());
  } catch (const InputError& e) {
    out.push_back(e.field() + ": " + e.problem() + "; " + e.expected());
  }
  return out;
}

}  // namespace bb::test
