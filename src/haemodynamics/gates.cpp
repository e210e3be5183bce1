// The validity gates of PPV and SVV and the readings built on them. These are
// reusable: `calc ppv`, the trial report and the waveform engine call them.
#include "breathbeat/condition_bias.hpp"
#include "breathbeat/cutoff.hpp"
#include "breathbeat/haemodynamics.hpp"

namespace bb {

namespace {

using cutoff::above;
using cutoff::at_least;

// A stated condition; `from_signals`: a "holds" that only recorded signals support is
// not contradicted, not met.
Gate condition_gate(const char* key, std::optional<bool> holds, std::string source,
                    bool from_signals = false) {
  Gate g{key, GateState::unknown, std::move(source)};
  g.condition = key;
  if (!holds) return g;
  g.state =
      *holds ? (from_signals ? GateState::not_contradicted : GateState::met) : GateState::failed;
  g.basis = from_signals ? GateBasis::seen_in_signals : GateBasis::stated;
  return g;
}

// A gate on one measured value (`value`, in `unit`) against its cut-off.
Gate measured(const char* key, std::optional<double> value, double cut, const char* unit,
              std::string source, bool (*holds)(double, double)) {
  Gate g{key, GateState::unknown, std::move(source)};
  g.condition = key;
  g.cut_off = cut;
  g.unit = unit;
  if (!value) return g;
  g.basis = GateBasis::measured;
  g.value = value;
  g.state = holds(*value, cut) ? GateState::met : GateState::failed;
  return g;
}

bool at_least_cut(double v, double cut) {
  return at_least(v, cut);
}
bool above_cut(double v, double cut) {
  return above(v, cut);
}

Gate vt_gate(const PpvConditions& c, const Thresholds& t) {
  std::optional<double> vt;
  if (c.vt_per_kg) vt = in_mL_per_kg(*c.vt_per_kg);
  return measured("vt_per_kg_pbw", vt, in_mL_per_kg(t.get<VolumePerMass>("gates.vt_per_kg_min")),
                  "mL/kg", t.source("gates.vt_per_kg_min"), &at_least_cut);
}

Gate hr_rr_gate(const PpvConditions& c, const Thresholds& t) {
  std::optional<double> ratio;
  if (c.hr && c.rr) ratio = in_fraction(heart_rate_to_respiratory_rate_ratio(*c.hr, *c.rr));
  return measured("hr_rr_ratio", ratio, t.number("gates.hr_rr_ratio_min"), "1",
                  t.source("gates.hr_rr_ratio_min"), &above_cut);
}

Gate compliance_gate(const PpvConditions& c, const Thresholds& t) {
  std::optional<double> crs;
  if (c.crs) crs = in_mL_per_cmH2O(*c.crs);
  return measured("compliance", crs, in_mL_per_cmH2O(t.get<Compliance>("gates.crs_min")),
                  "mL/cm[H2O]", t.source("gates.crs_min"), &above_cut);
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
      "passive_ventilation", c.passive,
      "Michard et al., Am J Respir Crit Care Med 2000;162:134 (fully passive patients)",
      c.passive_from_signals));
  gates.push_back(
      condition_gate("regular_rhythm", c.regular_rhythm,
                     "Michard et al., Am J Respir Crit Care Med 2000;162:134 (regular rhythm)",
                     c.rhythm_from_signals));
  gates.push_back(vt_gate(c, t));
  gates.push_back(hr_rr_gate(c, t));
  gates.push_back(compliance_gate(c, t));
  gates.push_back(condition_gate("closed_chest", c.closed_chest,
                                 "de Waal et al., Crit Care Med 2009;37:510 (from memory)"));
  gates.push_back(condition_gate(
      "no_intra_abdominal_hypertension", negated(c.intra_abdominal_hypertension),
      "Jacques et al., Crit Care 2011;15:R33 (raised abdominal pressure alters PPV; from memory)"));
  gates.push_back(condition_gate("no_rv_failure", negated(c.rv_failure),
                                 "Mahjoub et al., Crit Care Med 2009 (from memory)"));
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
  const double low = in_percent(t.get<Ratio>("ppv.grey_zone_low"));
  const double high = in_percent(t.get<Ratio>("ppv.grey_zone_high"));
  const double v = in_percent(ppv);
  r.values = {ReadValue{v, {low, high}, above(v, high)}};
  if (!at_least(v, low)) {
    r.category = "below_grey_zone";
    return weighed_reading(std::move(r), Pointing::unresponsive, gates);
  }
  if (!above(v, high)) {
    r.category = "grey_zone";
    return weighed_reading(std::move(r), Pointing::neither, gates);
  }
  r.category = "above_grey_zone";
  return weighed_reading(std::move(r), Pointing::responsive, gates);
}

Reading read_svv(Ratio svv, const std::vector<Gate>& gates, const Thresholds& t) {
  Reading r;
  r.key = "svv";
  r.basis = basis_of("svv", gates);
  const double low = in_percent(t.get<Ratio>("svv.uncertain_low"));
  const double high = in_percent(t.get<Ratio>("svv.responsive_above"));
  const double v = in_percent(svv);
  r.values = {ReadValue{v, {low, high}, above(v, high)}};
  if (!at_least(v, low)) {
    r.category = "below_threshold";
    return weighed_reading(std::move(r), Pointing::unresponsive, gates);
  }
  if (!above(v, high)) {
    r.category = "device_dependent_zone";
    return weighed_reading(std::move(r), Pointing::neither, gates);
  }
  r.category = "above_threshold";
  return weighed_reading(std::move(r), Pointing::responsive, gates);
}

}  // namespace bb
