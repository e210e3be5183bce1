// Paired before/after preload tests: tidal-volume challenge, end-expiratory
// occlusion, passive leg raising, fluid challenge and mini fluid challenge.
// The answer people read is made in src/present/haemodynamics_answer.cpp.
#include <algorithm>
#include <cmath>
#include <type_traits>

#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

using cutoff::at_least;

// A plausibility check whose error names the field by id (the range may be
// named differently: "fluid_volume" for the field volume).
template <class Q>
void plausible_as(const Thresholds& t, std::string_view range, Q value, const char* field) {
  try {
    t.check_plausible(range, value);
  } catch (const InputError& e) {
    throw InputError(field, e.value(), e.problem(), e.expected());
  }
}

// How each test is read: its cut-off key(s), the name people read, its source.
struct TestSpec {
  const char* key;
  const char* name;
  const char* cut_off;       // preload_tests.* key (the lower one for fluid)
  const char* cut_off_high;  // fluid only
};

TestSpec spec_of(PreloadTestKind kind) {
  switch (kind) {
    case PreloadTestKind::vt_challenge:
      return {"vt_challenge", "tidal-volume challenge", "preload_tests.vt_challenge_ppv_rise",
              nullptr};
    case PreloadTestKind::end_expiratory_occlusion:
      return {"end_expiratory_occlusion", "end-expiratory occlusion", "preload_tests.eeo_co_rise",
              nullptr};
    case PreloadTestKind::passive_leg_raising:
      return {"passive_leg_raising", "passive leg raising", "preload_tests.plr_co_rise", nullptr};
    case PreloadTestKind::fluid_challenge:
      return {"fluid_challenge", "fluid challenge", "preload_tests.fluid_rise_low",
              "preload_tests.fluid_rise_high"};
    case PreloadTestKind::mini_fluid_challenge:
      return {"mini_fluid_challenge", "mini fluid challenge", "preload_tests.mini_fluid_vti_rise",
              nullptr};
  }
  return {"", "", "", nullptr};
}

// The PreloadValue alternative each measure uses.
std::size_t variant_index(PreloadMeasure m) {
  switch (m) {
    case PreloadMeasure::ppv:
      return 0;
    case PreloadMeasure::cardiac_output:
      return 1;
    case PreloadMeasure::stroke_volume:
      return 2;
    case PreloadMeasure::vti:
      return 3;
  }
  return 0;
}

std::string shown_value(const PreloadValue& v) {
  return std::visit(
      [](const auto& q) -> std::string {
        using Q = std::decay_t<decltype(q)>;
        if constexpr (std::is_same_v<Q, Ratio>) return format_number(in_percent(q), 1) + " %";
        if constexpr (std::is_same_v<Q, Flow>) return format_number(in_L_per_min(q), 2) + " L/min";
        if constexpr (std::is_same_v<Q, Volume>) return format_number(in_mL(q), 0) + " mL";
        if constexpr (std::is_same_v<Q, Length>) return format_number(in_cm(q), 1) + " cm";
      },
      v);
}

void validate_value(const PreloadValue& v, const char* field, const Thresholds& t) {
  const bool positive = std::visit([](const auto& q) { return q.value() > 0.0; }, v);
  const bool is_ppv = v.index() == 0;
  if (!positive && !(is_ppv && std::get<Ratio>(v).value() == 0.0)) {
    throw InputError(field, shown_value(v), "must be positive",
                     is_ppv ? "a PPV of 0 % or more" : "a value above 0");
  }
  static constexpr const char* kRange[] = {"ppv", "co", "stroke_volume", "vti"};
  std::visit([&](const auto& q) { plausible_as(t, kRange[v.index()], q, field); }, v);
}

Gate preload_gate(const char* key, std::string source) {
  Gate g{key, GateState::unknown, std::move(source)};
  g.of = GateOf::preload_test;
  g.condition = key;
  return g;
}

Gate vt_step_gate(const PreloadTestInputs& in, const Thresholds& t) {
  Gate g = preload_gate("vt_step", t.source("preload_tests.vt_challenge_vt_high"));
  const double low = in_mL_per_kg(t.get<VolumePerMass>("preload_tests.vt_challenge_vt_low"));
  const double high = in_mL_per_kg(t.get<VolumePerMass>("preload_tests.vt_challenge_vt_high"));
  g.cut_off = low;
  g.cut_off_to = high;
  g.unit = "mL/kg";
  if (!in.vt_before_per_kg || !in.vt_after_per_kg) return g;
  const double before = in_mL_per_kg(*in.vt_before_per_kg);
  const double after = in_mL_per_kg(*in.vt_after_per_kg);
  g.basis = GateBasis::measured;
  g.value = before;
  g.value_to = after;
  // The cut-off holds for that step only: each end within the tolerance of 6 and 8 mL/kg PBW
  // (a larger step gives a larger PPV rise).
  const double tol = in_mL_per_kg(t.get<VolumePerMass>("trial.vt_challenge_tolerance"));
  const bool ok = at_least(tol, std::abs(before - low)) && at_least(tol, std::abs(after - high));
  g.state = ok ? GateState::met : GateState::failed;
  return g;
}

