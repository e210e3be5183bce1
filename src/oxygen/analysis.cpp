// Oxygen transport and gas exchange from whatever was measured: validation,
// results and the limits they breach. Words for people: src/present/oxygen_answer.cpp.
#include <cmath>
#include <cstdio>

#include "breathbeat/cutoff.hpp"
#include "breathbeat/errors.hpp"
#include "breathbeat/oxygen.hpp"
#include "breathbeat/text/strings.hpp"

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

// Values that cannot be real, even when implausible values are allowed.
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

// The plausible range of a field (presets/plausibility.toml); `range` when the
// range has another name than the field (peep_total uses "peep"). The error
// names the field.
template <class Q>
void check_range(const Thresholds& limits, const char* field, const std::optional<Q>& q,
                 const char* range = nullptr) {
  if (!q) return;
  if (!range) {
    limits.check_plausible(field, *q);
    return;
  }
  try {
    limits.check_plausible(range, *q);
  } catch (const InputError& e) {
    throw InputError(field, e.value(), e.problem(), e.expected(), e.where());
  }
}

}  // namespace

void validate_oxygen(const OxygenInputs& in, const Thresholds& limits) {
  // 1. Impossible values, refused even when implausible values are allowed.
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
  check_range(limits, "peep_total", in.peep, "peep");  // the range of PEEP
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
  auto skip = [&](const char* key, const char* label, std::vector<Need> needs) {
    r.skipped.push_back(Skipped{key, label, std::move(needs)});
  };
  auto note = [&](OxygenNote n) { r.notes.push_back(n); };

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
      note(OxygenNote::cao2_without_dissolved);
    }
  } else {
    skip("cao2", "Arterial O2 content", {{"hb"}, {"sao2"}});
  }
  if (in.hb && in.svo2) {
    if (in.pvo2) {
      r.cvo2 = oxygen_content(*in.hb, *in.svo2, *in.pvo2, k, s);
    } else {
      r.cvo2 = haemoglobin_bound_oxygen(*in.hb, *in.svo2, k);
      note(OxygenNote::cvo2_without_dissolved);
    }
  } else {
    skip("cvo2", "Venous O2 content", {{"hb"}, {"svo2"}});
  }

  // ---- body size and flows ----
  if (const auto used = body_surface_area_used(in.bsa, in.height, in.weight, in.bsa_formula)) {
    r.bsa = used->value;
    r.bsa_origin = used->origin;
    if (used->height_weight_unused) note(OxygenNote::bsa_given_over_height_weight);
  } else {
    skip("bsa", "Body surface area", {{"height"}, {"weight"}});
  }
  r.co_used = in.co;
  r.ci_used = in.ci;
  if (!r.ci_used && in.co && r.bsa) r.ci_used = cardiac_index(*in.co, *r.bsa);
  if (!r.co_used && in.ci && r.bsa) {
    r.co_used = cardiac_output_from_index(*in.ci, *r.bsa);
    note(OxygenNote::co_from_ci_and_bsa);
  }
  if (in.co && in.ci && r.bsa) {
    r.ci_from_co = cardiac_index(*in.co, *r.bsa);
    const double from_co = in_L_per_min_per_m2(*r.ci_from_co);
    const double given = in_L_per_min_per_m2(*in.ci);
    // More than 10 % apart (common practice, no source).
    if (cutoff::above(std::abs(from_co - given), 0.1 * given)) {
      note(OxygenNote::ci_differs_from_co_over_bsa);
    }
  }

  if (r.co_used && r.cao2) {
    r.do2 = oxygen_delivery(*r.co_used, *r.cao2);
  } else {
    skip("do2", "O2 delivery (DO2)", {{"co", "", {"ci", "height", "weight"}}, {"hb"}, {"sao2"}});
  }
  if (r.ci_used && r.cao2) {
    r.do2i = oxygen_delivery_index(*r.ci_used, *r.cao2);
  } else {
    skip("do2i", "O2 delivery index (DO2I)",
         {{"ci", "", {"co", "height", "weight"}}, {"hb"}, {"sao2"}});
  }
  // The arteriovenous difference takes the same kind of content on both sides: with
  // dissolved O2 only when both PO2s are given, otherwise Hb-bound O2 alone on both sides
  // (dissolved O2 on the arterial side only would bias VO2 and extraction upward).
  std::optional<Ratio> cao2_av, cvo2_av;
  if (r.cao2 && r.cvo2) {
    if (in.pao2 && in.pvo2) {
      r.av_content_basis = O2ContentBasis::with_dissolved;
      cao2_av = r.cao2;
      cvo2_av = r.cvo2;
    } else {
      r.av_content_basis = O2ContentBasis::haemoglobin_bound;
      cao2_av = haemoglobin_bound_oxygen(*in.hb, *in.sao2, k);
      cvo2_av = haemoglobin_bound_oxygen(*in.hb, *in.svo2, k);
    }
  }
  if (r.co_used && cao2_av && cvo2_av) {
    r.vo2 = oxygen_consumption_fick(*r.co_used, *cao2_av, *cvo2_av);
    if (r.bsa) r.vo2i = indexed_to_bsa(*r.vo2, *r.bsa);
  } else {
    skip("vo2", "O2 consumption (VO2, Fick)", {{"co"}, {"hb"}, {"sao2"}, {"svo2"}});
  }
  if (cao2_av && cvo2_av) {
    r.o2_extraction = oxygen_extraction_ratio(*cao2_av, *cvo2_av);
    if (r.av_content_basis == O2ContentBasis::haemoglobin_bound)
      note(OxygenNote::av_difference_haemoglobin_bound);
  } else {
    skip("o2_extraction", "O2 extraction ratio", {{"hb"}, {"sao2"}, {"svo2"}});
  }

  // ---- gas exchange ----
  if (in.fio2 && in.paco2) {
    r.pao2_alveolar = alveolar_oxygen_pressure(*in.fio2, r.constants.barometric_pressure,
                                               r.constants.water_vapour, *in.paco2,
                                               r.constants.respiratory_quotient);
    if (!in.pb || !in.ph2o || !in.rq) note(OxygenNote::alveolar_gas_presets);
  } else {
    skip("pao2_alveolar", "Alveolar PO2 (PAO2)", {{"fio2"}, {"paco2"}});
  }
  if (r.pao2_alveolar && in.pao2) {
    r.aa_gradient = alveolar_arterial_gradient(*r.pao2_alveolar, *in.pao2);
    if (*r.aa_gradient < mmHg(0.0)) note(OxygenNote::pao2_above_alveolar);
  } else {
    skip("aa_gradient", "A-a gradient", {{"fio2"}, {"paco2"}, {"pao2"}});
  }
  if (in.age_years) {
    r.aa_gradient_expected = expected_alveolar_arterial_gradient(*in.age_years);
    if (r.aa_gradient) {
      // The rule is for room air (FiO2 0.21).
      const bool on_oxygen = in.fio2 && cutoff::above(in_fraction(*in.fio2), 0.21);
      note(on_oxygen ? OxygenNote::aa_gradient_expected_on_oxygen
                     : OxygenNote::aa_gradient_expected);
    }
  }

  if (in.pao2 && in.fio2) {
    r.pf_ratio = pao2_fio2_ratio(*in.pao2, *in.fio2);
    BerlinReading b;
    b.category = berlin_category(*r.pf_ratio, limits);
    if (in.peep) {
      const Pressure peep_min = limits.get<Pressure>("oxygen.berlin_peep_min");
      b.peep_condition = cutoff::at_least(in_cmH2O(*in.peep), in_cmH2O(peep_min))
                             ? GateState::met
                             : GateState::failed;
    }
    r.berlin = b;
    // The Berlin adjustment divides by 760 mmHg itself, whatever the site's Pb preset.
    const Pressure sea_level = berlin_sea_level_pressure();
    const Pressure pb = r.constants.barometric_pressure;
    if (cutoff::below(in_mmHg(pb), in_mmHg(sea_level))) {
      r.pf_ratio_altitude_adjusted = *r.pf_ratio * Ratio(pb / sea_level);
      note(OxygenNote::pf_altitude_adjusted);
    }
  } else {
    skip("pf_ratio", "PaO2/FiO2", {{"pao2"}, {"fio2"}});
  }

  if (in.spo2 && in.fio2) {
    r.sf_ratio = spo2_fio2_ratio(*in.spo2, *in.fio2);
    r.sf_interpretable = cutoff::at_most(in_fraction(*in.spo2),
                                         in_fraction(limits.get<Ratio>("oxygen.sf_spo2_max")));
    if (!*r.sf_interpretable) note(OxygenNote::sf_spo2_above_limit);
  } else {
    skip("sf_ratio", "SpO2/FiO2", {{"spo2"}, {"fio2"}});
  }

  if (in.fio2 && in.pmean && in.pao2) {
    r.oxygenation_index = oxygenation_index(*in.fio2, *in.pmean, *in.pao2);
  } else {
    skip("oxygenation_index", "Oxygenation index (OI)", {{"fio2"}, {"pmean"}, {"pao2"}});
  }
  if (in.fio2 && in.pmean && in.spo2) {
    r.oxygen_saturation_index = oxygen_saturation_index(*in.fio2, *in.pmean, *in.spo2);
  } else {
    skip("oxygen_saturation_index", "Oxygen saturation index (OSI)",
         {{"fio2"}, {"pmean"}, {"spo2"}});
  }
  if (in.pmean_estimated && (r.oxygenation_index || r.oxygen_saturation_index))
    note(OxygenNote::pmean_estimated);

  if (in.hb && r.pao2_alveolar && r.cao2 && in.pao2 && r.cvo2) {
    r.cco2 = end_capillary_oxygen_content(*in.hb, *r.pao2_alveolar, k, s);
    if (*r.cco2 > *r.cao2 && *r.cco2 > *r.cvo2) {
      r.shunt_fraction = shunt_fraction(*r.cco2, *r.cao2, *r.cvo2);
      note(OxygenNote::shunt_is_venous_admixture);
    } else {
      note(OxygenNote::shunt_not_computed);
    }
  } else {
    skip("shunt_fraction", "Shunt fraction (Qs/Qt)",
         {{"hb"}, {"sao2"}, {"pao2"}, {"svo2"}, {"fio2"}, {"paco2"}});
  }

  if (in.paco2 && in.peco2) {
    r.dead_space_fraction = dead_space_fraction_bohr_enghoff(*in.paco2, *in.peco2);
  } else {
    skip("dead_space_fraction", "Dead-space fraction (VD/VT, Bohr-Enghoff)",
         {{"paco2"}, {"peco2"}});
  }
  return r;
}

