// Oxygen transport and gas exchange in words: labels, the Berlin gate and
// reading, notes as sentences and the messages of the limits breached. The
// numbers come from src/oxygen/.
#include "breathbeat/present/oxygen.hpp"

#include "breathbeat/cautions.hpp"

namespace bb {

namespace {

std::string mm(Pressure p) {
  return format_number(in_mmHg(p), 1) + " mmHg";
}
std::string mm0(Pressure p) {
  return format_number(in_mmHg(p), 0) + " mmHg";
}
std::string cm(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}
std::string content(Ratio c) {
  return format_number(in_mL_per_dL(c), 1) + " mL/dL";
}

// How a field is named in `context`, or "" when it has no name there (a
// command-line-only field in a trial report).
std::string name_in(std::string_view id, FieldContext context) {
  if (context == FieldContext::trial_file) {
    const FieldSpec* f = find_field(id);
    if (!f || file_path(*f).empty()) return "";
  }
  return field_name(id, context);
}

// "no --pao2 was given" / "no gases.pao2 was given"; "" for a field without a name.
std::string no_given(std::string_view id, FieldContext context, const char* verb = " was given") {
  const std::string name = name_in(id, context);
  return name.empty() ? std::string() : "no " + name + verb;
}

std::string sf_spo2_max_text(const Thresholds& limits) {
  return format_number(in_percent(limits.get<Ratio>("oxygen.sf_spo2_max")), 0) + " %";
}

Shown as_mL_per_dL(Ratio c, int decimals = 1) {
  return Shown{in_mL_per_dL(c), "mL/dL", "mL/dL", decimals, std::nullopt, std::nullopt};
}
Shown as_mL_per_min_per_m2(FlowPerArea f, int decimals = 0) {
  return Shown{
      in_mL_per_min_per_m2(f), "mL/min/m2", "mL/min/m2", decimals, std::nullopt, std::nullopt};
}
Shown as_L_per_min_per_m2(FlowPerArea f, int decimals = 2) {
  return Shown{in_L_per_min_per_m2(f), "L/min/m2",  "L/min/m2", decimals,
               std::nullopt,           std::nullopt};
}

Flag flag_of(OxygenLimit l, const OxygenResults& r, const Thresholds& limits) {
  const char* key = threshold_key(l);
  switch (l) {
    case OxygenLimit::pf_ratio_ards:
      return {"pf_ratio",
              "PaO2/FiO2 " + format_number(in_mmHg(*r.pf_ratio), 0) + " mmHg is at or below " +
                  format_number(in_mmHg(limits.get<Pressure>(key)), 0) +
                  " mmHg, the ARDS oxygenation range",
              limits.source(key)};
    case OxygenLimit::sf_ratio_ards:
      return {"sf_ratio",
              "SpO2/FiO2 " + format_number(*r.sf_ratio, 0) + " is at or below " +
                  format_number(limits.number(key), 0) + " with SpO2 at or below " +
                  sf_spo2_max_text(limits) +
                  ", the ARDS oxygenation criterion of the global definition",
              limits.source(key)};
    case OxygenLimit::o2_extraction_high:
    case OxygenLimit::o2_extraction_low: {
      const Ratio low = limits.get<Ratio>(threshold_key(OxygenLimit::o2_extraction_low));
      const Ratio high = limits.get<Ratio>(threshold_key(OxygenLimit::o2_extraction_high));
      const std::string range =
          format_number(in_fraction(low), 2) + "-" + format_number(in_fraction(high), 2);
      const bool above = l == OxygenLimit::o2_extraction_high;
      return {
          "o2_extraction",
          "O2 extraction " +
              format_deciding(in_fraction(*r.o2_extraction), in_fraction(above ? high : low), 2) +
              " is " + (above ? "above" : "below") + " the usual " + range,
          limits.source(key)};
    }
    case OxygenLimit::do2i_low: {
      const double low = limits.number(key);
      return {"do2i",
              "DO2I " + format_number(in_mL_per_min_per_m2(*r.do2i), 0) +
                  " mL/min/m2 is below the usual lower end of " + format_number(low, 0) +
                  " mL/min/m2",
              limits.source(key)};
    }
  }
  return {};
}

void add_inputs(const OxygenInputs& in, Answer& a) {
  if (in.hb) a.inputs.push_back({"hb", as_g_per_dL(*in.hb)});
  if (in.sao2) a.inputs.push_back({"sao2", as_percent(*in.sao2)});
  if (in.spo2) a.inputs.push_back({"spo2", as_percent(*in.spo2)});
  if (in.pao2) a.inputs.push_back({"pao2", as_mmHg(*in.pao2, 1)});
  if (in.paco2) a.inputs.push_back({"paco2", as_mmHg(*in.paco2, 1)});
  if (in.fio2) a.inputs.push_back({"fio2", as_fraction(*in.fio2)});
  if (in.pb) a.inputs.push_back({"pb", as_mmHg(*in.pb)});
  if (in.ph2o) a.inputs.push_back({"ph2o", as_mmHg(*in.ph2o)});
  if (in.rq) a.inputs.push_back({"rq", as_fraction(*in.rq)});
  if (in.svo2) a.inputs.push_back({"svo2", as_percent(*in.svo2)});
  if (in.pvo2) a.inputs.push_back({"pvo2", as_mmHg(*in.pvo2, 1)});
  if (in.co) a.inputs.push_back({"co", as_L_per_min(*in.co, 2)});
  if (in.ci) a.inputs.push_back({"ci", as_L_per_min_per_m2(*in.ci)});
  if (in.pmean) a.inputs.push_back({"pmean", as_cmH2O(*in.pmean)});
  if (in.peco2) a.inputs.push_back({"peco2", as_mmHg(*in.peco2, 1)});
  if (in.peep) a.inputs.push_back({"peep_total", as_cmH2O(*in.peep)});
  if (in.sex) a.inputs.push_back({"sex", std::string(to_string(*in.sex))});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height)});
  if (in.weight) a.inputs.push_back({"weight", as_kg(*in.weight)});
  if (in.bsa) a.inputs.push_back({"bsa", as_m2(*in.bsa)});
  if (in.age_years) a.inputs.push_back({"age", as_number(*in.age_years, 0)});
}