Gate passive_gate(const PreloadTestInputs& in, const char* source) {
  Gate g = preload_gate("passive_ventilation", source);
  if (!in.passive) return g;
  g.basis = in.passive_from_signals ? GateBasis::seen_in_signals : GateBasis::stated;
  g.state = *in.passive ? (in.passive_from_signals ? GateState::not_contradicted : GateState::met)
                        : GateState::failed;
  return g;
}

Gate hold_gate(const PreloadTestInputs& in, const Thresholds& t) {
  Gate g = preload_gate("hold_duration", t.source("preload_tests.eeo_hold_min"));
  g.cut_off = in_seconds(t.get<Time>("preload_tests.eeo_hold_min"));
  g.unit = "s";
  if (!in.hold) return g;
  g.basis = GateBasis::measured;
  g.value = in_seconds(*in.hold);
  g.state = at_least(*g.value, g.cut_off) ? GateState::met : GateState::failed;
  return g;
}

Gate iah_gate(const PreloadTestInputs& in) {
  Gate g = preload_gate("no_intra_abdominal_hypertension",
                        "Mahjoub et al., Crit Care Med 2010 (from memory)");
  if (!in.intra_abdominal_hypertension) return g;
  g.basis = GateBasis::stated;
  g.state = *in.intra_abdominal_hypertension ? GateState::failed : GateState::met;
  return g;
}

// The record when it lies outside low..high (compared in the unit people use,
// mL or min, as the cut-offs are written).
template <class Q>
std::optional<OutsideUsual<Q>> outside(Q value, Q low, Q high, double (*in_unit)(Q),
                                       const std::string& source) {
  if (at_least(in_unit(value), in_unit(low)) && at_least(in_unit(high), in_unit(value)))
    return std::nullopt;
  return OutsideUsual<Q>{value, low, high, source};
}

void check_fluid_record(const PreloadTestInputs& in, const Thresholds& t, PreloadTestResult& r) {
  const bool mini = in.kind == PreloadTestKind::mini_fluid_challenge;
  const char* vmin = mini ? "preload_tests.mini_fluid_volume" : "preload_tests.fluid_volume_min";
  const char* vmax = mini ? "preload_tests.mini_fluid_volume" : "preload_tests.fluid_volume_max";
  const char* dmin =
      mini ? "preload_tests.mini_fluid_duration" : "preload_tests.fluid_duration_min";
  const char* dmax =
      mini ? "preload_tests.mini_fluid_duration" : "preload_tests.fluid_duration_max";
  const FluidRecord& f = in.fluid;
  if (f.volume) {
    r.volume_outside_usual =
        outside(*f.volume, t.get<Volume>(vmin), t.get<Volume>(vmax), &in_mL, t.source(vmin));
  } else {
    r.notes.push_back(PreloadNote::fluid_volume_not_recorded);
  }
  if (f.duration) {
    r.duration_outside_usual =
        outside(*f.duration, t.get<Time>(dmin), t.get<Time>(dmax), &in_minutes, t.source(dmin));
  } else {
    r.notes.push_back(PreloadNote::fluid_duration_not_recorded);
  }
  if (f.volume && f.duration) r.fluid_rate = Flow(*f.volume / *f.duration);
  if (!f.fluid) r.notes.push_back(PreloadNote::fluid_type_not_recorded);
}

Ratio change_of(const PreloadTestInputs& in) {
  if (in.kind == PreloadTestKind::vt_challenge) {
    return ppv_absolute_change(std::get<Ratio>(in.before), std::get<Ratio>(in.after));
  }
  return std::visit(
      [&](const auto& before) {
        using Q = std::decay_t<decltype(before)>;
        return relative_change(before, std::get<Q>(in.after));
      },
      in.before);
}

}  // namespace

const char* to_string(PreloadTestKind kind) {
  switch (kind) {
    case PreloadTestKind::vt_challenge:
      return "vt-challenge";
    case PreloadTestKind::end_expiratory_occlusion:
      return "eeo";
    case PreloadTestKind::passive_leg_raising:
      return "plr";
    case PreloadTestKind::fluid_challenge:
      return "fluid";
    case PreloadTestKind::mini_fluid_challenge:
      return "mini-fluid";
  }
  return "";
}

const char* to_string(PreloadMeasure measure) {
  switch (measure) {
    case PreloadMeasure::ppv:
      return "ppv";
    case PreloadMeasure::cardiac_output:
      return "co";
    case PreloadMeasure::stroke_volume:
      return "sv";
    case PreloadMeasure::vti:
      return "vti";
  }
  return "";
}

