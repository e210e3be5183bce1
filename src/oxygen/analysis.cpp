// Oxygen transport and gas exchange from whatever was measured: validation,
// results, published limits and the answer shown to the user.
#include <cmath>
#include <cstdio>

#include "breathbeat/body.hpp"
#include "breathbeat/cautions.hpp"
#include "breathbeat/oxygen.hpp"

namespace bb {

namespace {

// A number as typed back to the user in an error ("-5", "1.05").
std::string plain(double v) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%g", v);
  return buf;
}

std::string pct(Ratio r) {
  return format_number(in_percent(r), 1) + " %";
}
std::string mm(Pressure p) {
  return format_number(in_mmHg(p), 1) + " mmHg";
}
std::string cm(Pressure p) {
  return format_number(in_cmH2O(p), 1) + " cmH2O";
}
std::string content(Ratio c) {
  return format_number(in_mL_per_dL(c), 1) + " mL/dL";
}

// Values that cannot be real whatever --allow-implausible says.
void require_positive(const char* field, double value, const char* unit, const char* what) {
  if (value > 0.0) return;
  throw InputError(field, plain(value) + (unit[0] ? std::string(" ") + unit : ""),
                   value < 0.0 ? "is negative" : "is zero",
                   std::string(what) + " above 0" + (unit[0] ? std::string(" ") + unit : ""));
}

void require_saturation(const std::optional<Ratio>& s, const char* field) {
  if (!s) return;
  if (in_fraction(*s) > 1.0 + 1e-12) {
    throw InputError(field, plain(in_percent(*s)) + " %", "is above 100 %",
                     "a saturation of at most 100 % (written 0.95, 95 or 95%)");
  }
  require_positive(field, in_percent(*s), "%", "a saturation");
}

template <class Q>
void check_range(const Thresholds& limits, const char* field, const std::optional<Q>& q) {
  if (q) limits.check_plausible(field, *q);
}

}  // namespace

