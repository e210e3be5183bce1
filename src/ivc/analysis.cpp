// IVC analysis: validation, indices, the RAP estimate, the validity gates and
// the reading shown to the user.
#include <cmath>

#include "breathbeat/cautions.hpp"
#include "breathbeat/ivc.hpp"

namespace bb {

namespace {

std::string shown_cm(Length l) {
  return format_number(in_cm(l), 2) + " cm";
}
std::string shown_percent(Ratio r) {
  return format_number(in_percent(r), 1) + " %";
}

void require_positive(const std::optional<Length>& d, const char* field) {
  if (!d || d->value() > 0.0) return;
  throw InputError(field, shown_cm(*d), "is not above zero",
                   "a diameter above zero, in cm (default) or mm");
}

// ---- gates --------------------------------------------------------------------

Gate stated_absent(const char* key, const char* label, const std::optional<bool>& present,
                   const char* yes_flag, const char* no_flag, const char* failed_detail,
                   const char* source) {
  Gate g{key, label, GateState::unknown, "", source};
  if (!present) {
    g.detail = std::string("not stated (") + no_flag + " or " + yes_flag + ")";
  } else if (*present) {
    g.state = GateState::failed;
    g.detail = failed_detail;
  } else {
    g.state = GateState::met;
    g.detail = "stated absent";
  }
  return g;
}

Gate passive_gate(const IvcInputs& in) {
  Gate g{"passive", "Fully passive patient (no breathing effort)", GateState::unknown, "",
         "Barbier et al., Intensive Care Med 2004;30:1740; Feissel et al., Intensive Care Med "
         "2004;30:1834 (both studied fully ventilated, passive patients)"};
  if (in.breathing == Breathing::spontaneous) {
    g.state = GateState::failed;
    g.detail = "the patient breathes spontaneously";
  } else if (!in.effort_seen) {
    g.detail = "not stated (--no-effort or --effort)";
  } else if (*in.effort_seen) {
    g.state = GateState::failed;
    g.detail = "breathing effort was seen";
  } else {
    g.state = GateState::met;
    g.detail = "stated: no breathing effort";
  }
  return g;
}

Gate tidal_volume_gate(const IvcInputs& in, const Thresholds& limits) {
  const auto vt_min = limits.get<VolumePerMass>("ivc.vt_per_kg_min");
  const std::string floor = format_number(in_mL_per_kg(vt_min), 1) + " mL/kg";
  Gate g{"vt_per_kg", "Tidal volume at least " + floor, GateState::unknown, "",
         limits.source("ivc.vt_per_kg_min")};
  if (!in.vt_per_kg) {
    g.detail = "not given (--vt-per-kg)";
    return g;
  }
  const std::string given = format_number(in_mL_per_kg(*in.vt_per_kg), 1) + " mL/kg";
  const bool met = in.vt_per_kg->value() >= vt_min.value() * (1.0 - 1e-9);
  g.state = met ? GateState::met : GateState::failed;
  g.detail = given + (met ? " (at or above " : " (below ") + floor + ")";
  return g;
}

// ---- reading ------------------------------------------------------------------

std::vector<std::string> keys_with(const std::vector<Gate>& gates, GateState state) {
  std::vector<std::string> out;
  for (const auto& g : gates) {
    if (g.state == state) out.push_back(g.key);
  }
  return out;
}

std::string joined(const std::vector<std::string>& words) {
  std::string out;
  for (const auto& w : words) out += (out.empty() ? "" : ", ") + w;
  return out;
}

Reading passive_reading(const IvcResults& r, const Thresholds& limits) {
  const std::vector<std::string> failed = keys_with(r.gates, GateState::failed);
  if (!failed.empty()) {
    return Reading{"ivc", kIvcNotInterpretable,
                   "Not interpretable: a condition of the IVC indices is not met (" +
                       joined(failed) + "). Do not use IVC distensibility or variation here.",
                   failed};
  }
  const Ratio dist_cut = limits.get<Ratio>("ivc.distensibility_responsive_above");
  const Ratio var_cut = limits.get<Ratio>("ivc.variation_responsive_above");
  const bool dist_above = *r.distensibility > dist_cut;
  const bool var_above = *r.variation > var_cut;
  const std::string values = "distensibility " + shown_percent(*r.distensibility) +
                             (dist_above ? " > " : " <= ") + shown_percent(dist_cut) +
                             ", variation " + shown_percent(*r.variation) +
                             (var_above ? " > " : " <= ") + shown_percent(var_cut);
  Reading reading{"ivc", "", "", {"ivc_distensibility", "ivc_variation"}};
  if (dist_above && var_above) {
    reading.category = kIvcResponsive;
    reading.text = "Likely preload responsive (" + values + ").";
  } else if (!dist_above && !var_above) {
    reading.category = kIvcNotResponsive;
    reading.text = "Preload responsiveness not shown by the IVC (" + values + ").";
  } else {
    reading.category = kIvcDiscordant;
    reading.text =
        "The two IVC indices disagree (" + values + "); no conclusion from the IVC alone.";
  }
  const std::vector<std::string> unknown = keys_with(r.gates, GateState::unknown);
  if (!unknown.empty()) {
    reading.text += " Holds only if the unconfirmed conditions are met (" + joined(unknown) + ").";
  }
  return reading;
}

Reading ivc_reading(const IvcInputs& in, const IvcResults& r, const Thresholds& limits) {
  if (!r.distensibility) {
    return Reading{
        "ivc", kIvcNotInterpretable, "No IVC diameters were given (--dmax, --dmin).", {}};
  }
  if (!in.breathing) {
    return Reading{"ivc",
                   kIvcNotInterpretable,
                   "The breathing mode was not stated (--breathing passive|spontaneous); which "
                   "index applies depends on it.",
                   {}};
  }
  if (*in.breathing == Breathing::spontaneous) {
    return Reading{"ivc",
                   kIvcNotApplicable,
                   "Spontaneous breathing: the responsiveness cut-offs of distensibility and "
                   "variation were found in passive ventilation and do not apply. Collapsibility "
                   "serves the right-atrial pressure estimate.",
                   {"ivc_collapsibility"}};
  }
  return passive_reading(r, limits);
}

}  // namespace

void validate_ivc(const IvcInputs& in, const Thresholds& limits) {
  require_positive(in.dmax, "dmax");
  require_positive(in.dmin, "dmin");
  if (in.dmax && in.dmin && *in.dmin > *in.dmax) {
    throw InputError("dmin", shown_cm(*in.dmin), "is larger than Dmax (" + shown_cm(*in.dmax) + ")",
                     "Dmin at or below Dmax: Dmax is the widest and Dmin the narrowest diameter "
                     "over the breath");
  }
  if (in.vt_per_kg && in.vt_per_kg->value() <= 0.0) {
    throw InputError("vt_per_kg", format_number(in_mL_per_kg(*in.vt_per_kg), 1) + " mL/kg",
                     "is not above zero", "a tidal volume per kg above zero, in mL/kg");
  }
  if (in.breathing == Breathing::spontaneous && in.effort_seen == false) {
    throw InputError("--no-effort", "given with --breathing spontaneous",
                     "contradicts spontaneous breathing",
                     "--no-effort only for a passive, fully ventilated patient");
  }
  if (in.dmax) limits.check_plausible("dmax", *in.dmax);
  if (in.dmin) limits.check_plausible("dmin", *in.dmin);
  if (in.vt_per_kg) limits.check_plausible("vt_per_kg", *in.vt_per_kg);
}

std::vector<Gate> ivc_gates(const IvcInputs& in, const Thresholds& limits) {
  return {
      passive_gate(in),
      tidal_volume_gate(in, limits),
      stated_absent("no_iah", "No intra-abdominal hypertension", in.iah, "--iah", "--no-iah",
                    "intra-abdominal hypertension is present: raised abdominal pressure "
                    "compresses the IVC",
                    "common practice, no source"),
      stated_absent("no_rv_failure", "No severe RV failure or tricuspid regurgitation",
                    in.rv_failure, "--rv-failure", "--no-rv-failure",
                    "severe RV failure or TR is present: a congested IVC varies little "
                    "whatever the preload",
                    "common practice, no source"),
  };
}

IvcResults analyse_ivc(const IvcInputs& in, const Thresholds& limits) {
  IvcResults r;
  r.gates = ivc_gates(in, limits);
  if (in.dmax && in.dmin) {
    r.collapsibility = ivc_collapsibility(*in.dmax, *in.dmin);
    r.distensibility = ivc_distensibility(*in.dmax, *in.dmin);
    r.variation = ivc_respiratory_variation(*in.dmax, *in.dmin);
  } else {
    r.skipped.push_back(Skipped{"ivc_collapsibility", "IVC collapsibility", {"--dmax", "--dmin"}});
    r.skipped.push_back(Skipped{"ivc_distensibility", "IVC distensibility", {"--dmax", "--dmin"}});
    r.skipped.push_back(
        Skipped{"ivc_variation", "IVC respiratory variation", {"--dmax", "--dmin"}});
  }
  r.collapsibility_applies = in.breathing == Breathing::spontaneous;
  r.distensibility_applies = in.breathing == Breathing::passive;
  r.variation_applies = in.breathing == Breathing::passive;

  if (in.breathing == Breathing::spontaneous && r.collapsibility) {
    r.rap = right_atrial_pressure_from_ivc(*in.dmax, *r.collapsibility, limits);
    r.notes.push_back(
        "The ASE table judges collapse with a sniff; collapse over quiet breathing is often "
        "smaller and may place the estimate one band too high.");
  } else {
    r.skipped.push_back(Skipped{"rap_estimate",
                                "Right-atrial pressure estimate (spontaneous breathing only)",
                                {"--breathing spontaneous", "--dmax", "--dmin"}});
  }
  if (in.breathing == Breathing::passive) {
    r.notes.push_back(
        "Collapsibility is shown for completeness; in passive ventilation the IVC widens "
        "on inspiration and distensibility and variation are the indices that apply.");
  } else if (in.breathing == Breathing::spontaneous) {
    r.notes.push_back(
        "Distensibility and variation are shown for completeness; their cut-offs apply only "
        "in passive ventilation.");
  }
  r.notes.push_back(
      "Measure the IVC 1-2 cm caudal to the hepatic vein junction (ASE, from "
      "memory), in the same view at both phases of the breath.");
  r.reading = ivc_reading(in, r, limits);
  return r;
}

namespace {

void add_inputs(const IvcInputs& in, Answer& a) {
  auto stated = [](const std::optional<bool>& b, const char* yes, const char* no) {
    return std::string(!b ? "not stated" : (*b ? yes : no));
  };
  if (in.dmax) a.inputs.push_back({"dmax", as_cm(*in.dmax, 2)});
  if (in.dmin) a.inputs.push_back({"dmin", as_cm(*in.dmin, 2)});
  a.inputs.push_back(
      {"breathing", std::string(in.breathing ? to_string(*in.breathing) : "not stated")});
  if (in.vt_per_kg) a.inputs.push_back({"vt_per_kg", as_mL_per_kg(*in.vt_per_kg)});
  a.inputs.push_back({"effort", stated(in.effort_seen, "seen", "none")});
  a.inputs.push_back({"iah", stated(in.iah, "present", "absent")});
  a.inputs.push_back({"rv_failure", stated(in.rv_failure, "present", "absent")});
}

std::string applicability(bool applies, const std::optional<Breathing>& breathing,
                          const std::string& cut) {
  if (!breathing) return "breathing mode not stated";
  if (!applies) return std::string("not applicable (") + to_string(*breathing) + ")";
  return cut;
}

}  // namespace

Answer describe_ivc(const IvcInputs& in, const IvcResults& r, const Thresholds& limits) {
  Answer a;
  a.command = "calc ivc";
  a.title = "inferior vena cava";
  add_inputs(in, a);
  const std::string dist_cut =
      "> " + shown_percent(limits.get<Ratio>("ivc.distensibility_responsive_above")) +
      ", Barbier 2004";
  const std::string var_cut =
      "> " + shown_percent(limits.get<Ratio>("ivc.variation_responsive_above")) + ", Feissel 2004";
  if (r.collapsibility) {
    a.results.push_back(Item{
        "ivc_collapsibility", "IVC collapsibility (Dmax-Dmin)/Dmax", as_percent(*r.collapsibility),
        applicability(r.collapsibility_applies, in.breathing, "RAP estimate, Rudski 2010")});
    a.results.push_back(Item{"ivc_distensibility", "IVC distensibility (Dmax-Dmin)/Dmin",
                             as_percent(*r.distensibility),
                             applicability(r.distensibility_applies, in.breathing, dist_cut)});
    a.results.push_back(Item{"ivc_variation", "IVC respiratory variation (Dmax-Dmin)/mean",
                             as_percent(*r.variation),
                             applicability(r.variation_applies, in.breathing, var_cut)});
  }
  if (r.rap) {
    Shown rap = as_mmHg(r.rap->value);
    rap.low = in_mmHg(r.rap->low);
    rap.high = in_mmHg(r.rap->high);
    a.results.push_back(Item{"rap_estimate", "Right-atrial pressure estimate", rap,
                             r.rap->band + " band, Rudski 2010"});
  }
  a.skipped = r.skipped;
  a.gates = r.gates;
  a.reading = r.reading;
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
