// Respiratory mechanics from airway pressure and flow over one breath.
//
// Equation of motion of the single-compartment linear model,
//   Paw(t) = R V'(t) + E V(t) + P0,
// fitted by linear least squares over the samples of one breath (Bates JHT,
// Lung Mechanics: An Inverse Modeling Approach, Cambridge University Press
// 2009, chapter 5). Stress index: P(t) = a t^b + c over the constant-flow part
// of a volume-controlled inflation (Ranieri VM et al., Anesthesiology
// 2000;93:1320). Methods: docs/waveform-analysis.md.
#pragma once

#include <optional>
#include <span>

#include "breathbeat/units.hpp"

namespace bb::wave {

struct EquationOfMotionFit {
  Resistance resistance;   // R
  Elastance elastance;     // E
  Compliance compliance;   // 1/E
  Pressure p0;             // P0: total PEEP when V is counted from end-expiration
  double r_squared = 0.0;  // goodness of fit, 1 - SSres/SStot
  int samples = 0;
};

// Paw = R V' + E V + P0 by least squares (normal equations of the centred problem,
// solved with Eigen); Bates 2009.
// paw in cmH2O, flow in L/s (inspiration positive), volume in L above the
// volume at the first sample; all three the same length. None when fewer than
// 5 samples or the columns are degenerate (no flow, no volume change, or
// volume proportional to flow).
std::optional<EquationOfMotionFit> fit_equation_of_motion(std::span<const double> paw_cmH2O,
                                                          std::span<const double> flow_L_s,
                                                          std::span<const double> volume_L);

// Volume by trapezoidal integration of flow (L/s) sampled at fs, starting at 0;
// with drift correction the mean flow over the span is removed first, so that
// the volume returns to 0 at the end (inspired = expired; per breath).
void integrate_volume(std::span<const double> flow_L_s, double fs, bool drift_correction,
                      std::span<double> volume_L);

struct StressIndexFit {
  double b = 0.0;  // stress index; < 0.9 tidal recruitment, > 1.1 overdistension (Ranieri 2000)
  double a = 0.0;  // cmH2O / s^b
  Pressure c;
  double r_squared = 0.0;
  int samples = 0;
};

// P(t) = a t^b + c by least squares: a and c linear for each b, b where the
// slope of the residual in b is zero (safeguarded Gauss-Newton steps from
// b = 1 within [0.1, 5], to 1e-6; an end of that interval when the minimum
// lies there); t in s from the start of inflation (t >= 0). None with fewer
// than 8 samples, a negative time or a non-finite pressure.
std::optional<StressIndexFit> fit_stress_index(std::span<const double> t_s,
                                               std::span<const double> paw_cmH2O);

}  // namespace bb::wave