void validate_oxygen(const OxygenInputs& in, const Thresholds& limits) {
  // 1. Impossible values, refused even with --allow-implausible.
  require_saturation(in.sao2, "sao2");
  require_saturation(in.spo2, "spo2");
  require_saturation(in.svo2, "svo2");
  if (in.fio2) {
    if (in_fraction(*in.fio2) > 1.0 + 1e-12) {
      throw InputError("fio2", plain(in_percent(*in.fio2)) + " %", "is above 1.0 (100 %)",
                       "an inspired O2 fraction from 0.21 to 1.0 (written 0.5, 50 or 50%)");
    }
    require_positive("fio2", in_percent(*in.fio2), "%", "an inspired O2 fraction");
  }
  if (in.co) require_positive("co", in_L_per_min(*in.co), "L/min", "a cardiac output");
  if (in.ci) require_positive("ci", in_L_per_min_per_m2(*in.ci), "L/min/m2", "a cardiac index");
  if (in.hb) require_positive("hb", in_g_per_dL(*in.hb), "g/dL", "a haemoglobin");
  if (in.pao2) require_positive("pao2", in_mmHg(*in.pao2), "mmHg", "a PaO2");
  if (in.paco2) require_positive("paco2", in_mmHg(*in.paco2), "mmHg", "a PaCO2");
  if (in.pvo2) require_positive("pvo2", in_mmHg(*in.pvo2), "mmHg", "a PvO2");
  if (in.pb) require_positive("pb", in_mmHg(*in.pb), "mmHg", "a barometric pressure");
  if (in.ph2o) require_positive("ph2o", in_mmHg(*in.ph2o), "mmHg", "a water vapour pressure");
  if (in.rq) require_positive("rq", in_fraction(*in.rq), "", "a respiratory quotient");
  if (in.pmean) require_positive("pmean", in_cmH2O(*in.pmean), "cmH2O", "a mean airway pressure");
  if (in.height) require_positive("height", in_cm(*in.height), "cm", "a height");
  if (in.weight) require_positive("weight", in_kg(*in.weight), "kg", "a weight");
  if (in.bsa) require_positive("bsa", in_square_metre(*in.bsa), "m2", "a body surface area");
  if (in.peco2 && in_mmHg(*in.peco2) < 0.0) {
    require_positive("peco2", in_mmHg(*in.peco2), "mmHg", "a mixed expired PCO2");
  }
  if (in.age_years && *in.age_years < 0.0) {
    throw InputError("age", plain(*in.age_years), "is negative", "an age in years");
  }

  // 2. Plausible adult ranges (presets/plausibility.toml), unless overridden.
  check_range(limits, "hb", in.hb);
  check_range(limits, "sao2", in.sao2);
  check_range(limits, "spo2", in.spo2);
  check_range(limits, "svo2", in.svo2);
  check_range(limits, "fio2", in.fio2);
  check_range(limits, "pao2", in.pao2);
  check_range(limits, "paco2", in.paco2);
  check_range(limits, "pvo2", in.pvo2);
  check_range(limits, "peco2", in.peco2);
  check_range(limits, "pb", in.pb);
  check_range(limits, "ph2o", in.ph2o);
  check_range(limits, "rq", in.rq);
  check_range(limits, "co", in.co);
  check_range(limits, "pmean", in.pmean);
  check_range(limits, "peep", in.peep);
  check_range(limits, "height", in.height);
  check_range(limits, "weight", in.weight);
  check_range(limits, "bsa", in.bsa);
  if (in.age_years) limits.check_plausible_si("age", *in.age_years, Dimension::number);

  // 3. Contradictions between values.
  if (in.svo2 && in.sao2 && *in.svo2 >= *in.sao2) {
    throw InputError("svo2", pct(*in.svo2), "is not below SaO2 (" + pct(*in.sao2) + ")",
                     "a venous saturation below the arterial one; check that the samples "
                     "were not swapped");
  }
  if (in.pvo2 && in.pao2 && *in.pvo2 >= *in.pao2) {
    throw InputError(
        "pvo2", mm(*in.pvo2), "is not below PaO2 (" + mm(*in.pao2) + ")",
        "a venous PO2 below the arterial one; check that the samples were not swapped");
  }
  if (in.peco2 && in.paco2 && *in.peco2 >= *in.paco2) {
    throw InputError("peco2", mm(*in.peco2), "is not below PaCO2 (" + mm(*in.paco2) + ")",
                     "a mixed expired PCO2 below PaCO2 (an end-tidal value is not a mixed "
                     "expired one)");
  }
  const OxygenConstants c = oxygen_constants(limits);
  const Pressure pb = in.pb.value_or(c.barometric_pressure);
  const Pressure ph2o = in.ph2o.value_or(c.water_vapour);
  if (pb <= ph2o) {
    throw InputError(in.pb ? "pb" : "ph2o", mm(in.pb ? pb : ph2o),
                     in.pb ? "is not above the water vapour pressure (" + mm(ph2o) + ")"
                           : "is not below the barometric pressure (" + mm(pb) + ")",
                     "a barometric pressure above the water vapour pressure");
  }
}

