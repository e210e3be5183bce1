// Paired before/after preload tests: tidal-volume challenge, end-expiratory
// occlusion, passive leg raising, fluid challenge and mini fluid challenge.
#include <algorithm>
#include <type_traits>

#include "breathbeat/cautions.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/cutoff.hpp"

namespace bb {

namespace {

using cutoff::at_least;

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

const char* measure_label(PreloadMeasure m) {
  switch (m) {
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

Shown as_minutes(Time t) {
  return Shown{in_minutes(t), "min", "min", 1, std::nullopt, std::nullopt};
}

std::string pct(Ratio r) {
  return format_number(in_percent(r), 1) + " %";
}

std::string labels_of(const std::vector<Gate>& gates, GateState state) {
  std::string out;
  for (const Gate& g : gates) {
    if (g.state == state) out += (out.empty() ? "" : "; ") + g.label;
  }
  return out;
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
        if constexpr (std::is_same_v<Q, Ratio>) return format_shown(as_percent(q));
        if constexpr (std::is_same_v<Q, Flow>) return format_shown(as_L_per_min(q, 2));
        if constexpr (std::is_same_v<Q, Volume>) return format_shown(as_mL(q));
        if constexpr (std::is_same_v<Q, Length>) return format_shown(as_cm(q));
      },
      v);
}

Shown shown_of(const PreloadValue& v) {
  return std::visit(
      [](const auto& q) -> Shown {
        using Q = std::decay_t<decltype(q)>;
        if constexpr (std::is_same_v<Q, Ratio>) return as_percent(q);
        if constexpr (std::is_same_v<Q, Flow>) return as_L_per_min(q, 2);
        if constexpr (std::is_same_v<Q, Volume>) return as_mL(q);
        if constexpr (std::is_same_v<Q, Length>) return as_cm(q);
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
  std::visit(
      [&](const auto& q) {
        try {
          t.check_plausible(kRange[v.index()], q);
        } catch (const InputError& e) {
          throw InputError(field, e.value(), e.problem(), e.expected());
        }
      },
      v);
}

Gate vt_step_gate(const PreloadTestInputs& in, const Thresholds& t) {
  const double low = in_mL_per_kg(t.get<VolumePerMass>("preload_tests.vt_challenge_vt_low"));
  const double high = in_mL_per_kg(t.get<VolumePerMass>("preload_tests.vt_challenge_vt_high"));
  const std::string step = format_number(low, 0) + " to " + format_number(high, 0) + " mL/kg PBW";
  Gate g{"vt_step", "Tidal volume raised from " + step + " for about one minute",
         GateState::unknown, "tidal volumes before and after not given",
         t.source("preload_tests.vt_challenge_vt_high")};
  if (!in.vt_before_per_kg || !in.vt_after_per_kg) return g;
  const double before = in_mL_per_kg(*in.vt_before_per_kg);
  const double after = in_mL_per_kg(*in.vt_after_per_kg);
  const std::string shown =
      "VT " + format_number(before, 1) + " to " + format_number(after, 1) + " mL/kg PBW";
  const bool ok = at_least(low, before) && at_least(after, high);
  g.state = ok ? GateState::met : GateState::failed;
  g.detail = ok ? shown : shown + " is not the " + step + " step the cut-off was found with";
  return g;
}

Gate passive_gate(const PreloadTestInputs& in, const char* source) {
  Gate g{"passive_ventilation", "Controlled ventilation without spontaneous effort",
         GateState::unknown, "not stated whether the patient is passive", source};
  if (!in.passive) return g;
  g.state = *in.passive ? GateState::met : GateState::failed;
  g.detail = *in.passive ? "no spontaneous breathing effort"
                         : "spontaneous effort changes the tidal swing the test relies on";
  return g;
}

Gate hold_gate(const PreloadTestInputs& in, const Thresholds& t) {
  const double min = in_seconds(t.get<Time>("preload_tests.eeo_hold_min"));
  Gate g{"hold_duration", "End-expiratory hold of at least " + format_number(min, 0) + " s",
         GateState::unknown, "hold duration not given", t.source("preload_tests.eeo_hold_min")};
  if (!in.hold) return g;
  const std::string shown = "hold " + format_number(in_seconds(*in.hold), 0) + " s";
  const bool ok = at_least(in_seconds(*in.hold), min);
  g.state = ok ? GateState::met : GateState::failed;
  g.detail = ok ? shown : shown + " is shorter than the hold the cut-off was found with";
  return g;
}

Gate iah_gate(const PreloadTestInputs& in) {
  Gate g{"no_intra_abdominal_hypertension", "No intra-abdominal hypertension", GateState::unknown,
         "intra-abdominal pressure not stated", "Mahjoub et al., Crit Care Med 2010 (from memory)"};
  if (!in.intra_abdominal_hypertension) return g;
  g.state = *in.intra_abdominal_hypertension ? GateState::failed : GateState::met;
  g.detail = *in.intra_abdominal_hypertension ? "intra-abdominal hypertension can blunt the venous "
                                                "return shifted by leg raising (false negative)"
                                              : "no intra-abdominal hypertension";
  return g;
}

void flag_outside(std::vector<Flag>& flags, const char* key, const std::string& what, double value,
                  double low, double high, const std::string& unit, const std::string& source) {
  if (at_least(value, low) && at_least(high, value)) return;
  const std::string range = low == high
                                ? format_number(low, 0) + " " + unit
                                : format_number(low, 0) + "-" + format_number(high, 0) + " " + unit;
  flags.push_back(
      {key, what + " " + format_number(value, 0) + " " + unit + " is outside the usual " + range,
       source});
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
    flag_outside(r.flags, "fluid_volume", "Volume", in_mL(*f.volume), in_mL(t.get<Volume>(vmin)),
                 in_mL(t.get<Volume>(vmax)), "mL", t.source(vmin));
  } else {
    r.notes.push_back("Fluid volume not recorded.");
  }
  if (f.duration) {
    flag_outside(r.flags, "fluid_duration", "Duration", in_minutes(*f.duration),
                 in_minutes(t.get<Time>(dmin)), in_minutes(t.get<Time>(dmax)), "min",
                 t.source(dmin));
  } else {
    r.notes.push_back("Infusion duration not recorded.");
  }
  if (f.volume && f.duration) r.fluid_rate = Flow(*f.volume / *f.duration);
  if (!f.fluid) r.notes.push_back("Fluid type not recorded (crystalloid is the usual default).");
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
      return {M::cardiac_output, M::stroke_volume, M::vti};
    case PreloadTestKind::fluid_challenge:
      return {M::cardiac_output, M::stroke_volume};
    case PreloadTestKind::mini_fluid_challenge:
      return {M::vti};
  }
  return {};
}

std::vector<Gate> preload_test_conditions(const PreloadTestInputs& in, const Thresholds& t) {
  switch (in.kind) {
    case PreloadTestKind::vt_challenge:
      return {vt_step_gate(in, t),
              passive_gate(in, "Myatra et al., Crit Care Med 2017;45:415 (passive patients)")};
    case PreloadTestKind::end_expiratory_occlusion:
      return {hold_gate(in, t)};
    case PreloadTestKind::passive_leg_raising:
      return {iah_gate(in)};
    case PreloadTestKind::fluid_challenge:
    case PreloadTestKind::mini_fluid_challenge:
      return {};
  }
  return {};
}

Reading read_preload_change(PreloadTestKind kind, Ratio change, const std::vector<Gate>& conditions,
                            const Thresholds& t) {
  const TestSpec s = spec_of(kind);
  Reading r;
  r.key = s.key;
  r.basis.push_back("change");
  for (const Gate& g : conditions) r.basis.push_back(g.key);
  const bool points = kind == PreloadTestKind::vt_challenge;
  const std::string shown = points ? format_number(in_percent(change), 1) + " points" : pct(change);
  const std::string what =
      std::string("The ") + s.name + " changed " + (points ? "PPV by " : "the measure by ") + shown;

  if (any_gate_failed(conditions)) {
    r.category = "not_interpretable";
    r.text = what + ", but it is not interpretable: failed condition(s): " +
             labels_of(conditions, GateState::failed) + ".";
    return r;
  }
  const double v = in_percent(change);
  const double cut = in_percent(t.get<Ratio>(s.cut_off));
  const std::string cut_text = format_number(cut, 1) + (points ? " points" : " %");
  if (s.cut_off_high) {
    const double high = in_percent(t.get<Ratio>(s.cut_off_high));
    const std::string high_text = format_number(high, 1) + " %";
    if (at_least(v, high)) {
      r.category = "responsive";
      r.text = what + ": at or above both cut-offs (" + cut_text + " and " + high_text +
               "): preload responsive.";
    } else if (at_least(v, cut)) {
      r.category = "between_cut_offs";
      r.text = what + ": responsive by the " + cut_text + " cut-off but not by the " + high_text +
               " cut-off.";
    } else {
      r.category = "not_responsive";
      r.text = what + ": below both cut-offs (" + cut_text + " and " + high_text +
               "): not preload responsive.";
    }
  } else if (at_least(v, cut)) {
    r.category = "responsive";
    r.text = what + ": at or above the " + cut_text + " cut-off: preload responsive.";
  } else {
    r.category = "not_responsive";
    r.text = what + ": below the " + cut_text + " cut-off: not preload responsive.";
  }
  if (any_gate_unknown(conditions)) {
    r.text +=
        " Conditional: not known whether these hold: " + labels_of(conditions, GateState::unknown) +
        ".";
  }
  return r;
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
                     std::string("is not a ") + measure_label(in.measure),
                     std::string("a ") + measure_label(in.measure));
  }
  if (in.after.index() != in.before.index()) {
    throw InputError("after", shown_value(in.after),
                     "is not the same kind of measurement as before",
                     std::string("a ") + measure_label(in.measure));
  }
  validate_value(in.before, "before", t);
  validate_value(in.after, "after", t);
  if (in.fluid.volume) {
    if (in.fluid.volume->value() <= 0.0) {
      throw InputError("volume", format_shown(as_mL(*in.fluid.volume)), "must be positive",
                       "a volume above 0 mL");
    }
    t.check_plausible("fluid_volume", *in.fluid.volume);
  }
  if (in.fluid.duration) {
    if (in.fluid.duration->value() <= 0.0) {
      throw InputError("duration", format_shown(as_seconds(*in.fluid.duration)), "must be positive",
                       "a duration above 0");
    }
    t.check_plausible("fluid_duration", *in.fluid.duration);
  }
  for (const auto& [vt, field] :
       {std::pair{in.vt_before_per_kg, "vt_before"}, std::pair{in.vt_after_per_kg, "vt_after"}}) {
    if (vt && vt->value() <= 0.0) {
      throw InputError(field, format_shown(as_mL_per_kg(*vt)), "must be positive",
                       "a tidal volume above 0 mL/kg");
    }
  }
  if (in.vt_before_per_kg) t.check_plausible("vt_per_kg", *in.vt_before_per_kg);
  if (in.vt_after_per_kg) t.check_plausible("vt_per_kg", *in.vt_after_per_kg);
  if (in.hold) {
    if (in.hold->value() <= 0.0) {
      throw InputError("hold", format_shown(as_seconds(*in.hold)), "must be positive",
                       "a hold above 0 s");
    }
    t.check_plausible("eeo_hold", *in.hold);
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
  if (in.kind == PreloadTestKind::end_expiratory_occlusion) {
    r.notes.push_back(
        "Read the change over the last seconds of the hold; the patient must not trigger "
        "during it, and the method must follow cardiac output beat by beat.");
  }
  if (in.kind == PreloadTestKind::passive_leg_raising) {
    r.notes.push_back(
        "Start semi-recumbent, judge by cardiac output (not blood pressure) at its peak within "
        "about a minute, and re-measure after return to baseline.");
  }
  if (in.kind == PreloadTestKind::vt_challenge) {
    r.notes.push_back("Return the tidal volume to its protective setting after the challenge.");
  }
  return r;
}

Answer describe_preload_test(const PreloadTestInputs& in, const PreloadTestResult& r,
                             const Thresholds& t) {
  Answer a;
  a.command = "calc preload-test";
  a.title = std::string("preload test: ") + spec_of(in.kind).name;
  a.inputs.push_back({"kind", std::string(to_string(in.kind))});
  a.inputs.push_back({"measure", std::string(to_string(in.measure))});
  a.inputs.push_back({"before", shown_of(in.before)});
  a.inputs.push_back({"after", shown_of(in.after)});
  if (in.vt_before_per_kg)
    a.inputs.push_back({"vt_before_per_kg_pbw", as_mL_per_kg(*in.vt_before_per_kg)});
  if (in.vt_after_per_kg)
    a.inputs.push_back({"vt_after_per_kg_pbw", as_mL_per_kg(*in.vt_after_per_kg)});
  if (in.passive) a.inputs.push_back({"passive", std::string(*in.passive ? "yes" : "no")});
  if (in.hold) a.inputs.push_back({"hold", as_seconds(*in.hold, 0)});
  if (in.intra_abdominal_hypertension) {
    a.inputs.push_back({"intra_abdominal_hypertension",
                        std::string(*in.intra_abdominal_hypertension ? "yes" : "no")});
  }
  if (in.fluid.volume) a.inputs.push_back({"volume", as_mL(*in.fluid.volume)});
  if (in.fluid.duration) a.inputs.push_back({"duration", as_minutes(*in.fluid.duration)});
  if (in.fluid.fluid) a.inputs.push_back({"fluid", *in.fluid.fluid});

  if (r.change_is_points) {
    a.results.push_back(
        {"change", "Change in PPV", as_percent(r.change), "percentage points, after - before"});
  } else {
    a.results.push_back({"change", std::string("Change in ") + measure_label(in.measure),
                         as_percent(r.change), "relative, (after - before) / before"});
  }
  const TestSpec s = spec_of(in.kind);
  a.results.push_back(
      {"cut_off", "Cut-off", as_percent(t.get<Ratio>(s.cut_off)), t.source(s.cut_off)});
  if (s.cut_off_high) {
    a.results.push_back({"cut_off_high", "Higher cut-off", as_percent(t.get<Ratio>(s.cut_off_high)),
                         t.source(s.cut_off_high)});
  }
  if (r.fluid_rate)
    a.results.push_back(
        {"fluid_rate", "Infusion rate", as_mL_per_min(*r.fluid_rate, 1), "volume / duration"});
  a.gates = r.conditions;
  a.reading = r.reading;
  a.flags = r.flags;
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
