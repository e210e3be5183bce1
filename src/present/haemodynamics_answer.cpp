// The answers of calc ppv and calc preload-test: labels, inputs as given,
// notes and flags in words (the analyses are in src/haemodynamics/).
#include <algorithm>
#include <type_traits>

#include "breathbeat/cautions.hpp"
#include "breathbeat/fields/registry.hpp"
#include "breathbeat/present/gate_words.hpp"
#include "breathbeat/present/haemodynamics.hpp"

namespace bb {

namespace {

std::string yes_no(bool v) {
  return v ? "yes" : "no";
}

// "calc preload-test --kind plr" on the command line, "preload.plr" in a trial file.
std::string where_to_run(PreloadTestKind kind, FieldContext context) {
  if (context == FieldContext::command_line)
    return "calc preload-test " + field_name("kind", context) + " " + id_of(kind);
  return std::string("preload.") + id_of(kind);
}

void add_ppv_inputs(const PpvInputs& in, Answer& a) {
  // The pressure lists are echoed as the number of breaths they hold.
  const bool cycles = !in.cycles.empty();
  const std::size_t breaths = cycles ? in.cycles.size() : in.beats.size();
  if (breaths > 0) {
    Shown n = as_number(static_cast<double>(breaths), 0);
    n.unit = "breaths";
    a.inputs.push_back({cycles ? "pp_cycles" : "beats", n});
  }
  if (in.sbp) a.inputs.push_back({"sbp", as_mmHg(*in.sbp)});
  if (in.dbp) a.inputs.push_back({"dbp", as_mmHg(*in.dbp)});
  if (in.svv) a.inputs.push_back({"svv", as_percent(*in.svv)});
  const PpvConditions& c = in.conditions;
  if (c.hr) a.inputs.push_back({"hr", as_per_min(*c.hr)});
  if (c.rr) a.inputs.push_back({"rr", as_per_min(*c.rr)});
  if (c.vt_per_kg) a.inputs.push_back({"vt_per_kg", as_mL_per_kg(*c.vt_per_kg)});
  if (c.crs) a.inputs.push_back({"crs", as_mL_per_cmH2O(*c.crs)});
  if (c.passive) a.inputs.push_back({"passive", yes_no(*c.passive)});
  if (c.regular_rhythm) a.inputs.push_back({"regular_rhythm", yes_no(*c.regular_rhythm)});
  if (c.closed_chest) a.inputs.push_back({"closed_chest", yes_no(*c.closed_chest)});
  if (c.intra_abdominal_hypertension)
    a.inputs.push_back({"iah", yes_no(*c.intra_abdominal_hypertension)});
  if (c.rv_failure) a.inputs.push_back({"rv_failure", yes_no(*c.rv_failure)});
}

Shown as_minutes(Time t) {
  return Shown{in_minutes(t), "min", "min", 1, std::nullopt, std::nullopt};
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

// "Volume 250 mL is outside the usual 300-500 mL".
template <class Q>
Flag outside_flag(const char* key, const char* what, const OutsideUsual<Q>& o, double (*in_unit)(Q),
                  const char* unit) {
  const double low = in_unit(o.low), high = in_unit(o.high);
  const std::string u = std::string(" ") + unit;
  const std::string range = low == high ? format_number(low, 0) + u
                                        : format_number(low, 0) + "-" + format_number(high, 0) + u;
  return {key,
          std::string(what) + " " + format_number(in_unit(o.value), 0) + u +
              " is outside the usual " + range,
          o.source};
}

}  // namespace

// ---- calc ppv ---------------------------------------------------------------------

std::string ppv_note_text(const PpvNote& note, const PpvResults& r, const Thresholds& t,
                          FieldContext context) {
  switch (note.kind) {
    case PpvNoteKind::map_from_beats:
      return "MAP estimated from the mean SBP and DBP of all " + std::to_string(note.count) +
             " beats; prefer a measured mean when the monitor shows one.";
    case PpvNoteKind::vt_challenge_instead: {
      const auto vt = [&](const char* key) {
        return format_number(in_mL_per_kg(t.get<VolumePerMass>(key)), 0);
      };
      return "With VT below the gate, a tidal-volume challenge (" +
             vt("preload_tests.vt_challenge_vt_low") + " to " +
             vt("preload_tests.vt_challenge_vt_high") +
             " mL/kg PBW, then the rise in PPV) can still test preload responsiveness (Myatra et "
             "al., Crit Care Med 2017;45:415): " +
             where_to_run(PreloadTestKind::vt_challenge, context) + ".";
    }
    case PpvNoteKind::plr_instead:
      return "A passive leg raising test judged by cardiac output does not need these ventilation "
             "and rhythm conditions (Monnet et al., Crit Care Med 2006;34:1402): " +
             where_to_run(PreloadTestKind::passive_leg_raising, context) + ".";
    case PpvNoteKind::beats_per_breath:
      return "On average " + format_number(note.per_breath, 1) +
             " beats were listed per breath; if every beat was entered this approximates HR/RR.";
    case PpvNoteKind::ppv_mean_of_breaths:
      return "PPV is the mean of " + std::to_string(note.count) +
             " breaths, each (PPmax - PPmin) / mean of the two.";
    case PpvNoteKind::svv_reading:
      return "SVV reading: " + (r.svv_reading ? reading_text(*r.svv_reading) : std::string());
  }
  return "";
}

std::vector<std::string> ppv_note_texts(const PpvResults& r, const Thresholds& t,
                                        FieldContext context) {
  std::vector<std::string> out;
  for (const PpvNote& n : r.notes) out.push_back(ppv_note_text(n, r, t, context));
  return out;
}

Answer describe_ppv(const PpvInputs& in, const PpvResults& r, const Thresholds& t,
                    FieldContext context) {
  Answer a;
  a.command = "calc ppv";
  a.title = "pulse pressure variation";
  a.context = context;
  add_ppv_inputs(in, a);
  if (r.ppv) {
    a.results.push_back(
        {"ppv", "Pulse pressure variation (PPV)", as_percent(*r.ppv), "mean over breaths"});
    const auto [lo, hi] = std::minmax_element(r.ppv_per_breath.begin(), r.ppv_per_breath.end());
    a.results.push_back({"ppv_lowest_breath", "PPV, lowest single breath", as_percent(*lo), ""});
    a.results.push_back({"ppv_highest_breath", "PPV, highest single breath", as_percent(*hi), ""});
  }
  if (r.spv)
    a.results.push_back(
        {"spv", "Systolic pressure variation (SPV)", as_mmHg(*r.spv, 1), "mean over breaths"});
  if (r.map_estimate)
    a.results.push_back(
        {"map", "Mean arterial pressure", as_mmHg(*r.map_estimate), "estimate DBP + PP/3"});
  if (r.hr_rr_ratio)
    a.results.push_back({"hr_rr_ratio", "HR/RR ratio", as_fraction(*r.hr_rr_ratio, 1), ""});
  if (r.svv)
    a.results.push_back({"svv", "Stroke volume variation (SVV)", as_percent(*r.svv), "as given"});
  a.skipped = r.skipped;
  a.gates = shown_gates(r.gates);
  if (r.reading) a.reading = shown_reading(*r.reading);
  a.notes = ppv_note_texts(r, t, context);
  a.cautions = standard_cautions();
  return a;
}

// ---- preload tests ------------------------------------------------------------------

std::string preload_note_text(PreloadNote note) {
  switch (note) {
    case PreloadNote::fluid_volume_not_recorded:
      return "Fluid volume not recorded.";
    case PreloadNote::fluid_duration_not_recorded:
      return "Infusion duration not recorded.";
    case PreloadNote::fluid_type_not_recorded:
      return "Fluid type not recorded (crystalloid is the usual default).";
    case PreloadNote::eeo_how_to_read:
      return "Read the change over the last seconds of the hold; the patient must not trigger "
             "during it, and the method must follow cardiac output beat by beat.";
    case PreloadNote::plr_how_to_do:
      return "Start semi-recumbent, judge by cardiac output (not blood pressure) at its peak "
             "within about a minute, and re-measure after return to baseline.";
    case PreloadNote::vt_challenge_restore_vt:
      return "Return the tidal volume to its protective setting after the challenge.";
  }
  return "";
}

std::vector<std::string> preload_note_texts(const PreloadTestResult& r) {
  std::vector<std::string> out;
  for (PreloadNote n : r.notes) out.push_back(preload_note_text(n));
  return out;
}

std::vector<Flag> preload_test_flags(const PreloadTestResult& r) {
  std::vector<Flag> flags;
  if (r.volume_outside_usual)
    flags.push_back(outside_flag("fluid_volume", "Volume", *r.volume_outside_usual, &in_mL, "mL"));
  if (r.duration_outside_usual) {
    flags.push_back(
        outside_flag("fluid_duration", "Duration", *r.duration_outside_usual, &in_minutes, "min"));
  }
  return flags;
}

Answer describe_preload_test(const PreloadTestInputs& in, const PreloadTestResult& r,
                             const Thresholds& t, FieldContext context) {
  Answer a;
  a.command = "calc preload-test";
  a.title = std::string("preload test: ") + display_name(in.kind);
  a.context = context;
  a.inputs.push_back({"kind", std::string(to_string(in.kind))});
  a.inputs.push_back({"measure", std::string(to_string(in.measure))});
  a.inputs.push_back({"before", shown_of(in.before)});
  a.inputs.push_back({"after", shown_of(in.after)});
  if (in.vt_before_per_kg) a.inputs.push_back({"vt_before", as_mL_per_kg(*in.vt_before_per_kg)});
  if (in.vt_after_per_kg) a.inputs.push_back({"vt_after", as_mL_per_kg(*in.vt_after_per_kg)});
  if (in.passive) a.inputs.push_back({"passive", yes_no(*in.passive)});
  if (in.hold) a.inputs.push_back({"hold", as_seconds(*in.hold, 0)});
  if (in.intra_abdominal_hypertension)
    a.inputs.push_back({"iah", yes_no(*in.intra_abdominal_hypertension)});
  if (in.fluid.volume) a.inputs.push_back({"volume", as_mL(*in.fluid.volume)});
  if (in.fluid.duration) a.inputs.push_back({"duration", as_minutes(*in.fluid.duration)});
  if (in.fluid.fluid) a.inputs.push_back({"fluid", *in.fluid.fluid});

  if (r.change_is_points) {
    a.results.push_back(
        {"change", "Change in PPV", as_percentage_points(r.change), "after - before"});
  } else {
    a.results.push_back({"change", std::string("Change in ") + display_name(in.measure),
                         as_percent(r.change), "relative, (after - before) / before"});
  }
  const char* cut = cut_off_key(in.kind);
  a.results.push_back({"cut_off", "Cut-off", as_percent(t.get<Ratio>(cut)), t.source(cut)});
  if (const char* high = cut_off_high_key(in.kind)) {
    a.results.push_back(
        {"cut_off_high", "Higher cut-off", as_percent(t.get<Ratio>(high)), t.source(high)});
  }
  if (r.fluid_rate)
    a.results.push_back(
        {"fluid_rate", "Infusion rate", as_mL_per_min(*r.fluid_rate, 1), "volume / duration"});
  a.gates = shown_gates(r.conditions);
  a.reading = shown_reading(r.reading);
  a.flags = preload_test_flags(r);
  a.notes = preload_note_texts(r);
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