OxygenResults analyse_oxygen(const OxygenInputs& in, const Thresholds& limits) {
  OxygenResults r;
  r.constants = oxygen_constants(limits);
  const VolumePerMass k = r.constants.hb_binding;
  const O2Solubility s = r.constants.o2_solubility;
  auto skip = [&](const char* key, const char* label, std::vector<std::string> needs) {
    r.skipped.push_back(Skipped{key, label, std::move(needs)});
  };

  // Constants of the alveolar gas equation: given, or the presets.
  if (in.pb) r.constants.barometric_pressure = *in.pb;
  if (in.ph2o) r.constants.water_vapour = *in.ph2o;
  if (in.rq) r.constants.respiratory_quotient = *in.rq;

  // ---- contents ----
  if (in.hb && in.sao2) {
    if (in.pao2) {
      r.cao2 = oxygen_content(*in.hb, *in.sao2, *in.pao2, k, s);
    } else {
      r.cao2 = haemoglobin_bound_oxygen(*in.hb, *in.sao2, k);
      r.notes.push_back(
          "CaO2 leaves out dissolved O2 because no --pao2 was given (about 0.3 mL/dL at a PaO2 "
          "of 100 mmHg, more on a high FiO2).");
    }
  } else {
    skip("cao2", "Arterial O2 content", {"--hb", "--sao2"});
  }
  if (in.hb && in.svo2) {
    if (in.pvo2) {
      r.cvo2 = oxygen_content(*in.hb, *in.svo2, *in.pvo2, k, s);
    } else {
      r.cvo2 = haemoglobin_bound_oxygen(*in.hb, *in.svo2, k);
      r.notes.push_back(
          "CvO2 leaves out dissolved O2 because no --pvo2 was given (small at venous PO2).");
    }
  } else {
    skip("cvo2", "Venous O2 content", {"--hb", "--svo2"});
  }

  // ---- body size and flows ----
  if (in.bsa) {
    r.bsa = in.bsa;
    if (in.height && in.weight) {
      r.notes.push_back("--bsa was given; height and weight were not used for body surface area.");
    }
  } else if (in.height && in.weight) {
    r.bsa = in.bsa_formula == BsaFormula::mosteller
                ? body_surface_area_mosteller(*in.weight, *in.height)
                : body_surface_area_du_bois(*in.weight, *in.height);
  } else {
    skip("bsa", "Body surface area", {"--height", "--weight"});
  }
  r.co_used = in.co;
  r.ci_used = in.ci;
  if (!r.ci_used && in.co && r.bsa) r.ci_used = indexed_to_bsa(*in.co, *r.bsa);
  if (!r.co_used && in.ci && r.bsa) {
    r.co_used = Flow(*in.ci * *r.bsa);
    r.notes.push_back("Cardiac output taken as CI x BSA (" +
                      format_number(in_L_per_min(*r.co_used), 2) + " L/min; no --co given).");
  }
  if (in.co && in.ci && r.bsa) {
    const double from_co = in_L_per_min_per_m2(indexed_to_bsa(*in.co, *r.bsa));
    const double given = in_L_per_min_per_m2(*in.ci);
    if (std::abs(from_co - given) > 0.1 * given) {
      r.notes.push_back("CO / BSA (" + format_number(from_co, 2) +
                        " L/min/m2) differs from the "
                        "given CI (" +
                        format_number(given, 2) +
                        " L/min/m2) by more than 10 %: check both; DO2 uses CO, DO2I uses CI.");
    }
  }

  if (r.co_used && r.cao2) {
    r.do2 = oxygen_delivery(*r.co_used, *r.cao2);
  } else {
    skip("do2", "O2 delivery (DO2)", {"--co (or --ci with --height, --weight)", "--hb", "--sao2"});
  }
  if (r.ci_used && r.cao2) {
    r.do2i = oxygen_delivery_index(*r.ci_used, *r.cao2);
  } else {
    skip("do2i", "O2 delivery index (DO2I)",
         {"--ci (or --co with --height, --weight)", "--hb", "--sao2"});
  }
  if (r.co_used && r.cao2 && r.cvo2) {
    r.vo2 = oxygen_consumption_fick(*r.co_used, *r.cao2, *r.cvo2);
    if (r.bsa) r.vo2i = indexed_to_bsa(*r.vo2, *r.bsa);
  } else {
    skip("vo2", "O2 consumption (VO2, Fick)", {"--co", "--hb", "--sao2", "--svo2"});
  }
  if (r.cao2 && r.cvo2) {
    r.o2_extraction = oxygen_extraction_ratio(*r.cao2, *r.cvo2);
  } else {
    skip("o2_extraction", "O2 extraction ratio", {"--hb", "--sao2", "--svo2"});
  }

  // ---- gas exchange ----
  if (in.fio2 && in.paco2) {
    r.pao2_alveolar = alveolar_oxygen_pressure(*in.fio2, r.constants.barometric_pressure,
                                               r.constants.water_vapour, *in.paco2,
                                               r.constants.respiratory_quotient);
    if (!in.pb || !in.ph2o || !in.rq) {
      auto mm0 = [](Pressure p) { return format_number(in_mmHg(p), 0) + " mmHg"; };
      r.notes.push_back("Alveolar gas equation used Pb " + mm0(r.constants.barometric_pressure) +
                        ", PH2O " + mm0(r.constants.water_vapour) + ", R " +
                        format_number(in_fraction(r.constants.respiratory_quotient), 2) +
                        " (presets where not given; set with --pb, --ph2o, --rq).");
    }
  } else {
    skip("pao2_alveolar", "Alveolar PO2 (PAO2)", {"--fio2", "--paco2"});
  }
  if (r.pao2_alveolar && in.pao2) {
    r.aa_gradient = alveolar_arterial_gradient(*r.pao2_alveolar, *in.pao2);
    if (*r.aa_gradient < mmHg(0.0)) {
      r.notes.push_back(
          "PaO2 is above the computed alveolar PO2: check FiO2, Pb, R and the "
          "sample; the A-a gradient and shunt fraction are not reliable.");
    }
  } else {
    skip("aa_gradient", "A-a gradient", {"--fio2", "--paco2", "--pao2"});
  }
  if (in.age_years) {
    r.aa_gradient_expected = expected_alveolar_arterial_gradient(*in.age_years);
    if (r.aa_gradient) {
      std::string note = "Expected A-a gradient for age " + format_number(*in.age_years, 0) +
                         " on room air is about " + mm(*r.aa_gradient_expected) +
                         " (age/4 + 4; textbook rule, from memory).";
      if (in.fio2 && in_fraction(*in.fio2) > 0.21 + 1e-9) {
        note += " The rule holds on room air; the gradient widens as FiO2 rises.";
      }
      r.notes.push_back(note);
    }
  }

  if (in.pao2 && in.fio2) {
    r.pf_ratio = pao2_fio2_ratio(*in.pao2, *in.fio2);
    BerlinReading b;
    b.category = berlin_category(*r.pf_ratio, limits);
    if (in.peep) {
      const Pressure peep_min = limits.get<Pressure>("oxygen.berlin_peep_min");
      b.peep_condition =
          in_cmH2O(*in.peep) >= in_cmH2O(peep_min) - 1e-9 ? GateState::met : GateState::failed;
    }
    r.berlin = b;
    // The Berlin adjustment divides by 760 mmHg itself, whatever the site's Pb preset.
    const Pressure sea_level = mmHg(760.0);
    const Pressure pb = r.constants.barometric_pressure;
    if (pb < sea_level) {
      const Pressure adjusted = *r.pf_ratio * Ratio(pb / sea_level);
      r.notes.push_back("Above 1000 m of altitude the Berlin definition adjusts P/F by Pb/" +
                        format_number(in_mmHg(sea_level), 0) + " (from memory): here " +
                        format_number(in_mmHg(adjusted), 0) +
                        " mmHg. The category shown uses the unadjusted ratio.");
    }
  } else {
    skip("pf_ratio", "PaO2/FiO2", {"--pao2", "--fio2"});
  }

  if (in.spo2 && in.fio2) {
    r.sf_ratio = spo2_fio2_ratio(*in.spo2, *in.fio2);
    r.sf_interpretable = *in.spo2 <= limits.get<Ratio>("oxygen.sf_spo2_max") + fraction(1e-12);
    if (!*r.sf_interpretable) {
      r.notes.push_back("SpO2 is above " +
                        format_number(in_percent(limits.get<Ratio>("oxygen.sf_spo2_max")), 0) +
                        " %" +
                        ": on the flat part of the dissociation curve SpO2/FiO2 does not track "
                        "PaO2/FiO2 and is not used as an ARDS criterion.");
    }
  } else {
    skip("sf_ratio", "SpO2/FiO2", {"--spo2", "--fio2"});
  }

  if (in.fio2 && in.pmean && in.pao2) {
    r.oxygenation_index = oxygenation_index(*in.fio2, *in.pmean, *in.pao2);
  } else {
    skip("oxygenation_index", "Oxygenation index (OI)", {"--fio2", "--pmean", "--pao2"});
  }
  if (in.fio2 && in.pmean && in.spo2) {
    r.oxygen_saturation_index = oxygen_saturation_index(*in.fio2, *in.pmean, *in.spo2);
  } else {
    skip("oxygen_saturation_index", "Oxygen saturation index (OSI)",
         {"--fio2", "--pmean", "--spo2"});
  }

  if (in.hb && r.pao2_alveolar && r.cao2 && in.pao2 && r.cvo2) {
    r.cco2 = end_capillary_oxygen_content(*in.hb, *r.pao2_alveolar, k, s);
    if (*r.cco2 > *r.cao2 && *r.cco2 > *r.cvo2) {
      r.shunt_fraction = shunt_fraction(*r.cco2, *r.cao2, *r.cvo2);
      r.notes.push_back(
          "Shunt fraction: at FiO2 below 1.0 it is venous admixture (true shunt plus low "
          "V/Q units); it needs a mixed venous sample, and a central venous one (ScvO2) only "
          "approximates it.");
    } else {
      r.notes.push_back("Shunt fraction not computed: the end-capillary O2 content (" +
                        content(*r.cco2) + ") is not above the arterial one (" + content(*r.cao2) +
                        "); check FiO2, Pb and the samples.");
    }
  } else {
    skip("shunt_fraction", "Shunt fraction (Qs/Qt)",
         {"--hb", "--sao2", "--pao2", "--svo2", "--fio2", "--paco2"});
  }

  if (in.paco2 && in.peco2) {
    r.dead_space_fraction = dead_space_fraction_bohr_enghoff(*in.paco2, *in.peco2);
  } else {
    skip("dead_space_fraction", "Dead-space fraction (VD/VT, Bohr-Enghoff)",
         {"--paco2", "--peco2"});
  }
  return r;
}