// The Berlin PEEP condition as a gate, and the category as the reading.
void add_berlin(const OxygenInputs& in, const OxygenResults& r, const Thresholds& limits,
                FieldContext context, Answer& a) {
  if (!r.pf_ratio || !r.berlin) return;
  const Pressure peep_min = limits.get<Pressure>("oxygen.berlin_peep_min");
  const std::string peep_min_text = format_number(in_cmH2O(peep_min), 0) + " cmH2O";
  const std::string peep_name = name_in("peep_total", context);
  ShownGate g;
  g.key = "berlin_peep";
  g.label = "PEEP at least " + peep_min_text + " (Berlin definition)";
  g.state = r.berlin->peep_condition;
  g.source = limits.source("oxygen.berlin_peep_min");
  g.detail = in.peep ? "PEEP " + cm(*in.peep) : no_given("peep_total", context, " given");
  a.gates.push_back(g);

  const Pressure mild = limits.get<Pressure>("oxygen.berlin_mild_max");
  const Pressure moderate = limits.get<Pressure>("oxygen.berlin_moderate_max");
  const Pressure severe = limits.get<Pressure>("oxygen.berlin_severe_max");
  auto n = [](Pressure p) { return format_number(in_mmHg(p), 0); };
  const BerlinCategory c = r.berlin->category;
  std::string band;
  switch (c) {
    case BerlinCategory::severe:
      band = "severe (P/F <= " + n(severe) + " mmHg)";
      break;
    case BerlinCategory::moderate:
      band = "moderate (" + n(severe) + " < P/F <= " + n(moderate) + " mmHg)";
      break;
    case BerlinCategory::mild:
      band = "mild (" + n(moderate) + " < P/F <= " + n(mild) + " mmHg)";
      break;
    case BerlinCategory::none:
      break;
  }
  const std::string pf = "PaO2/FiO2 " + format_number(in_mmHg(*r.pf_ratio), 0) + " mmHg";
  const std::string caveat =
      " The oxygenation band alone does not make the diagnosis: ARDS also needs onset within "
      "a week, bilateral opacities and oedema not fully explained by heart failure or fluid "
      "overload.";

  ShownReading reading;
  reading.key = "pf_ratio";
  reading.basis = {"pf_ratio", "berlin_peep"};
  if (c == BerlinCategory::none) {
    // Above the mild limit no band applies, whatever the PEEP.
    reading.category = to_string(c);
    reading.text =
        pf + " is above " + n(mild) + " mmHg: outside the Berlin ARDS oxygenation bands.";
    a.reading = reading;
    return;
  }
  switch (r.berlin->peep_condition) {
    case GateState::met:
      reading.category = to_string(c);
      reading.text = pf + " with PEEP " + cm(*in.peep) + ": Berlin category " + band + "." + caveat;
      break;
    case GateState::unknown:
    case GateState::not_contradicted:  // never set for PEEP (a recorded value, not a signal)
      reading.category = to_string(c);
      reading.text = "Conditional: " + pf + " falls in the Berlin category " + band +
                     ", which applies only with PEEP of at least " + peep_min_text +
                     "; no PEEP was given" + (peep_name.empty() ? "" : " (" + peep_name + ")") +
                     "." + caveat;
      break;
    case GateState::failed:
      reading.category = "not_applicable";
      reading.text = pf + " would fall in the Berlin category " + band + ", but PEEP " +
                     cm(*in.peep) + " is below " + peep_min_text +
                     ", so the Berlin categories do not apply.";
      break;
  }
  a.reading = reading;
}

