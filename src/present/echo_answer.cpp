// Echo stroke volume, cardiac output and index in words. The numbers come
// from src/echo/ (and the BSA from src/body/).
#include "breathbeat/present/echo.hpp"

#include "breathbeat/cautions.hpp"
#include "breathbeat/units_parse.hpp"

namespace bb {

namespace {

// UCUM code and spelling from the unit table (breathbeat/units_parse.hpp).
Shown as_L_per_min_per_m2(FlowPerArea ci, int decimals) {
  const UnitSpelling& u = unit_of(Dimension::flow_per_area, "L/min/m2");
  return Shown{in_L_per_min_per_m2(ci),
               std::string(u.ucum),
               std::string(u.shown),
               decimals,
               std::nullopt,
               std::nullopt};
}

void add_inputs(const EchoInputs& in, Answer& a) {
  if (in.lvot) a.inputs.push_back({"lvot_diameter", as_cm(*in.lvot, 2)});
  if (in.vti) a.inputs.push_back({"vti", as_cm(*in.vti, 1)});
  if (in.hr) a.inputs.push_back({"hr", as_per_min(*in.hr)});
  if (in.height) a.inputs.push_back({"height", as_cm(*in.height, 0)});
  if (in.weight) a.inputs.push_back({"weight", as_kg(*in.weight)});
  if (in.bsa) a.inputs.push_back({"bsa", as_m2(*in.bsa)});
}

}  // namespace

std::string echo_note_text(EchoNote note, const EchoResults& r) {
  switch (note) {
    case EchoNote::bsa_from_height_weight:
      return r.bsa && r.bsa->origin == BsaOrigin::mosteller ? "BSA by Mosteller (1987)."
                                                            : "BSA by Du Bois & Du Bois (1916).";
    case EchoNote::lvot_squared:
      return "The LVOT diameter enters squared: a 1 mm error in a 2.0 cm LVOT changes stroke "
             "volume by about 10 %. Measure it in mid-systole, inner edge to inner edge, at the "
             "level of the pulsed-wave sample volume.";
  }
  return "";
}

Answer describe_echo(const EchoInputs& in, const EchoResults& r, FieldContext context) {
  Answer a;
  a.command = "calc echo";
  a.title = "echo stroke volume and cardiac output";
  a.context = context;
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
  if (r.bsa && r.bsa->origin != BsaOrigin::given) {
    a.results.push_back(Item{"bsa", "Body surface area", as_m2(r.bsa->value),
                             r.bsa->origin == BsaOrigin::du_bois ? "Du Bois" : "Mosteller"});
  }
  if (r.cardiac_index) {
    a.results.push_back(Item{"cardiac_index", "Cardiac index (CO / BSA)",
                             as_L_per_min_per_m2(*r.cardiac_index, 2), ""});
  }
  a.skipped = r.skipped;
  for (EchoNote n : r.notes) a.notes.push_back(echo_note_text(n, r));
  a.cautions = standard_cautions();
  return a;
}

}  // namespace bb
