// The validity gates of PPV and SVV and the readings built on them. These are
// reusable: `calc ppv`, the trial report and the waveform engine call them.
#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/text/strings.hpp"

namespace bb {

namespace {

using cutoff::above;
using cutoff::at_least;

// `from_signals`: a "holds" that only recorded signals support is not contradicted, not met.
Gate condition_gate(const char* key, const char* label, std::optional<bool> holds, const char* met,
                    const char* failed, const char* unknown, std::string source,
                    const char* failed_as, bool from_signals = false) {
  Gate g{key, label, GateState::unknown, unknown, std::move(source)};
  g.failed_as = failed_as;
  if (!holds) return g;
  g.state =
      *holds ? (from_signals ? GateState::not_contradicted : GateState::met) : GateState::failed;
  g.detail = *holds ? met : failed;
  return g;
}

// A gate on one measured value against its cut-off: met with the value as the
// detail, failed with the value and why that matters.
Gate judged(Gate g, bool holds, const std::string& shown, const std::string& why_not) {
  g.state = holds ? GateState::met : GateState::failed;
  g.detail = holds ? shown : shown + why_not;
  return g;
}

Gate vt_gate(const PpvConditions& c, const Thresholds& t) {
  const VolumePerMass min = t.get<VolumePerMass>("gates.vt_per_kg_min");
  const std::string cut = format_number(in_mL_per_kg(min), 1) + " mL/kg PBW";
  Gate g{"vt_per_kg_pbw", "Tidal volume at least " + cut, GateState::unknown,
         "tidal volume per kg PBW not given", t.source("gates.vt_per_kg_min")};
  g.failed_as = "a low tidal volume";
  if (!c.vt_per_kg) return g;
  const std::string vt = "VT " + format_number(in_mL_per_kg(*c.vt_per_kg), 1) + " mL/kg PBW";
  return judged(
      std::move(g), at_least(in_mL_per_kg(*c.vt_per_kg), in_mL_per_kg(min)), vt,
      " is below " + cut + ": the tidal swing may be too small to reveal preload responsiveness");
}

Gate hr_rr_gate(const PpvConditions& c, const Thresholds& t) {
  const double min = t.number("gates.hr_rr_ratio_min");
  const std::string cut = format_number(min, 1);
  Gate g{"hr_rr_ratio", "HR/RR above " + cut, GateState::unknown,
         "needs heart rate and respiratory rate", t.source("gates.hr_rr_ratio_min")};
  g.failed_as = "a low HR/RR ratio";
  if (!c.hr || !c.rr) return g;
  const double ratio = in_fraction(heart_rate_to_respiratory_rate_ratio(*c.hr, *c.rr));
  const std::string shown = "HR/RR " + format_number(ratio, 2);
  return judged(std::move(g), above(ratio, min), shown,
                " is not above " + cut + ": too few beats per breath to sample the swing");
}

Gate compliance_gate(const PpvConditions& c, const Thresholds& t) {
  const Compliance min = t.get<Compliance>("gates.crs_min");
  const std::string cut = format_number(in_mL_per_cmH2O(min), 0) + " mL/cmH2O";
  Gate g{"compliance", "Respiratory-system compliance above " + cut, GateState::unknown,
         "static compliance not given", t.source("gates.crs_min")};
  g.failed_as = "a low respiratory-system compliance";
  if (!c.crs) return g;
  const std::string shown = "Crs " + format_number(in_mL_per_cmH2O(*c.crs), 1) + " mL/cmH2O";
  return judged(
      std::move(g), above(in_mL_per_cmH2O(*c.crs), in_mL_per_cmH2O(min)), shown,
      " is not above " + cut + ": a stiff lung passes little of the tidal swing to the heart");
}

std::optional<bool> negated(std::optional<bool> v) {
  if (!v) return std::nullopt;
  return !*v;
}

std::vector<std::string> basis_of(const char* index, const std::vector<Gate>& gates) {
  std::vector<std::string> basis{index};
  for (const Gate& g : gates) basis.push_back(g.key);
  return basis;
}

}  // namespace

std::vector<Gate> ppv_gates(const PpvConditions& c, const Thresholds& t) {
  std::vector<Gate> gates;
  gates.push_back(condition_gate(
      "passive_ventilation", "Controlled ventilation without spontaneous effort", c.passive,
      "no spontaneous breathing effort",
      "spontaneous breathing effort makes the pressure swing irregular",
      "not stated whether the patient is passive",
      "Michard et al., Am J Respir Crit Care Med 2000;162:134 (fully passive patients)",
      "breathing effort", c.passive_from_signals));
  gates.push_back(condition_gate(
      "regular_rhythm", "Regular cardiac rhythm", c.regular_rhythm, "regular rhythm",
      "an irregular rhythm varies pulse pressure beat to beat regardless of breathing",
      "rhythm not stated",
      "Michard et al., Am J Respir Crit Care Med 2000;162:134 (regular rhythm)",
      "an irregular rhythm", c.rhythm_from_signals));
  gates.push_back(vt_gate(c, t));
  gates.push_back(hr_rr_gate(c, t));
  gates.push_back(compliance_gate(c, t));
  gates.push_back(condition_gate("closed_chest", "Closed chest", c.closed_chest, "chest closed",
                                 "with the chest open the tidal swing barely reaches the heart",
                                 "not stated whether the chest is closed",
                                 "de Waal et al., Crit Care Med 2009;37:510 (from memory)",
                                 "an open chest"));
  gates.push_back(condition_gate(
      "no_intra_abdominal_hypertension", "No intra-abdominal hypertension",
      negated(c.intra_abdominal_hypertension), "no intra-abdominal hypertension",
      "intra-abdominal hypertension changes how the breath loads the heart",
      "intra-abdominal pressure not stated",
      "Jacques et al., Crit Care 2011;15:R33 (raised abdominal pressure alters PPV; from memory)",
      "intra-abdominal hypertension"));
  gates.push_back(condition_gate(
      "no_rv_failure", "No right-ventricular failure", negated(c.rv_failure),
      "no right-ventricular failure",
      "right-ventricular failure can raise PPV without preload responsiveness "
      "(false positive)",
      "right-ventricular function not stated", "Mahjoub et al., Crit Care Med 2009 (from memory)",
      "right-ventricular failure"));
  apply_bias(gates, "ppv", t);
  return gates;
}

bool any_gate_failed(const std::vector<Gate>& gates) {
  for (const Gate& g : gates) {
    if (g.state == GateState::failed) return true;
  }
  return false;
}

bool any_gate_unknown(const std::vector<Gate>& gates) {
  for (const Gate& g : gates) {
    if (g.state == GateState::unknown) return true;
  }
  return false;
}

Reading read_ppv(Ratio ppv, const std::vector<Gate>& gates, const Thresholds& t) {
  Reading r;
  r.key = "ppv";
  r.basis = basis_of("ppv", gates);
  const std::string subject = "PPV " + format_number(in_percent(ppv), 1) + " %";
  const double low = in_percent(t.get<Ratio>("ppv.grey_zone_low"));
  const double high = in_percent(t.get<Ratio>("ppv.grey_zone_high"));
  const std::string zone = format_number(low, 0) + "-" + format_number(high, 0) + " %";
  const double v = in_percent(ppv);
  if (!at_least(v, low)) {
    r.category = "below_grey_zone";
    return directional_reading(
        std::move(r), Pointing::unresponsive, subject,
        "is below the grey zone (" + zone + "): suggests no preload responsiveness", gates);
  }
  if (!above(v, high)) {
    r.category = "grey_zone";
    return directional_reading(
        std::move(r), Pointing::neither, subject,
        "is in the grey zone (" + zone + "): inconclusive; consider a preload test", gates);
  }
  r.category = "above_grey_zone";
  return directional_reading(
      std::move(r), Pointing::responsive, subject,
      "is above " + format_number(high, 0) + " %: suggests preload responsiveness", gates);
}

Reading read_svv(Ratio svv, const std::vector<Gate>& gates, const Thresholds& t) {
  Reading r;
  r.key = "svv";
  r.basis = basis_of("svv", gates);
  const std::string subject = "SVV " + format_number(in_percent(svv), 1) + " %";
  const double low = in_percent(t.get<Ratio>("svv.uncertain_low"));
  const double high = in_percent(t.get<Ratio>("svv.responsive_above"));
  const double v = in_percent(svv);
  if (!at_least(v, low)) {
    r.category = "below_threshold";
    return directional_reading(
        std::move(r), Pointing::unresponsive, subject,
        "is below " + format_number(low, 0) + " %: suggests no preload responsiveness", gates);
  }
  if (!above(v, high)) {
    r.category = "device_dependent_zone";
    return directional_reading(std::move(r), Pointing::neither, subject,
                               "is within " + format_number(low, 0) + "-" + format_number(high, 0) +
                                   " %, where the cut-off depends on the device: inconclusive",
                               gates);
  }
  r.category = "above_threshold";
  return directional_reading(
      std::move(r), Pointing::responsive, subject,
      "is above " + format_number(high, 0) + " %: suggests preload responsiveness", gates);
}

}  // namespace bb