const char* id_of(PreloadTestKind kind) {
  switch (kind) {
    case PreloadTestKind::vt_challenge:
      return "vt_challenge";
    case PreloadTestKind::end_expiratory_occlusion:
      return "eeo";
    case PreloadTestKind::passive_leg_raising:
      return "plr";
    case PreloadTestKind::fluid_challenge:
      return "fluid_challenge";
    case PreloadTestKind::mini_fluid_challenge:
      return "mini_fluid";
  }
  return "";
}

std::optional<PreloadTestKind> preload_test_kind_from_id(std::string_view id) {
  for (PreloadTestKind k :
       {PreloadTestKind::vt_challenge, PreloadTestKind::end_expiratory_occlusion,
        PreloadTestKind::passive_leg_raising, PreloadTestKind::fluid_challenge,
        PreloadTestKind::mini_fluid_challenge}) {
    if (id == id_of(k)) return k;
  }
  return std::nullopt;
}

std::optional<PreloadMeasure> preload_measure_from_word(std::string_view word) {
  for (PreloadMeasure m : {PreloadMeasure::ppv, PreloadMeasure::cardiac_output,
                           PreloadMeasure::stroke_volume, PreloadMeasure::vti}) {
    if (word == to_string(m)) return m;
  }
  return std::nullopt;
}

const char* display_name(PreloadTestKind kind) {
  return spec_of(kind).name;
}

const char* display_name(PreloadMeasure measure) {
  switch (measure) {
    case PreloadMeasure::ppv:
      return "PPV";
    case PreloadMeasure::cardiac_output:
      return "cardiac output";
    case PreloadMeasure::stroke_volume:
      return "stroke volume";
    case PreloadMeasure::vti:
      return "LVOT VTI";
  }
  return "";
}

const char* cut_off_key(PreloadTestKind kind) {
  return spec_of(kind).cut_off;
}

const char* cut_off_high_key(PreloadTestKind kind) {
  return spec_of(kind).cut_off_high;
}

PreloadMeasure default_measure(PreloadTestKind kind) {
  return accepted_measures(kind).front();
}

std::vector<PreloadMeasure> accepted_measures(PreloadTestKind kind) {
  using M = PreloadMeasure;
  switch (kind) {
    case PreloadTestKind::vt_challenge:
      return {M::ppv};
    case PreloadTestKind::end_expiratory_occlusion:
      return {M::cardiac_output, M::stroke_volume};
    case PreloadTestKind::passive_leg_raising:
    case PreloadTestKind::fluid_challenge:
      // VTI: SV = VTI x LVOT area with the LVOT unchanged (Quinones et al., JASE 2002;15:167).
      return {M::cardiac_output, M::stroke_volume, M::vti};
    case PreloadTestKind::mini_fluid_challenge:
      return {M::vti};
  }
  return {};
}

std::vector<Gate> preload_test_conditions(const PreloadTestInputs& in, const Thresholds& t) {
  std::vector<Gate> gates;
  switch (in.kind) {
    case PreloadTestKind::vt_challenge: {
      gates = {vt_step_gate(in, t),
               passive_gate(in, "Myatra et al., Crit Care Med 2017;45:415 (passive patients)")};
      // Rhythm, HR/RR and a closed chest, as for PPV; each fails the manoeuvre either way.
      for (Gate g : ppv_gates(in.challenge_conditions, t)) {
        if (g.key != "regular_rhythm" && g.key != "hr_rr_ratio" && g.key != "closed_chest")
          continue;
        g.bias = Bias::either;
        g.bias_source.clear();
        gates.push_back(std::move(g));
      }
      break;
    }
    case PreloadTestKind::end_expiratory_occlusion:
      // No breath may be triggered during the hold (Monnet et al. 2009).
      gates = {hold_gate(in, t),
               passive_gate(in,
                            "Monnet et al., Crit Care Med 2009;37:951 (no triggering "
                            "during the hold)")};
      break;
    case PreloadTestKind::passive_leg_raising:
      gates = {iah_gate(in)};
      break;
    case PreloadTestKind::fluid_challenge:
    case PreloadTestKind::mini_fluid_challenge:
      break;
  }
  apply_bias(gates, id_of(in.kind), t);
  return gates;
}

