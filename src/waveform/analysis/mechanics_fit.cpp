// Equation-of-motion least squares (Bates, Lung Mechanics: An Inverse Modeling
// Approach, 2009) and the stress index (Ranieri et al., Anesthesiology
// 2000;93:1320). See include/breathbeat/waveform/mechanics_fit.hpp.
#include "breathbeat/waveform/mechanics_fit.hpp"

#include <Eigen/Dense>
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
// the slope of the residual sum of squares in b at that (a, c). By the
// variable-projection argument (Golub and Pereyra, SIAM J Numer Anal 1973)
// the slope of the profiled RSS(b) is its partial derivative with a, c held:
//   dRSS/db = -2 a sum(r_i t_i^b log t_i).
struct PowerFit {
  double a = 0, c = 0, slope = 0;
  bool ok = false;
};

// Samples at t > 0 as log t (t^b = exp(b log t), one exp per sample); samples
// at t = 0 have t^b = 0 and t^b log t -> 0, so only their pressures count.
struct PowerData {
  std::vector<double> log_t, p;  // t > 0
  double n = 0, sum_p = 0;       // all samples
};

PowerFit fit_for_exponent(const PowerData& d, double b) {
  double sx = 0, sxx = 0, sxy = 0, sxl = 0, sxxl = 0, sxyl = 0;
  for (std::size_t i = 0; i < d.log_t.size(); ++i) {
    const double l = d.log_t[i], y = d.p[i];
    const double x = std::exp(b * l);
    sx += x;
    sxx += x * x;
    sxy += x * y;
    sxl += x * l;
    sxxl += x * x * l;
    sxyl += x * y * l;
  }
  PowerFit f;
  const double det = d.n * sxx - sx * sx;
  if (!(det > 0)) return f;
  f.a = (d.n * sxy - sx * d.sum_p) / det;
  f.c = (d.sum_p - f.a * sx) / d.n;
  f.slope = -2.0 * f.a * (sxyl - f.a * sxxl - f.c * sxl);
  f.ok = std::isfinite(f.slope);
  return f;
}

// The exponent where the slope of RSS(b) changes sign within [lo, hi], by
// Brent's root finder (inverse quadratic interpolation safeguarded by
// bisection; Brent, Algorithms for Minimization without Derivatives, 1973,
// ch. 4); an end of the interval when the slope keeps its sign there (the
// minimum lies on the boundary).
std::optional<double> best_exponent(const PowerData& d, double lo, double hi, double tolerance) {
  const PowerFit f_lo = fit_for_exponent(d, lo), f_hi = fit_for_exponent(d, hi);
  if (!f_lo.ok || !f_hi.ok) return std::nullopt;
  if (f_lo.slope >= 0) return lo;
  if (f_hi.slope <= 0) return hi;
  // b: best estimate; a: previous estimate; c: the other end of the bracket.
  double a = lo, b = hi, c = hi, ga = f_lo.slope, gb = f_hi.slope, gc = gb;
  double step = b - a, prev_step = step;
  for (int it = 0; it < 100; ++it) {
    if ((gb > 0) == (gc > 0)) {  // keep the root between b and c
      c = a;
      gc = ga;
      step = prev_step = b - a;
    }
    if (std::abs(gc) < std::abs(gb)) {  // b is the point with the smaller slope
      a = b;
      b = c;
      c = a;
      ga = gb;
      gb = gc;
      gc = ga;
    }
    const double half = 0.5 * (c - b);
    if (std::abs(half) <= tolerance || gb == 0) return b;
    if (std::abs(prev_step) >= tolerance && std::abs(ga) > std::abs(gb)) {
      // Secant (two points) or inverse quadratic interpolation (three).
      const double s = gb / ga;
      double p, q;
      if (a == c) {
        p = 2 * half * s;
        q = 1 - s;
      } else {
        const double qa = ga / gc, r = gb / gc;
        p = s * (2 * half * qa * (qa - r) - (b - a) * (r - 1));
        q = (qa - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      p = std::abs(p);
      if (2 * p < std::min(3 * half * q - std::abs(tolerance * q), std::abs(prev_step * q))) {
        prev_step = step;
        step = p / q;
      } else {
        step = prev_step = half;  // interpolation not trusted: bisect
      }
    } else {
      step = prev_step = half;
    }
    a = b;
    ga = gb;
    b += std::abs(step) > tolerance ? step : std::copysign(tolerance, half);
    const PowerFit f = fit_for_exponent(d, b);
    if (!f.ok) return std::nullopt;
    gb = f.slope;
  }
  return b;
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
  // b on [0.1, 5] to 1e-6: far below its reading precision (two decimals).
  const std::optional<double> b = best_exponent(d, 0.1, 5.0, 1e-6);
  if (!b) return std::nullopt;
  const PowerFit best = fit_for_exponent(d, *b);
  if (!best.ok) return std::nullopt;
  const double mean = d.sum_p / d.n;
  double ss_tot = 0, ss_res = 0;
  for (std::size_t i = 0; i < t_s.size(); ++i) {
    const double x = t_s[i] > 0 ? std::exp(*b * std::log(t_s[i])) : 0.0;
    const double r = paw_cmH2O[i] - (best.a * x + best.c);
    ss_res += r * r;
    ss_tot += (paw_cmH2O[i] - mean) * (paw_cmH2O[i] - mean);
  }
  StressIndexFit fit;
  fit.b = *b;
  fit.a = best.a;
  fit.c = cmH2O(best.c);
  fit.r_squared = ss_tot > 0 ? 1.0 - ss_res / ss_tot : 0.0;
  fit.samples = static_cast<int>(t_s.size());
  return fit;
}

}  // namespace bb::wave