const char* bsa_note(std::optional<BsaOrigin> origin) {
  if (!origin) return "";
  switch (*origin) {
    case BsaOrigin::given:
      return "given";
    case BsaOrigin::du_bois:
      return "Du Bois";
    case BsaOrigin::mosteller:
      return "Mosteller";
  }
  return "";
}

}  // namespace

std::vector<Flag> oxygen_flags(const OxygenInputs& in, const OxygenResults& r,
                               const Thresholds& limits, FieldContext context) {
  (void)context;  // no flag names a field
  std::vector<Flag> flags;
  for (OxygenLimit l : oxygen_breaches(in, r, limits)) flags.push_back(flag_of(l, r, limits));
  return flags;
}

std::string oxygen_note_text(OxygenNote note, const OxygenInputs& in, const OxygenResults& r,
                             const Thresholds& limits, FieldContext context) {
  auto because = [&](std::string_view id) {
    const std::string s = no_given(id, context);
    return s.empty() ? std::string() : " because " + s;
  };
  switch (note) {
    case OxygenNote::cao2_without_dissolved:
      return "CaO2 leaves out dissolved O2" + because("pao2") +
             " (about 0.3 mL/dL at a PaO2 of 100 mmHg, more on a high FiO2).";
    case OxygenNote::cvo2_without_dissolved:
      return "CvO2 leaves out dissolved O2" + because("pvo2") +
             " (small at venous PO2; the shunt fraction, which uses it so, reads slightly low).";
    case OxygenNote::av_difference_haemoglobin_bound: {
      std::string missing;
      auto ask = [&](bool absent, std::string_view id) {
        const std::string name = absent ? name_in(id, context) : std::string();
        if (!name.empty()) missing += (missing.empty() ? "" : " and ") + name;
      };
      ask(!in.pao2, "pao2");
      ask(!in.pvo2, "pvo2");
      return "VO2 and O2 extraction use Hb-bound O2 on both sides (arterial " +
             content(haemoglobin_bound_oxygen(*in.hb, *in.sao2, r.constants.hb_binding)) +
             ", venous " +
             content(haemoglobin_bound_oxygen(*in.hb, *in.svo2, r.constants.hb_binding)) +
             "), so that dissolved O2 counted on one side only does not bias them upward" +
             (missing.empty() ? std::string() : "; give " + missing + " to include it on both") +
             ". DO2 uses the CaO2 shown.";
    }
    case OxygenNote::bsa_given_over_height_weight: {
      const std::string bsa = name_in("bsa", context);
      return (bsa.empty() ? std::string("The body surface area") : bsa) +
             " was given; height and weight were not used for body surface area.";
    }
    case OxygenNote::co_from_ci_and_bsa: {
      const std::string no_co = no_given("co", context, " given");
      return "Cardiac output taken as CI x BSA (" + format_number(in_L_per_min(*r.co_used), 2) +
             " L/min" + (no_co.empty() ? "" : "; " + no_co) + ").";
    }
    case OxygenNote::ci_differs_from_co_over_bsa:
      return "CO / BSA (" + format_number(in_L_per_min_per_m2(*r.ci_from_co), 2) +
             " L/min/m2) differs from the given CI (" +
             format_number(in_L_per_min_per_m2(*in.ci), 2) +
             " L/min/m2) by more than 10 %: check both; DO2 uses CO, DO2I uses CI.";
    case OxygenNote::alveolar_gas_presets: {
      std::string set_with;
      for (const char* id : {"pb", "ph2o", "rq"}) {
        const std::string name = name_in(id, context);
        if (!name.empty()) set_with += (set_with.empty() ? "" : ", ") + name;
      }
      return "Alveolar gas equation used Pb " + mm0(r.constants.barometric_pressure) + ", PH2O " +
             mm0(r.constants.water_vapour) + ", R " +
             format_number(in_fraction(r.constants.respiratory_quotient), 2) +
             " (presets where not given" + (set_with.empty() ? "" : "; set with " + set_with) +
             ").";
    }
    case OxygenNote::pao2_above_alveolar:
      return "PaO2 is above the computed alveolar PO2: check FiO2, Pb, R and the sample; the A-a "
             "gradient and shunt fraction are not reliable.";
    case OxygenNote::aa_gradient_expected:
    case OxygenNote::aa_gradient_expected_on_oxygen: {
      std::string text = "Expected A-a gradient for age " + format_number(*in.age_years, 0) +
                         " on room air is about " + mm(*r.aa_gradient_expected) +
                         " (age/4 + 4; textbook rule, from memory).";
      if (note == OxygenNote::aa_gradient_expected_on_oxygen) {
        text += " The rule holds on room air; the gradient widens as FiO2 rises.";
      }
      return text;
    }
    case OxygenNote::pf_altitude_adjusted:
      return "Above 1000 m of altitude the Berlin definition adjusts P/F by Pb/" +
             format_number(in_mmHg(berlin_sea_level_pressure()), 0) + " (from memory): here " +
             format_number(in_mmHg(*r.pf_ratio_altitude_adjusted), 0) +
             " mmHg. The category shown uses the unadjusted ratio.";
    case OxygenNote::sf_spo2_above_limit:
      return "SpO2 is above " + sf_spo2_max_text(limits) +
             ": on the flat part of the dissociation curve SpO2/FiO2 does not track PaO2/FiO2 "
             "and is not used as an ARDS criterion.";
    case OxygenNote::shunt_is_venous_admixture:
      return "Shunt fraction: at FiO2 below 1.0 it is venous admixture (true shunt plus low V/Q "
             "units); it needs a mixed venous sample, and a central venous one (ScvO2) only "
             "approximates it.";
    case OxygenNote::pmean_estimated: {
      const std::string pmean = name_in("pmean", context);
      return "The oxygenation index (and OSI) used the estimated mean airway pressure (" +
             cm(*in.pmean) + ", from the mode's formula), not a measured one" +
             (pmean.empty() ? std::string() : "; give " + pmean + " as the ventilator shows it") +
             ".";
    }
    case OxygenNote::shunt_not_computed:
      return "Shunt fraction not computed: the end-capillary O2 content (" + content(*r.cco2) +
             ") is not above the arterial one (" + content(*r.cao2) +
             "); check FiO2, Pb and the samples.";
  }
  return "";
}