Reading read_preload_change(PreloadTestKind kind, Ratio change, const std::vector<Gate>& conditions,
                            const Thresholds& t) {
  const TestSpec s = spec_of(kind);
  Reading r;
  r.key = s.key;
  r.basis.push_back("change");
  for (const Gate& g : conditions) r.basis.push_back(g.key);
  const double v = in_percent(change);
  const double cut = in_percent(t.get<Ratio>(s.cut_off));
  if (s.cut_off_high) {
    const double high = in_percent(t.get<Ratio>(s.cut_off_high));
    r.values = {ReadValue{v, {cut, high}, cutoff::above(v, high)}};
    if (at_least(v, high)) {
      r.category = "responsive";
      return weighed_reading(std::move(r), Pointing::responsive, conditions);
    }
    if (at_least(v, cut)) {
      r.category = "between_cut_offs";
      return weighed_reading(std::move(r), Pointing::neither, conditions);
    }
    r.category = "not_responsive";
    return weighed_reading(std::move(r), Pointing::unresponsive, conditions);
  }
  r.values = {ReadValue{v, {cut}, cutoff::above(v, cut)}};
  if (at_least(v, cut)) {
    r.category = "responsive";
    return weighed_reading(std::move(r), Pointing::responsive, conditions);
  }
  r.category = "not_responsive";
  return weighed_reading(std::move(r), Pointing::unresponsive, conditions);
}

const char* reading_key(PreloadTestKind kind) {
  return spec_of(kind).key;
}

void validate_preload_test(const PreloadTestInputs& in, const Thresholds& t) {
  const auto accepted = accepted_measures(in.kind);
  if (std::find(accepted.begin(), accepted.end(), in.measure) == accepted.end()) {
    std::string list;
    for (PreloadMeasure m : accepted)
      list += (list.empty() ? "" : ", ") + std::string(to_string(m));
    throw InputError("measure", to_string(in.measure),
                     std::string("is not used to judge the ") + spec_of(in.kind).name,
                     "one of: " + list);
  }
  if (in.before.index() != variant_index(in.measure)) {
    throw InputError("before", shown_value(in.before),
                     std::string("is not a ") + display_name(in.measure),
                     std::string("a ") + display_name(in.measure));
  }
  if (in.after.index() != in.before.index()) {
    throw InputError("after", shown_value(in.after),
                     "is not the same kind of measurement as before",
                     std::string("a ") + display_name(in.measure));
  }
  validate_value(in.before, "before", t);
  validate_value(in.after, "after", t);
  if (in.fluid.volume) {
    if (in.fluid.volume->value() <= 0.0) {
      throw InputError("volume", format_number(in_mL(*in.fluid.volume), 0) + " mL",
                       "must be positive", "a volume above 0 mL");
    }
    plausible_as(t, "fluid_volume", *in.fluid.volume, "volume");
  }
  if (in.fluid.duration) {
    if (in.fluid.duration->value() <= 0.0) {
      throw InputError("duration", format_number(in_seconds(*in.fluid.duration), 2) + " s",
                       "must be positive", "a duration above 0");
    }
    plausible_as(t, "fluid_duration", *in.fluid.duration, "duration");
  }
  for (const auto& [vt, field] :
       {std::pair{in.vt_before_per_kg, "vt_before"}, std::pair{in.vt_after_per_kg, "vt_after"}}) {
    if (vt && vt->value() <= 0.0) {
      throw InputError(field, format_number(in_mL_per_kg(*vt), 1) + " mL/kg", "must be positive",
                       "a tidal volume above 0 mL/kg");
    }
  }
  if (in.vt_before_per_kg) plausible_as(t, "vt_per_kg", *in.vt_before_per_kg, "vt_before");
  if (in.vt_after_per_kg) plausible_as(t, "vt_per_kg", *in.vt_after_per_kg, "vt_after");
  if (in.hold) {
    if (in.hold->value() <= 0.0) {
      throw InputError("hold", format_number(in_seconds(*in.hold), 2) + " s", "must be positive",
                       "a hold above 0 s");
    }
    plausible_as(t, "eeo_hold", *in.hold, "hold");
  }
}

PreloadTestResult analyse_preload_test(const PreloadTestInputs& in, const Thresholds& t) {
  PreloadTestResult r;
  r.kind = in.kind;
  r.change = change_of(in);
  r.change_is_points = in.kind == PreloadTestKind::vt_challenge;
  r.conditions = preload_test_conditions(in, t);
  r.reading = read_preload_change(in.kind, r.change, r.conditions, t);
  const bool fluid = in.kind == PreloadTestKind::fluid_challenge ||
                     in.kind == PreloadTestKind::mini_fluid_challenge;
  if (fluid) check_fluid_record(in, t, r);
  if (in.kind == PreloadTestKind::end_expiratory_occlusion)
    r.notes.push_back(PreloadNote::eeo_how_to_read);
  if (in.kind == PreloadTestKind::passive_leg_raising)
    r.notes.push_back(PreloadNote::plr_how_to_do);
  if (in.kind == PreloadTestKind::vt_challenge)
    r.notes.push_back(PreloadNote::vt_challenge_restore_vt);
  return r;
}

}  // namespace bb
