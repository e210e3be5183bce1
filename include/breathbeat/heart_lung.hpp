// Heart-lung interaction: how much of a PEEP step or a tidal breath reaches the
// pleural space and the right atrium, what that may do to the venous-return
// gradient, the recruitment-to-inflation ratio, and helpers for comparing the
// steps of a PEEP trial. One function per published formula; the combined
// estimates below them only chain the formulas and say what was assumed
// (typed notes; breathbeat/present/heart_lung.hpp says them in words).
// Formulas, sources and limits: docs/methods.md.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

#include "breathbeat/errors.hpp"
#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"
#include "breathbeat/units.hpp"

namespace bb {

// ---- ranges -------------------------------------------------------------------

// Where the chest-wall share Ecw/Ers came from.
enum class ElastanceRatioOrigin {
  preset_range,  // no oesophageal pressure: the population range in heart_lung.toml
  measured,      // from oesophageal pressure swings: low == central == high
};
const char* to_string(ElastanceRatioOrigin origin);

// Numeric order always: low <= central <= high, whatever the sign of the step.
struct PressureRange {
  Pressure low;
  Pressure central;
  Pressure high;
  bool single() const { return low == high; }
};

struct RatioRange {
  Ratio low;
  Ratio central;
  Ratio high;
  bool single() const { return low == high; }
};

// ---- pleural and right-atrial pressure (sources in docs/methods.md) ------------------------

// dPpl = dPaw * Ecw/Ers; Gattinoni et al., AJRCCM 1998 / Chiumello et al., AJRCCM 2008;178:346
// (from memory).
Pressure pleural_pressure_change(Pressure delta_airway_pressure, Ratio ecw_ers);
// Tidal pleural swing = dP * Ecw/Ers; Chiumello et al., AJRCCM 2008;178:346 (from memory).
Pressure tidal_pleural_swing(Pressure driving_pressure, Ratio ecw_ers);
// dRAP = dPEEP * Ecw/Ers (read it in mmHg with in_mmHg); Gattinoni et al., AJRCCM 1998 (from
// memory).
Pressure right_atrial_pressure_change(Pressure delta_peep, Ratio ecw_ers);
// d(Pmsf - RAP)/(Pmsf - RAP) = -dRAP / (Pmsf - RAP), an upper bound (Pmsf rises too);
// Guyton; van den Berg et al., J Appl Physiol 2002;92:1223 (from memory). InputError (field pmsf)
// if Pmsf <= RAP.
Ratio venous_return_gradient_change(Pressure delta_rap, Pressure pmsf, Pressure rap);

// Ecw/Ers without oesophageal pressure: heart_lung.ecw_ers_{low,central,high}
// (Gattinoni et al., AJRCCM 1998, from memory). InputError if a site file breaks 0 < low <= central
// <= high <= 1.
RatioRange preset_elastance_ratio_range(const Thresholds& limits);
// A measured Ecw/Ers as a collapsed range; InputError (field pes_ei, the swing it comes from)
// unless 0 < ratio <= 1.
RatioRange measured_elastance_ratio_range(Ratio ecw_ers);

// The formulas above applied over an Ecw/Ers range (result sorted low..high).
PressureRange pleural_pressure_change_range(Pressure delta_airway_pressure,
                                            const RatioRange& ecw_ers);
PressureRange tidal_pleural_swing_range(Pressure driving_pressure, const RatioRange& ecw_ers);
PressureRange right_atrial_pressure_change_range(Pressure delta_peep, const RatioRange& ecw_ers);
RatioRange venous_return_gradient_change_range(const PressureRange& delta_rap, Pressure pmsf,
                                               Pressure rap);

// What is known at the reference setting and at the step compared with it.
struct HeartLungInputs {
  std::optional<Pressure> peep_reference;    // total PEEP at the reference step
  std::optional<Pressure> peep_step;         // total PEEP at the step
  std::optional<Pressure> driving_pressure;  // at the step: gives the tidal swing
  std::optional<Ratio> measured_ecw_ers;     // mechanics.hpp chest_wall_elastance_ratio
  std::optional<Pressure> pmsf;              // mean systemic filling pressure, reference step
  std::optional<Pressure> rap;               // RAP or CVP at the reference step
  std::optional<Pressure> rap_step;          // RAP or CVP measured at the step, when recorded
};

// What the estimate says it measured and assumed, in the order it says it; the
// values a note quotes are in the estimate (ecw_ers, delta_peep).
enum class HeartLungNote {
  ecw_ers_measured,                  // Ecw/Ers from oesophageal swings: single values
  ecw_ers_assumed_range,             // no oesophageal pressure: the preset range
  tidal_pleural_swing_meaning,       // swing = driving pressure x Ecw/Ers, source of PPV
  peep_effect_needs_both_peeps,      // no PEEP effect: total PEEP missing at a step
  peep_change_transmitted,           // the PEEP change reaches pleura and right atrium
  venous_return_needs_pmsf_and_rap,  // no venous-return estimate: Pmsf or RAP/CVP missing
  venous_return_assumptions,         // Pmsf and resistance assumed unchanged: an upper bound
  rap_reaches_pmsf,                  // at the high end RAP reaches Pmsf: linear estimate fails
  venous_return_from_measured_rap,   // CVP measured at the step: gradient from its change
};

struct HeartLungEstimate {
  ElastanceRatioOrigin ecw_ers_origin = ElastanceRatioOrigin::preset_range;
  RatioRange ecw_ers;
  std::optional<Pressure> delta_peep;                         // step - reference
  std::optional<PressureRange> tidal_pleural_swing;           // needs driving_pressure
  std::optional<PressureRange> pleural_pressure_change;       // needs both PEEPs
  std::optional<PressureRange> right_atrial_pressure_change;  // needs both PEEPs
  // Needs both PEEPs, Pmsf and RAP; when RAP was measured at the step too, a single value from
  // the measured change (measured_rap_change), with the estimate of dRAP beside it.
  std::optional<RatioRange> venous_return_gradient_change;
  std::optional<Pressure> measured_rap_change;  // rap_step - rap
  std::vector<HeartLungNote> notes;             // what is measured, what is assumed
};

// Chains the formulas above. InputError on Pmsf <= RAP (pmsf), an Ecw/Ers outside
// (0, 1] (pes_ei) or a driving pressure not above zero (pplat).
HeartLungEstimate estimate_peep_effect(const HeartLungInputs& in, const Thresholds& limits);

// ---- recruitment-to-inflation ratio (sources in docs/methods.md) ---------------------------

// Crs,low = VT / (Pplat,low - PEEPlow); Chen et al., AJRCCM 2020;201:178.
Compliance compliance_at_low_peep(Volume vt, Pressure pplat_low, Pressure peep_low);
// dVrec = dEELV - Crs,low * (PEEPhigh - PEEPlow); Chen et al., AJRCCM 2020;201:178.
Volume recruited_volume(Volume delta_eelv, Compliance crs_low, Pressure peep_high,
                        Pressure peep_low);
// Error of a measured expired volume: fixed + relative x volume; ISO 80601-2-12 (from memory).
Volume expired_volume_tolerance(Volume measured, Volume fixed, Ratio relative);
// Crec = dVrec / (PEEPhigh - PEEPlow); Chen et al., AJRCCM 2020;201:178.
Compliance recruited_compliance(Volume recruited, Pressure peep_high, Pressure peep_low);
// R/I = Crec / Crs,low; Chen et al., AJRCCM 2020;201:178.
Ratio recruitment_to_inflation_ratio(Compliance crec, Compliance crs_low);

struct RecruitmentInputs {
  Volume eelv_change;  // extra volume exhaled when PEEP is released high -> low in one breath
  Pressure peep_high;
  Pressure peep_low;
  Pressure pplat_low;                               // plateau pressure at the low PEEP
  Volume vt;                                        // tidal volume at the low PEEP
  std::optional<Pressure> airway_opening_pressure;  // replaces PEEPlow when above it
};

// What the R/I computation says besides its numbers, in the order it says it.
enum class RecruitmentNote {
  airway_opening_pressure_used,      // AOP above PEEPlow replaces it (lower_pressure_used)
  airway_opening_pressure_not_used,  // AOP not above PEEPlow: PEEPlow used
  // Released volume below the low-PEEP prediction by no more than the volume measurement error:
  // no recruitment detected, R/I about zero.
  no_recruitment_detected,
  // Released volume below the prediction by more than the measurement error: the lung cannot
  // give back less than its low-PEEP compliance holds (derecruitment on release adds volume), so
  // the measurement is suspect (a leak, a release not in one breath, an exhalation cut short,
  // misrecorded pressures) and R/I is not interpretable.
  released_volume_below_prediction,
};

struct RecruitmentResult {
  Pressure lower_pressure_used;  // PEEPlow or the airway opening pressure
  bool airway_opening_pressure_used = false;
  Compliance compliance_low;
  Volume recruited_volume;
  Compliance recruited_compliance;
  Ratio ratio;
  Ratio high_recruitability_at;  // heart_lung.recruitment_to_inflation_high
  bool high_recruitability = false;
  Volume predicted_volume;       // Crs,low x (PEEPhigh - lower pressure): no recruitment
  Volume measurement_tolerance;  // volume measurement error of delta_eelv
  bool interpretable = true;     // false: released volume well below the prediction
  std::vector<RecruitmentNote> notes;
};

// Chen et al. 2020 in one call; InputError naming the field by id (delta_eelv,
// release_vt, peep_high, pplat_low, airway_opening_pressure) on impossible
// pressures or volumes.
RecruitmentResult assess_recruitment(const RecruitmentInputs& in, const Thresholds& limits);

// ---- comparing steps (sources in docs/methods.md) ------------------------------------------

// relative_change (breathbeat/haemodynamics.hpp) between two steps, refusing a
// zero or non-finite value to compare against with std::domain_error (a
// programming error: step values are checked positive when read).
void require_comparable(double before_si, double after_si);
template <class Q>
Ratio fractional_change(Q before, Q after) {
  require_comparable(before.value(), after.value());
  return relative_change(before, after);
}

// A fall against the reference step: flagged when change <= -heart_lung.haemodynamic_cost_fall
// (10 %: common practice, no source).
struct HaemodynamicCost {
  Ratio change;   // (step - reference) / reference
  Ratio flag_at;  // the fall that is flagged, as a positive fraction
  bool flagged = false;
};
HaemodynamicCost haemodynamic_cost_from_change(Ratio change, const Thresholds& limits);
template <class Q>
HaemodynamicCost haemodynamic_cost(Q reference, Q step, const Thresholds& limits) {
  return haemodynamic_cost_from_change(fractional_change(reference, step), limits);
}

// Which step wins: index of the largest or smallest present value; the first on ties;
// nothing if no value is present.
enum class BestBy { maximum, minimum };
std::optional<std::size_t> best_step_index_si(const std::vector<std::optional<double>>& values,
                                              BestBy by);
// The SI values of a list of optional quantities.
template <class Q>
std::vector<std::optional<double>> si_values(const std::vector<std::optional<Q>>& values) {
  std::vector<std::optional<double>> si;
  si.reserve(values.size());
  for (const auto& v : values) si.push_back(v ? std::optional<double>(v->value()) : std::nullopt);
  return si;
}
template <class Q>
std::optional<std::size_t> best_step_index(const std::vector<std::optional<Q>>& values, BestBy by) {
  return best_step_index_si(si_values(values), by);
}

// The steps other than `best` whose value differs from the best by less than `resolution`
// (absolute, in SI; or, when `relative`, a fraction of the best value): ties within measurement
// resolution, in step order (common practice, no source).
std::vector<std::size_t> tied_steps_si(const std::vector<std::optional<double>>& values,
                                       std::size_t best, double resolution, bool relative);

// Best-compliance step; Suter, Fairley & Isenberg, NEJM 1975;292:284.
std::optional<std::size_t> best_compliance_step(const std::vector<std::optional<Compliance>>& crs);
// Maximum O2-delivery step (DO2 as O2 volume per minute); Suter, Fairley & Isenberg, NEJM
// 1975;292:284.
std::optional<std::size_t> best_oxygen_delivery_step(const std::vector<std::optional<Flow>>& do2);
// Lowest driving-pressure step; Amato et al., NEJM 2015;372:747.
std::optional<std::size_t> lowest_driving_pressure_step(
    const std::vector<std::optional<Pressure>>& dp);

}  // namespace bb