Answer describe_oxygen(const OxygenInputs& in, const OxygenResults& r, const Thresholds& limits,
                       FieldContext context) {
  Answer a;
  a.command = "calc oxygen";
  a.title = "oxygen transport and gas exchange";
  a.context = context;
  add_inputs(in, a);
  auto add = [&](const char* key, const char* label, const auto& value, auto present,
                 std::string note = "") {
    if (value) a.results.push_back(Item{key, label, present(*value), std::move(note)});
  };
  const std::string k_note =
      "k " + format_number(in_mL_per_kg(r.constants.hb_binding) / 1000.0, 2) + " mL/g";
  add(
      "cao2", "Arterial O2 content (CaO2)", r.cao2, [](Ratio c) { return as_mL_per_dL(c); },
      k_note);
  add(
      "cvo2", "Venous O2 content (CvO2)", r.cvo2, [](Ratio c) { return as_mL_per_dL(c); }, k_note);
  add(
      "bsa", "Body surface area", r.bsa, [](Area x) { return as_m2(x); }, bsa_note(r.bsa_origin));
  if (r.ci_used && !in.ci) {
    add("cardiac_index", "Cardiac index (CO / BSA)", r.ci_used,
        [](FlowPerArea f) { return as_L_per_min_per_m2(f); });
  }
  if (r.co_used && !in.co) {
    add("cardiac_output", "Cardiac output (CI x BSA)", r.co_used,
        [](Flow f) { return as_L_per_min(f, 2); });
  }
  add("do2", "O2 delivery (DO2)", r.do2, [](Flow f) { return as_mL_per_min(f); });
  add(
      "do2i", "O2 delivery index (DO2I)", r.do2i,
      [](FlowPerArea f) { return as_mL_per_min_per_m2(f); }, in.ci ? "from CI" : "from CO / BSA");
  std::string av_note;
  if (r.av_content_basis) {
    av_note = *r.av_content_basis == O2ContentBasis::with_dissolved
                  ? "dissolved O2 included, both sides"
                  : "Hb-bound O2, both sides";
  }
  add(
      "vo2", "O2 consumption (VO2, reverse Fick)", r.vo2, [](Flow f) { return as_mL_per_min(f); },
      av_note);
  add("vo2i", "O2 consumption index (VO2I)", r.vo2i,
      [](FlowPerArea f) { return as_mL_per_min_per_m2(f); });
  add(
      "o2_extraction", "O2 extraction ratio", r.o2_extraction,
      [](Ratio x) { return as_fraction(x); }, av_note);
  add(
      "pao2_alveolar", "Alveolar PO2 (PAO2)", r.pao2_alveolar,
      [](Pressure p) { return as_mmHg(p, 1); }, "simplified alveolar gas equation");
  std::string aa_note;
  if (r.aa_gradient_expected) {
    aa_note =
        "age rule ~" + format_number(in_mmHg(*r.aa_gradient_expected), 1) + " mmHg on room air";
  }
  add(
      "aa_gradient", "A-a gradient", r.aa_gradient, [](Pressure p) { return as_mmHg(p, 1); },
      aa_note);
  std::string pf_note;
  if (r.pf_ratio) pf_note = format_number(in_kPa(*r.pf_ratio), 1) + " kPa";
  add(
      "pf_ratio", "PaO2/FiO2", r.pf_ratio, [](Pressure p) { return as_mmHg(p, 0); }, pf_note);
  std::string sf_note;
  if (r.sf_interpretable && !*r.sf_interpretable) {
    sf_note = "SpO2 above " + sf_spo2_max_text(limits) + ": not an ARDS criterion";
  }
  add(
      "sf_ratio", "SpO2/FiO2", r.sf_ratio, [](double x) { return as_number(x, 0); }, sf_note);
  const std::string pmean_note = in.pmean_estimated ? "estimated Pmean" : "";
  add(
      "oxygenation_index", "Oxygenation index (OI)", r.oxygenation_index,
      [](double x) { return as_number(x, 1); }, pmean_note);
  add(
      "oxygen_saturation_index", "Oxygen saturation index (OSI)", r.oxygen_saturation_index,
      [](double x) { return as_number(x, 1); }, pmean_note);
  add(
      "cco2", "End-capillary O2 content (Cc'O2)", r.shunt_fraction ? r.cco2 : std::nullopt,
      [](Ratio c) { return as_mL_per_dL(c); }, "from PAO2, Sc'O2 = 1");
  add("shunt_fraction", "Shunt fraction (Qs/Qt)", r.shunt_fraction,
      [](Ratio x) { return as_fraction(x); });
  add(
      "dead_space_fraction", "Dead-space fraction (VD/VT, Bohr-Enghoff)", r.dead_space_fraction,
      [](Ratio x) { return as_fraction(x); }, "PECO2 must be mixed expired");
  a.skipped = r.skipped;
  add_berlin(in, r, limits, context, a);
  a.flags = oxygen_flags(in, r, limits, context);
  for (OxygenNote n : r.notes) a.notes.push_back(oxygen_note_text(n, in, r, limits, context));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
