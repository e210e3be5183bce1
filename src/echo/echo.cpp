// Echo stroke volume, cardiac output and index: formulas, validation, the
// answer shown to the user.
#include "breathbeat/echo.hpp"

#include <numbers>

#include "breathbeat/body.hpp"
#include "breathbeat/cautions.hpp"

namespace bb {

Area lvot_area(Length lvot_diameter) {
  const Length radius = lvot_diameter / 2.0;
  return Area(std::numbers::pi * radius * radius);
}

Volume stroke_volume_from_lvot(Length lvot_diameter, Length vti) {
  return Volume(lvot_area(lvot_diameter) * vti);
}

Flow cardiac_output_from_stroke_volume(Volume stroke_volume, Frequency hr) {
  return Flow(stroke_volume * hr);
}

FlowPerArea cardiac_index_from_output(Flow cardiac_output, Area bsa) {
  return FlowPerArea(cardiac_output / bsa);
}

namespace {

Shown as_L_per_min_per_m2(FlowPerArea ci, int decimals) {
  const double v = in_L_per_min(Flow(ci * square_metre(1.0)));
  return Shown{v, "L/min/m2", "L/min/m2", decimals, std::nullopt, std::nullopt};
}

template <class Q>
void require_positive(const std::optional<Q>& q, const char* field, const std::string& shown,
                      const char* expected) {
  if (!q || q->value() > 0.0) return;
  throw InputError(field, shown, "is not above zero", expected);
}

}  // namespace

void validate_echo(const EchoInputs& in, const Thresholds& limits) {
  if (in.lvot) {
    require_positive(in.lvot, "lvot", format_number(in_cm(*in.lvot), 2) + " cm",
                     "an LVOT diameter above zero, in cm (default) or mm");
  }
  if (in.vti) {
    require_positive(in.vti, "vti", format_number(in_cm(*in.vti), 1) + " cm",
                     "a velocity-time integral above zero, in cm");
  }
  if (in.hr) {
    require_positive(in.hr, "hr", format_number(in_per_min(*in.hr), 0) + " /min",
                     "a heart rate above zero, in /min");
  }
  if (in.height) {
    require_positive(in.height, "height", format_number(in_cm(*in.height), 0) + " cm",
                     "a height above zero, in cm");
  }
  if (in.weight) {
    require_positive(in.weight, "weight", format_number(in_kg(*in.weight), 1) + " kg",
                     "a weight above zero, in kg");
  }
  if (in.bsa) {
    require_positive(in.bsa, "bsa", format_number(in_square_metre(*in.bsa), 2) + " m2",
                     "a body surface area above zero, in m2");
  }
  if (in.lvot) limits.check_plausible("lvot", *in.lvot);
  if (in.vti) limits.check_plausible("vti", *in.vti);
  if (in.hr) limits.check_plausible("hr", *in.hr);
  if (in.height) limits.check_plausible("height", *in.height);
  if (in.weight) limits.check_plausible("weight", *in.weight);
  if (in.bsa) limits.check_plausible("bsa", *in.bsa);
}

EchoResults analyse_echo(const EchoInputs& in) {
  EchoResults r;
  if (in.lvot) r.lvot_area = lvot_area(*in.lvot);
  if (in.lvot && in.vti) {
    r.stroke_volume = stroke_volume_from_lvot(*in.lvot, *in.vti);
  } else {
    r.skipped.push_back(Skipped{"stroke_volume", "Stroke volume", {"--lvot", "--vti"}});
  }
  if (r.stroke_volume && in.hr) {
    r.cardiac_output = cardiac_output_from_stroke_volume(*r.stroke_volume, *in.hr);
  } else {
    r.skipped.push_back(Skipped{"cardiac_output", "Cardiac output", {"--lvot", "--vti", "--hr"}});
  }
  if (in.bsa) {
    r.bsa = in.bsa;
  } else if (in.height && in.weight) {
    const bool du_bois = in.bsa_formula == BsaFormula::du_bois;
    r.bsa = du_bois ? body_surface_area_du_bois(*in.weight, *in.height)
                    : body_surface_area_mosteller(*in.weight, *in.height);
    r.notes.push_back(du_bois ? "BSA by Du Bois & Du Bois (1916)." : "BSA by Mosteller (1987).");
  }
  if (r.cardiac_output && r.bsa) {
    r.cardiac_index = cardiac_index_from_output(*r.cardiac_output, *r.bsa);
  } else {
    r.skipped.push_back(Skipped{"cardiac_index",
                                "Cardiac index",
                                {"--lvot", "--vti", "--hr", "--height and --weight (or --bsa)"}});
  }
  if (r.stroke_volume) {
    r.notes.push_back(
        "The LVOT diameter enters squared: a 1 mm error in a 2.0 cm LVOT changes stroke volume "
        "by about 10 %. Measure it in mid-systole, inner edge to inner edge, at the level of "
        "the pulsed-wave sample volume.");
  }
  return r;
}

namespace {
void add_inputs(const EchoInputs& in, Answer& a) {
  if (in.lvot) a.inputs.push_back({"lvot", as_cm(*in.lvot, 2)});
  if (in.vti) a.inputs.push_back({"vti", as_cm(*in.vti, 1)});
  if (in.hr) a.inputs.push_back({"hr", as_per_min(*in.hr)});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height, 0)});
  if (in.weight) a.inputs.push_back({"weight", as_kg(*in.weight)});
  if (in.bsa) a.inputs.push_back({"bsa", as_m2(*in.bsa)});
}
}  // namespace

Answer describe_echo(const EchoInputs& in, const EchoResults& r) {
  Answer a;
  a.command = "calc echo";
  a.title = "echo stroke volume and cardiac output";
  add_inputs(in, a);
  if (r.lvot_area) {
    a.results.push_back(Item{"lvot_area", "LVOT area pi (d/2)^2", as_cm2(*r.lvot_area), ""});
  }
  if (r.stroke_volume) {
    a.results.push_back(Item{"stroke_volume", "Stroke volume (VTI x LVOT area)",
                             as_mL(*r.stroke_volume, 1), "Quinones 2002"});
  }
  if (r.cardiac_output) {
    a.results.push_back(
        Item{"cardiac_output", "Cardiac output (SV x HR)", as_L_per_min(*r.cardiac_output, 2), ""});
  }
  if (r.bsa && !in.bsa) {
    a.results.push_back(Item{"bsa", "Body surface area", as_m2(*r.bsa),
                             in.bsa_formula == BsaFormula::du_bois ? "Du Bois" : "Mosteller"});
  }
  if (r.cardiac_index) {
    a.results.push_back(Item{"cardiac_index", "Cardiac index (CO / BSA)",
                             as_L_per_min_per_m2(*r.cardiac_index, 2), ""});
  }
  a.skipped = r.skipped;
  a.notes = r.notes;
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
