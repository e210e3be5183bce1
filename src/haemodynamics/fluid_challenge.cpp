// The objective and the safety limits of a fluid challenge (Vincent & Weil, Crit Care Med
// 2006;34:1333), judged from the steps before and after it. Presets: [fluid_challenge.*] in
// presets/thresholds/fluid_challenge.toml. The words are made in src/present/.
#include <array>

#include "breathbeat/cutoff.hpp"
#include "breathbeat/haemodynamics.hpp"

namespace bb {

namespace {

constexpr std::array<std::pair<FluidObjective, const char*>, 7> kObjectives{{
    {FluidObjective::co, "co"},
    {FluidObjective::sv, "sv"},
    {FluidObjective::vti, "vti"},
    {FluidObjective::ppv, "ppv"},
    {FluidObjective::map, "map"},
    {FluidObjective::hr, "hr"},
    {FluidObjective::urine_output, "urine_output"},
}};

}  // namespace

const char* to_string(FluidObjective o) {
  for (const auto& [k, w] : kObjectives) {
    if (k == o) return w;
  }
  return "";
}

std::optional<FluidObjective> fluid_objective_from_word(std::string_view word) {
  for (const auto& [k, w] : kObjectives) {
    if (word == w) return k;
  }
  return std::nullopt;
}

bool is_surrogate(FluidObjective o) {
  return o == FluidObjective::map || o == FluidObjective::hr || o == FluidObjective::urine_output;
}

std::optional<PreloadMeasure> objective_measure(FluidObjective o) {
  switch (o) {
    case FluidObjective::co:
      return PreloadMeasure::cardiac_output;
    case FluidObjective::sv:
      return PreloadMeasure::stroke_volume;
    case FluidObjective::vti:
      return PreloadMeasure::vti;
    case FluidObjective::ppv:
      return PreloadMeasure::ppv;
    case FluidObjective::map:
    case FluidObjective::hr:
    case FluidObjective::urine_output:
      break;
  }
  return std::nullopt;
}

const char* to_string(ObjectiveState s) {
  switch (s) {
    case ObjectiveState::met:
      return "met";
    case ObjectiveState::not_met:
      return "not_met";
    case ObjectiveState::between_cut_offs:
      return "between_cut_offs";
    case ObjectiveState::not_readable:
      return "not_readable";
    case ObjectiveState::not_measured:
      return "not_measured";
    case ObjectiveState::not_judged:
      return "not_judged";
  }
  return "";
}

const char* surrogate_cut_off_key(FluidObjective o) {
  if (o == FluidObjective::map) return "fluid_challenge.objective_map_rise";
  if (o == FluidObjective::hr) return "fluid_challenge.objective_hr_fall";
  return nullptr;
}

ObjectiveState surrogate_objective_state(FluidObjective o, Ratio change, const Thresholds& t) {
  const char* key = surrogate_cut_off_key(o);
  if (!key) return ObjectiveState::not_judged;
  const double cut = in_percent(t.get<Ratio>(key));
  const double v = in_percent(change);
  // MAP must rise by the preset; heart rate must fall by it.
  const bool met = o == FluidObjective::map ? cutoff::at_least(v, cut) : cutoff::at_least(-v, cut);
  return met ? ObjectiveState::met : ObjectiveState::not_met;
}

const char* to_string(SafetyLimit l) {
  switch (l) {
    case SafetyLimit::cvp_ceiling:
      return "cvp_ceiling";
    case SafetyLimit::pf_ratio_fall:
      return "pf_ratio_fall";
    case SafetyLimit::spo2_fall:
      return "spo2_fall";
    case SafetyLimit::pulmonary_oedema:
      return "pulmonary_oedema";
  }
  return "";
}

const char* to_string(LimitState s) {
  switch (s) {
    case LimitState::reached:
      return "reached";
    case LimitState::not_reached:
      return "not_reached";
    case LimitState::not_checked:
      return "not_checked";
  }
  return "";
}

std::vector<SafetyCheck> check_fluid_safety(const FluidSafetyInputs& in, const Thresholds& t) {
  std::vector<SafetyCheck> out;
  auto state = [](bool reached) { return reached ? LimitState::reached : LimitState::not_reached; };
  {
    SafetyCheck c{SafetyLimit::cvp_ceiling,
                  LimitState::not_checked,
                  in.cvp_max.has_value(),
                  std::nullopt,
                  std::nullopt,
                  t.source("fluid_challenge.cvp_max")};
    const Pressure max = in.cvp_max.value_or(t.get<Pressure>("fluid_challenge.cvp_max"));
    c.limit_value = max;
    if (in.cvp_after) {
      c.value = *in.cvp_after;
      c.state = state(cutoff::at_least(in_mmHg(*in.cvp_after), in_mmHg(max)));
    }
    out.push_back(c);
  }
  {
    SafetyCheck c{SafetyLimit::pf_ratio_fall,
                  LimitState::not_checked,
                  in.pf_fall_max.has_value(),
                  std::nullopt,
                  std::nullopt,
                  t.source("fluid_challenge.pf_fall_max")};
    const Ratio max = in.pf_fall_max.value_or(t.get<Ratio>("fluid_challenge.pf_fall_max"));
    c.limit_value = max;
    if (in.pf_before && in.pf_after) {
      // Fall = (before - after) / before (common practice, no source).
      const Ratio fall(-relative_change(*in.pf_before, *in.pf_after));
      c.value = fall;
      c.state = state(cutoff::at_least(in_percent(fall), in_percent(max)));
    }
    out.push_back(c);
  }
  {
    SafetyCheck c{SafetyLimit::spo2_fall,
                  LimitState::not_checked,
                  in.spo2_fall_max.has_value(),
                  std::nullopt,
                  std::nullopt,
                  t.source("fluid_challenge.spo2_fall_max")};
    const Ratio max = in.spo2_fall_max.value_or(t.get<Ratio>("fluid_challenge.spo2_fall_max"));
    c.limit_value = max;
    if (in.spo2_before && in.spo2_after) {
      // Fall in percentage points = before - after (common practice, no source).
      const Ratio fall(*in.spo2_before - *in.spo2_after);
      c.value = fall;
      c.state = state(cutoff::at_least(in_percent(fall), in_percent(max)));
    }
    out.push_back(c);
  }
  {
    SafetyCheck c{SafetyLimit::pulmonary_oedema,
                  LimitState::not_checked,
                  false,
                  std::nullopt,
                  std::nullopt,
                  "Vincent & Weil, Crit Care Med 2006;34:1333 (signs of pulmonary oedema)"};
    if (in.oedema_signs) c.state = state(*in.oedema_signs);
    out.push_back(c);
  }
  return out;
}

bool safety_limit_reached(const std::vector<SafetyCheck>& checks) {
  for (const SafetyCheck& c : checks) {
    if (c.state == LimitState::reached) return true;
  }
  return false;
}

}  // namespace bb
