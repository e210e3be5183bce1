// Equation-of-motion least squares (Bates, Lung Mechanics: An Inverse Modeling
// Approach, 2009) and the stress index (Ranieri et al., Anesthesiology
// 2000;93:1320). See include/breathbeat/waveform/mechanics_fit.hpp.
#include "breathbeat/waveform/mechanics_fit.hpp"

#include <Eigen/Dense>
#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <vector>

namespace bb::wave {

namespace {

double mean_of(std::span<const double> v) {
  return std::accumulate(v.begin(), v.end(), 0.0) / static_cast<double>(v.size());
}

// Below this, 1 - (correlation of flow and volume)^2 means the two columns
// carry no separate information (no flow, or flow proportional to volume).
constexpr double kCollinear = 1e-12;

}  // namespace

std::optional<EquationOfMotionFit> fit_equation_of_motion(std::span<const double> paw_cmH2O,
                                                          std::span<const double> flow_L_s,
                                                          std::span<const double> volume_L) {
  const std::size_t n = paw_cmH2O.size();
  if (n < 5 || flow_L_s.size() != n || volume_L.size() != n) return std::nullopt;
  // Least squares with an intercept = least squares on centred columns, the
  // intercept following from the means. Normal equations of the centred
  // (flow, volume) problem, solved with Eigen; well conditioned unless the two
  // columns are collinear, which is refused.
  const double mf = mean_of(flow_L_s), mv = mean_of(volume_L), my = mean_of(paw_cmH2O);
  Eigen::Matrix2d gram = Eigen::Matrix2d::Zero();
  Eigen::Vector2d rhs = Eigen::Vector2d::Zero();
  double syy = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const Eigen::Vector2d x(flow_L_s[i] - mf, volume_L[i] - mv);
    const double y = paw_cmH2O[i] - my;
    gram.noalias() += x * x.transpose();
    rhs += x * y;
    syy += y * y;
  }
  const double sff = gram(0, 0), svv = gram(1, 1);
  if (!(sff > 0 && svv > 0) || gram.determinant() <= kCollinear * sff * svv) return std::nullopt;
  const Eigen::Vector2d re = gram.ldlt().solve(rhs);
  const double r = re(0), e = re(1);
  const double p0 = my - r * mf - e * mv;
  double ss_res = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const double residual = paw_cmH2O[i] - (r * flow_L_s[i] + e * volume_L[i] + p0);
    ss_res += residual * residual;
  }
  EquationOfMotionFit fit;
  fit.resistance = cmH2O_per_L_per_s(r);
  fit.elastance = cmH2O_per_L(e);
  fit.compliance = e != 0 ? Compliance(1.0 / fit.elastance) : Compliance::from_value(0.0);
  fit.p0 = cmH2O(p0);
  fit.r_squared = syy > 0 ? 1.0 - ss_res / syy : 0.0;
  fit.samples = static_cast<int>(n);
  return fit;
}

void integrate_volume(std::span<const double> flow_L_s, double fs, bool drift_correction,
                      std::span<double> volume_L) {
  const std::size_t n = flow_L_s.size();
  if (n == 0 || volume_L.size() != n) return;
  const double dt = 1.0 / fs;
  double offset = 0.0;
  if (drift_correction && n > 1) {
    // Remove the constant flow that leaves the trapezoidal volume off zero at the end.
    double area = 0.0;
    for (std::size_t i = 1; i < n; ++i) area += 0.5 * (flow_L_s[i - 1] + flow_L_s[i]) * dt;
    offset = area / (static_cast<double>(n - 1) * dt);
  }
  volume_L[0] = 0.0;
  for (std::size_t i = 1; i < n; ++i) {
    volume_L[i] = volume_L[i - 1] + (0.5 * (flow_L_s[i - 1] + flow_L_s[i]) - offset) * dt;
  }
}