std::vector<Flag> oxygen_flags(const OxygenInputs& in, const OxygenResults& r,
                               const Thresholds& limits) {
  std::vector<Flag> flags;
  if (r.pf_ratio && r.berlin && r.berlin->category != BerlinCategory::none &&
      r.berlin->peep_condition != GateState::failed) {
    const Pressure mild_max = limits.get<Pressure>("oxygen.berlin_mild_max");
    flags.push_back({"pf_ratio",
                     "PaO2/FiO2 " + format_number(in_mmHg(*r.pf_ratio), 0) +
                         " mmHg is at or below " + format_number(in_mmHg(mild_max), 0) +
                         " mmHg, the ARDS oxygenation range",
                     limits.source("oxygen.berlin_mild_max")});
  }
  if (r.sf_ratio && r.sf_interpretable && *r.sf_interpretable) {
    const double sf_max = limits.number("oxygen.sf_ratio_ards_max");
    if (*r.sf_ratio <= sf_max + 1e-9) {
      flags.push_back({"sf_ratio",
                       "SpO2/FiO2 " + format_number(*r.sf_ratio, 0) + " is at or below " +
                           format_number(sf_max, 0) + " with SpO2 at or below " +
                           format_number(in_percent(limits.get<Ratio>("oxygen.sf_spo2_max")), 0) +
                           " %" + ", the ARDS oxygenation criterion of the global definition",
                       limits.source("oxygen.sf_ratio_ards_max")});
    }
  }
  if (r.o2_extraction) {
    const Ratio low = limits.get<Ratio>("oxygen.o2_extraction_normal_low");
    const Ratio high = limits.get<Ratio>("oxygen.o2_extraction_normal_high");
    const std::string range =
        format_number(in_fraction(low), 2) + "-" + format_number(in_fraction(high), 2);
    if (*r.o2_extraction > high) {
      flags.push_back({"o2_extraction",
                       "O2 extraction " + format_number(in_fraction(*r.o2_extraction), 2) +
                           " is above the usual " + range,
                       limits.source("oxygen.o2_extraction_normal_high")});
    } else if (*r.o2_extraction < low) {
      flags.push_back({"o2_extraction",
                       "O2 extraction " + format_number(in_fraction(*r.o2_extraction), 2) +
                           " is below the usual " + range,
                       limits.source("oxygen.o2_extraction_normal_low")});
    }
  }
  if (r.do2i) {
    const double low = limits.number("oxygen.do2i_normal_low_ml_per_min_per_m2");
    if (in_mL_per_min_per_m2(*r.do2i) < low) {
      flags.push_back({"do2i",
                       "DO2I " + format_number(in_mL_per_min_per_m2(*r.do2i), 0) +
                           " mL/min/m2 is below the usual lower end of " + format_number(low, 0) +
                           " mL/min/m2",
                       limits.source("oxygen.do2i_normal_low_ml_per_min_per_m2")});
    }
  }
  (void)in;
  return flags;
}

