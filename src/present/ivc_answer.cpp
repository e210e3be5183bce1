// The inferior vena cava in words: labels, applicability, the fields an
// unknown gate or a reading lacking inputs needs, and notes as sentences. The
// numbers, gates and reading come from src/ivc/.
#include "breathbeat/present/ivc.hpp"

#include "breathbeat/cautions.hpp"
#include "breathbeat/present/gate_words.hpp"

namespace bb {

namespace {

std::string shown_percent(Ratio r) {
  return format_number(in_percent(r), 1) + " %";
}

// The field a gate or the reading needs, as the reader states it. On the
// command line a true/false fact lists first the option that meets the gate
// ("--no-iah or --iah"); in a trial file its key.
std::string stated_by(std::string_view id, bool met_when_yes, FieldContext context) {
  const FieldSpec& f = field_spec(id);
  if (context == FieldContext::command_line && f.kind == FieldKind::flag) {
    return met_when_yes ? std::string(f.yes) + " or " + std::string(f.no)
                        : std::string(f.no) + " or " + std::string(f.yes);
  }
  return field_name(id, context);
}

// What an unknown gate needs. The tidal volume per kg is an option of calc
// ivc; a trial report computes it from the patient's sex and height and the
// ventilator's tidal volume.
std::string gate_needs(const std::string& key, FieldContext context) {
  if (key == kIvcGatePassive) return stated_by("passive", true, context);
  if (key == kIvcGateNoIah) return stated_by("iah", false, context);
  if (key == kIvcGateNoRvFailure) return stated_by("rv_failure", false, context);
  if (key == kIvcGateVtPerKg) {
    if (context == FieldContext::trial_file) {
      return field_name("sex", context) + ", " + field_name("height", context) + ", " +
             field_name("vt", context);
    }
    return field_name("vt_per_kg", context);
  }
  return "";
}

std::vector<ShownGate> gates_in_words(const std::vector<Gate>& gates, FieldContext context) {
  std::vector<ShownGate> out = shown_gates(gates);
  for (ShownGate& g : out) {
    if (g.state != GateState::unknown) continue;
    const std::string needs = gate_needs(g.key, context);
    if (!needs.empty()) g.detail += " (" + needs + ")";
  }
  return out;
}

std::string choices_of(std::string_view id) {
  std::string out;
  for (const auto& w : choice_words(field_spec(id))) out += (out.empty() ? "" : "|") + w;
  return out;
}

ShownReading reading_in_words(const IvcInputs& in, const IvcResults& r, FieldContext context) {
  ShownReading reading = shown_reading(r.reading);
  if (!r.distensibility) {
    reading.text = "No IVC diameters were given (" + field_name("ivc_dmax", context) + ", " +
                   field_name("ivc_dmin", context) + ").";
  } else if (!in.breathing) {
    const std::string breathing =
        context == FieldContext::command_line
            ? field_name("ivc_breathing", context) + " " + choices_of("ivc_breathing")
            : field_name("ivc_breathing", context);
    reading.text = "The breathing state was not stated (" + breathing +
                   "); which index applies depends on it.";
  }
  return reading;
}

std::string stated(const std::optional<bool>& b, const char* yes, const char* no) {
  return !b ? "not stated" : (*b ? yes : no);
}

void add_inputs(const IvcInputs& in, Answer& a) {
  if (in.dmax) a.inputs.push_back({"ivc_dmax", as_cm(*in.dmax, 2)});
  if (in.dmin) a.inputs.push_back({"ivc_dmin", as_cm(*in.dmin, 2)});
  a.inputs.push_back(
      {"ivc_breathing", std::string(in.breathing ? to_string(*in.breathing) : "not stated")});
  if (in.vt_per_kg) a.inputs.push_back({"vt_per_kg", as_mL_per_kg(*in.vt_per_kg)});
  // effort_seen is the fact "passive" the other way round.
  a.inputs.push_back({"passive", stated(in.effort_seen, "no (breathing effort seen)",
                                        "yes (no breathing effort)")});
  a.inputs.push_back({"iah", stated(in.iah, "present", "absent")});
  a.inputs.push_back({"rv_failure", stated(in.rv_failure, "present", "absent")});
}

std::string applicability(bool applies, const std::optional<Breathing>& breathing,
                          const std::string& cut) {
  if (!breathing) return "breathing state not stated";
  if (!applies) return std::string("not applicable (") + to_string(*breathing) + ")";
  return cut;
}

}  // namespace

std::string ivc_note_text(IvcNote note) {
  switch (note) {
    case IvcNote::sniff_collapse:
      return "The ASE table judges collapse with a sniff; collapse over quiet breathing is often "
             "smaller and may place the estimate one band too high.";
    case IvcNote::collapsibility_for_completeness:
      return "Collapsibility is shown for completeness; in passive ventilation the IVC widens "
             "on inspiration and distensibility and variation are the indices that apply.";
    case IvcNote::distensibility_for_completeness:
      return "Distensibility and variation are shown for completeness; their cut-offs apply only "
             "in passive ventilation.";
    case IvcNote::indices_for_completeness:
      return "The three indices are shown for completeness; with breathing effort on positive "
             "pressure none of them has a cut-off to read it by.";
    case IvcNote::measurement_site:
      return "Measure the IVC in the subcostal long-axis view just caudal to the hepatic-vein "
             "inflow, about 1-2 cm from the right-atrial junction (the hepatic veins join 0.5-3 "
             "cm from it), in the same view at both phases of the breath (Rudski et al., J Am "
             "Soc Echocardiogr 2010;23:685).";
  }
  return "";
}

Answer describe_ivc(const IvcInputs& in, const IvcResults& r, const Thresholds& limits,
                    FieldContext context) {
  Answer a;
  a.command = "calc ivc";
  a.title = "inferior vena cava";
  a.context = context;
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
  a.gates = gates_in_words(r.gates, context);
  a.reading = reading_in_words(in, r, context);
  for (IvcNote n : r.notes) a.notes.push_back(ivc_note_text(n));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