const char* threshold_key(OxygenLimit l) {
  switch (l) {
    case OxygenLimit::pf_ratio_ards:
      return "oxygen.berlin_mild_max";
    case OxygenLimit::sf_ratio_ards:
      return "oxygen.sf_ratio_ards_max";
    case OxygenLimit::o2_extraction_high:
      return "oxygen.o2_extraction_normal_high";
    case OxygenLimit::o2_extraction_low:
      return "oxygen.o2_extraction_normal_low";
    case OxygenLimit::do2i_low:
      return "oxygen.do2i_normal_low_ml_per_min_per_m2";
  }
  return "";
}

std::vector<OxygenLimit> oxygen_breaches(const OxygenInputs& in, const OxygenResults& r,
                                         const Thresholds& limits) {
  (void)in;
  std::vector<OxygenLimit> out;
  if (r.pf_ratio && r.berlin && r.berlin->category != BerlinCategory::none &&
      r.berlin->peep_condition != GateState::failed) {
    out.push_back(OxygenLimit::pf_ratio_ards);
  }
  if (r.sf_ratio && r.sf_interpretable && *r.sf_interpretable &&
      cutoff::at_most(*r.sf_ratio, limits.number(threshold_key(OxygenLimit::sf_ratio_ards)))) {
    out.push_back(OxygenLimit::sf_ratio_ards);
  }
  if (r.o2_extraction) {
    const double x = in_fraction(*r.o2_extraction);
    if (cutoff::above(
            x, in_fraction(limits.get<Ratio>(threshold_key(OxygenLimit::o2_extraction_high))))) {
      out.push_back(OxygenLimit::o2_extraction_high);
    } else if (cutoff::below(x, in_fraction(limits.get<Ratio>(
                                    threshold_key(OxygenLimit::o2_extraction_low))))) {
      out.push_back(OxygenLimit::o2_extraction_low);
    }
  }
  if (r.do2i && cutoff::below(in_mL_per_min_per_m2(*r.do2i),
                              limits.number(threshold_key(OxygenLimit::do2i_low)))) {
    out.push_back(OxygenLimit::do2i_low);
  }
  return out;
}

}  // namespace bb