namespace {

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
  if (in.peep) a.inputs.push_back({"peep", as_cmH2O(*in.peep)});
  if (in.sex) a.inputs.push_back({"sex", std::string(*in.sex == Sex::male ? "male" : "female")});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height)});
  if (in.weight) a.inputs.push_back({"weight", as_kg(*in.weight)});
  if (in.bsa) a.inputs.push_back({"bsa", as_m2(*in.bsa)});
  if (in.age_years) a.inputs.push_back({"age", as_number(*in.age_years, 0)});
}

// The Berlin PEEP condition as a gate, and the category as the reading.
void add_berlin(const OxygenInputs& in, const OxygenResults& r, const Thresholds& limits,
                Answer& a) {
  if (!r.pf_ratio || !r.berlin) return;
  const Pressure peep_min = limits.get<Pressure>("oxygen.berlin_peep_min");
  const std::string peep_min_text = format_number(in_cmH2O(peep_min), 0) + " cmH2O";
  Gate g;
  g.key = "berlin_peep";
  g.label = "PEEP at least " + peep_min_text + " (Berlin definition)";
  g.state = r.berlin->peep_condition;
  g.source = limits.source("oxygen.berlin_peep_min");
  if (in.peep) {
    g.detail = "PEEP " + cm(*in.peep);
  } else {
    g.detail = "no --peep given";
  }
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

  Reading reading;
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
      reading.category = to_string(c);
      reading.text = "Conditional: " + pf + " falls in the Berlin category " + band +
                     ", which applies only with PEEP of at least " + peep_min_text +
                     "; no PEEP was given (--peep)." + caveat;
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

}  // namespace