namespace {

// P = a t^b + c for a fixed exponent b: a and c by linear least squares, and
// how the residual sum of squares RSS(b) of that fit changes with b. By the
// variable-projection argument (Golub and Pereyra, SIAM J Numer Anal 1973)
// its slope is the partial derivative with a, c held:
//   dRSS/db = -2 a sum(r_i z_i),  z_i = t_i^b log t_i;
// its Gauss-Newton curvature (Kaufman, BIT 1975) is 2 a^2 |P z|^2, P the
// projection off the span of (t^b, 1).
struct PowerFit {
  double b = 0, a = 0, c = 0, slope = 0, curvature = 0;
  double ss_res = 0;  // residual sum of squares
  bool ok = false;
};

// Samples at t > 0 as log t (t^b = exp(b log t), one exp per sample); samples
// at t = 0 have t^b = 0 and t^b log t -> 0, so only their pressures count.
struct PowerData {
  std::vector<double> log_t, p;         // t > 0
  double n = 0, sum_p = 0, ss_tot = 0;  // all samples; ss_tot = sum((p - mean p)^2)
};

PowerFit fit_for_exponent(const PowerData& d, double b) {
  double sx = 0, sxx = 0, sxy = 0, sz = 0, sxz = 0, syz = 0, szz = 0;
  for (std::size_t i = 0; i < d.log_t.size(); ++i) {
    const double y = d.p[i];
    const double x = std::exp(b * d.log_t[i]);
    const double z = x * d.log_t[i];
    sx += x;
    sxx += x * x;
    sxy += x * y;
    sz += z;
    sxz += x * z;
    syz += y * z;
    szz += z * z;
  }
  PowerFit f;
  f.b = b;
  const double det = d.n * sxx - sx * sx;
  if (!(det > 0)) return f;
  f.a = (d.n * sxy - sx * d.sum_p) / det;
  f.c = (d.sum_p - f.a * sx) / d.n;
  // At the least-squares (a, c): SSres = SStot - a sum(x (p - mean p)).
  f.ss_res = std::max(0.0, d.ss_tot - f.a * (sxy - sx * d.sum_p / d.n));
  f.slope = -2.0 * f.a * (syz - f.a * sxz - f.c * sz);
  const double projected = szz - (d.n * sxz * sxz - 2 * sx * sxz * sz + sxx * sz * sz) / det;
  f.curvature = 2.0 * f.a * f.a * projected;
  f.ok = std::isfinite(f.slope) && std::isfinite(f.curvature);
  return f;
}

// The fit at the exponent in [lo, hi] where RSS(b) is least, to `tolerance`:
// Gauss-Newton steps on the slope from b = 1, kept inside a bracket that
// every evaluation narrows (a negative slope moves the lower end up, a
// positive one the upper end down) and replaced by bisection when they would
// leave it; an end of the interval when the slope there shows the minimum
// lies on the boundary.
std::optional<PowerFit> best_power_fit(const PowerData& d, double lo, double hi, double tolerance) {
  bool lo_seen = false, hi_seen = false;  // slope known at the original ends
  double b = std::clamp(1.0, lo, hi);
  PowerFit f;
  for (int it = 0; it < 200; ++it) {
    f = fit_for_exponent(d, b);
    if (!f.ok) return std::nullopt;
    if (f.slope == 0) return f;
    if (f.slope < 0) {
      lo = b;
    } else {
      hi = b;
    }
    if (hi - lo <= tolerance) return f;
    const double newton = f.curvature > 0 ? b - f.slope / f.curvature : b;
    if (newton > lo && newton < hi) {
      if (std::abs(newton - b) <= tolerance) return f;
      b = newton;
      continue;
    }
    // The step leaves the bracket: try the end it points to once, else bisect.
    if (newton >= hi && !hi_seen) {
      hi_seen = true;
      b = hi;
    } else if (newton <= lo && !lo_seen) {
      lo_seen = true;
      b = lo;
    } else {
      b = 0.5 * (lo + hi);
    }
  }
  return f;
}

}  // namespace

std::optional<StressIndexFit> fit_stress_index(std::span<const double> t_s,
                                               std::span<const double> paw_cmH2O) {
  if (t_s.size() < 8 || t_s.size() != paw_cmH2O.size()) return std::nullopt;
  PowerData d;
  d.log_t.reserve(t_s.size());
  d.p.reserve(t_s.size());
  for (std::size_t i = 0; i < t_s.size(); ++i) {
    if (!(t_s[i] >= 0) || !std::isfinite(paw_cmH2O[i])) return std::nullopt;
    d.n += 1;
    d.sum_p += paw_cmH2O[i];
    if (t_s[i] == 0) continue;
    d.log_t.push_back(std::log(t_s[i]));
    d.p.push_back(paw_cmH2O[i]);
  }
  const double mean = d.sum_p / d.n;
  for (double p : paw_cmH2O) d.ss_tot += (p - mean) * (p - mean);
  // b on [0.1, 5] to 1e-6: far below its reading precision (two decimals).
  const std::optional<PowerFit> best = best_power_fit(d, 0.1, 5.0, 1e-6);
  if (!best) return std::nullopt;
  StressIndexFit fit;
  fit.b = best->b;
  fit.a = best->a;
  fit.c = cmH2O(best->c);
  fit.r_squared = d.ss_tot > 0 ? 1.0 - best->ss_res / d.ss_tot : 0.0;
  fit.samples = static_cast<int>(t_s.size());
  return fit;
}

}  // namespace bb::wave
