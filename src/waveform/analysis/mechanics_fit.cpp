// Equation-of-motion least squares (Bates, Lung Mechanics: An Inverse Modeling
// Approach, 2009) and the stress index (Ranieri et al., Anesthesiology
// 2000;93:1320). See include/breathbeat/waveform/mechanics_fit.hpp.
#include "breathbeat/waveform/mechanics_fit.hpp"

#include <Eigen/Dense>
#include <cmath>
#include <numeric>
#include <vector>

namespace bb::wave {

namespace {

double r_squared_of(const Eigen::VectorXd& y, const Eigen::VectorXd& fitted) {
  const double mean = y.mean();
  const double ss_tot = (y.array() - mean).square().sum();
  const double ss_res = (y - fitted).squaredNorm();
  return ss_tot > 0 ? 1.0 - ss_res / ss_tot : 0.0;
}

}  // namespace

std::optional<EquationOfMotionFit> fit_equation_of_motion(std::span<const double> paw_cmH2O,
                                                          std::span<const double> flow_L_s,
                                                          std::span<const double> volume_L) {
  const auto n = static_cast<Eigen::Index>(paw_cmH2O.size());
  if (n < 5 || flow_L_s.size() != paw_cmH2O.size() || volume_L.size() != paw_cmH2O.size()) {
    return std::nullopt;
  }
  Eigen::MatrixXd a(n, 3);
  Eigen::VectorXd y(n);
  for (Eigen::Index i = 0; i < n; ++i) {
    a(i, 0) = flow_L_s[i];
    a(i, 1) = volume_L[i];
    a(i, 2) = 1.0;
    y(i) = paw_cmH2O[i];
  }
  const Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(a);
  if (qr.rank() < 3) return std::nullopt;
  const Eigen::Vector3d x = qr.solve(y);
  EquationOfMotionFit fit;
  fit.resistance = cmH2O_per_L_per_s(x(0));
  fit.elastance = cmH2O_per_L(x(1));
  fit.compliance = x(1) != 0 ? Compliance(1.0 / fit.elastance) : Compliance::from_value(0.0);
  fit.p0 = cmH2O(x(2));
  fit.r_squared = r_squared_of(y, a * x);
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

struct PowerFit {
  double a = 0, c = 0, rss = 0;
};

// For a fixed exponent b, P = a t^b + c is linear in a and c. `log_t` holds
// log(t) so that t^b = exp(b log t) costs one exp per sample; `x` is scratch
// space of the same length (t^b, reused for the residuals).
PowerFit fit_for_exponent(std::span<const double> log_t, std::span<const double> p, double b,
                          std::vector<double>& x) {
  const auto n = static_cast<double>(log_t.size());
  double sx = 0, sy = 0, sxx = 0, sxy = 0;
  for (std::size_t i = 0; i < log_t.size(); ++i) {
    x[i] = std::exp(b * log_t[i]);
    sx += x[i];
    sy += p[i];
    sxx += x[i] * x[i];
    sxy += x[i] * p[i];
  }
  const double det = n * sxx - sx * sx;
  PowerFit f;
  if (det == 0) {
    f.rss = std::numeric_limits<double>::infinity();
    return f;
  }
  f.a = (n * sxy - sx * sy) / det;
  f.c = (sy - f.a * sx) / n;
  for (std::size_t i = 0; i < log_t.size(); ++i) {
    const double r = p[i] - (f.a * x[i] + f.c);
    f.rss += r * r;
  }
  return f;
}

}  // namespace

std::optional<StressIndexFit> fit_stress_index(std::span<const double> t_s,
                                               std::span<const double> paw_cmH2O) {
  if (t_s.size() < 8 || t_s.size() != paw_cmH2O.size()) return std::nullopt;
  // Golden-section search of the exponent: the residual is unimodal in b for
  // monotone inflation curves.
  const double golden = 0.5 * (std::sqrt(5.0) - 1.0);
  // t^b with t = 0 is 0 for every b > 0: exp(b log 0) = exp(-inf) = 0.
  std::vector<double> log_t(t_s.size()), x(t_s.size());
  for (std::size_t i = 0; i < t_s.size(); ++i) log_t[i] = std::log(t_s[i]);
  double lo = 0.1, hi = 5.0;
  double x1 = hi - golden * (hi - lo), x2 = lo + golden * (hi - lo);
  double f1 = fit_for_exponent(log_t, paw_cmH2O, x1, x).rss;
  double f2 = fit_for_exponent(log_t, paw_cmH2O, x2, x).rss;
  for (int it = 0; it < 80 && hi - lo > 1e-5; ++it) {  // b to 1e-5: far below its reading precision
    if (f1 < f2) {
      hi = x2;
      x2 = x1;
      f2 = f1;
      x1 = hi - golden * (hi - lo);
      f1 = fit_for_exponent(log_t, paw_cmH2O, x1, x).rss;
    } else {
      lo = x1;
      x1 = x2;
      f1 = f2;
      x2 = lo + golden * (hi - lo);
      f2 = fit_for_exponent(log_t, paw_cmH2O, x2, x).rss;
    }
  }
  const double b = 0.5 * (lo + hi);
  const PowerFit best = fit_for_exponent(log_t, paw_cmH2O, b, x);
  const double mean = std::accumulate(paw_cmH2O.begin(), paw_cmH2O.end(), 0.0) / paw_cmH2O.size();
  double ss_tot = 0;
  for (double p : paw_cmH2O) ss_tot += (p - mean) * (p - mean);
  StressIndexFit fit;
  fit.b = b;
  fit.a = best.a;
  fit.c = cmH2O(best.c);
  fit.r_squared = ss_tot > 0 ? 1.0 - best.rss / ss_tot : 0.0;
  fit.samples = static_cast<int>(t_s.size());
  return fit;
}

}  // namespace bb::wave