Answer describe_oxygen(const OxygenInputs& in, const OxygenResults& r, const Thresholds& limits) {
  Answer a;
  a.command = "calc oxygen";
  a.title = "oxygen transport and gas exchange";
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
      "bsa", "Body surface area", r.bsa, [](Area x) { return as_m2(x); },
      in.bsa ? "given" : (in.bsa_formula == BsaFormula::mosteller ? "Mosteller" : "Du Bois"));
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
  add("vo2", "O2 consumption (VO2, reverse Fick)", r.vo2, [](Flow f) { return as_mL_per_min(f); });
  add("vo2i", "O2 consumption index (VO2I)", r.vo2i,
      [](FlowPerArea f) { return as_mL_per_min_per_m2(f); });
  add("o2_extraction", "O2 extraction ratio", r.o2_extraction,
      [](Ratio x) { return as_fraction(x); });
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
    sf_note = "SpO2 above " +
              format_number(in_percent(limits.get<Ratio>("oxygen.sf_spo2_max")), 0) +
              " %: not an ARDS criterion";
  }
  add(
      "sf_ratio", "SpO2/FiO2", r.sf_ratio, [](double x) { return as_number(x, 0); }, sf_note);
  add("oxygenation_index", "Oxygenation index (OI)", r.oxygenation_index,
      [](double x) { return as_number(x, 1); });
  add("oxygen_saturation_index", "Oxygen saturation index (OSI)", r.oxygen_saturation_index,
      [](double x) { return as_number(x, 1); });
  add(
      "cco2", "End-capillary O2 content (Cc'O2)", r.shunt_fraction ? r.cco2 : std::nullopt,
      [](Ratio c) { return as_mL_per_dL(c); }, "from PAO2, Sc'O2 = 1");
  add("shunt_fraction", "Shunt fraction (Qs/Qt)", r.shunt_fraction,
      [](Ratio x) { return as_fraction(x); });
  add(
      "dead_space_fraction", "Dead-space fraction (VD/VT, Bohr-Enghoff)", r.dead_space_fraction,
      [](Ratio x) { return as_fraction(x); }, "PECO2 must be mixed expired");
  a.skipped = r.skipped;
  add_berlin(in, r, limits, a);
  a.flags = oxygen_flags(in, r, limits);
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
