// Options that `calc` commands and `trial add-step` share, declared once here so
// that the two cannot drift: an infusion as `calc infusion` takes it, a preload
// test as `calc preload-test` takes it. No physiology here.
#pragma once

#include <optional>
#include <string>
#include <vector>

#include "breathbeat/haemodynamics.hpp"
#include "cli_common.hpp"

namespace bb::cli {

// --drug --rate --concentration --dose (one infusion) and --infusion SPEC (repeatable).
void add_infusion_options(FieldOptions& f);

// One infusion as typed: the drug and its rate, concentration and dose texts,
// and the option that gave it (--drug, or --infusion for a SPEC).
struct InfusionText {
  std::string drug;
  std::optional<std::string> rate, concentration, dose;
  std::string option;
};
// The --drug infusion (if any) first, then each --infusion, split into parts
// (split_infusion_spec). Rate, concentration or dose without --drug is an error.
std::vector<InfusionText> infusion_texts(const FieldOptions& f);

// --kind --measure --before --after --hold --volume --duration --fluid.
struct PreloadOptions {
  CLI::Option* kind = nullptr;
  CLI::Option* before = nullptr;
  CLI::Option* after = nullptr;
};
PreloadOptions add_preload_test_options(FieldOptions& f);

// The test named by --kind (which must have been given).
PreloadTestKind preload_kind(const FieldOptions& f);

// What --before/--after measure: --measure when given (it must agree with a
// unit typed), else the one the units of --before/--after name, else the test's
// only measure. A bare number for a test judged by several measures is refused:
// 16 might be cm of VTI as well as L/min of cardiac output. --before and
// --after must have been given.
PreloadMeasure preload_measure(const FieldOptions& f, PreloadTestKind kind);

}  // namespace bb::cli
