// Cross-checks against general-purpose reference libraries, run with Debian's
// /usr/bin/python3: the equation-of-motion fit (Bates, Lung Mechanics: An
// Inverse Modeling Approach, 2009) against numpy.linalg.lstsq, and the
// stress-index fit (Ranieri et al., Anesthesiology 2000) against
// scipy.optimize.curve_fit, each on the same samples.
#include <gtest/gtest.h>

#include <array>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iomanip>
#include <optional>
#include <sstream>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/breaths.hpp"
#include "breathbeat/waveform/mechanics_fit.hpp"
#include "cli_runner.hpp"
#include "synthetic_signals.hpp"

namespace bb::wave {
namespace {

std::string run_capture(const std::string& command, int& status) {
  std::string out;
  FILE* pipe = popen(command.c_str(), "r");
  if (!pipe) {
    status = -1;
    return out;
  }
  char buf[512];
  while (std::fgets(buf, sizeof buf, pipe)) out += buf;
  status = pclose(pipe);
  return out;
}

// Why the reference library cannot be used here, or empty when it can.
std::string missing_module(const std::string& module, const std::string& package) {
  const std::string python = BREATHBEAT_PYTHON;
  if (python.empty()) return "no /usr/bin/python3 (scripts/bootstrap installs " + package + ")";
  int status = 0;
  run_capture(python + " -c 'import " + module + "' 2>/dev/null", status);
  if (status != 0) return package + " missing in " + python + " (scripts/bootstrap installs it)";
  return "";
}

// Runs a one-line script with the reference Python and reads the three numbers it prints.
std::optional<std::array<double, 3>> three_numbers_from(const std::string& script) {
  int status = 0;
  const std::string out =
      run_capture(std::string(BREATHBEAT_PYTHON) + " -c \"" + script + "\"", status);
  std::array<double, 3> x{};
  std::istringstream in(out);
  if (status != 0 || !(in >> x[0] >> x[1] >> x[2])) {
    ADD_FAILURE() << "reference script failed (status " << status << "): " << out;
    return std::nullopt;
  }
  return x;
}

TEST(NumpyCrossCheck, EquationOfMotionMatchesNumpyLstsq) {
  if (const std::string why = missing_module("numpy", "python3-numpy"); !why.empty())
    GTEST_SKIP() << why;

  // One noisy breath of the synthetic ventilator (synthetic truth R 10, E 25).
  test::SynthSpec spec;
  spec.fs = 125;
  spec.duration_s = 30;
  spec.noise_paw_cmH2O = 0.3;
  const test::Synth s = test::make_synth(spec);
  const auto from = static_cast<std::size_t>(std::llround(s.breath_starts[3] * spec.fs));
  const auto to = static_cast<std::size_t>(std::llround(s.breath_starts[4] * spec.fs));
  std::vector<double> paw(s.paw.begin() + from, s.paw.begin() + to);
  std::vector<double> flow(s.flow.begin() + from, s.flow.begin() + to);
  std::vector<double> vol(flow.size());
  integrate_volume(flow, spec.fs, false, vol);
  const auto fit = fit_equation_of_motion(paw, flow, vol);
  ASSERT_TRUE(fit);

  const std::string dir = test::temp_dir("numpy_eom");
  const std::string data = dir + "/breath.csv";
  {
    std::ofstream out(data);
    out << std::setprecision(17);
    for (std::size_t i = 0; i < paw.size(); ++i)
      out << flow[i] << "," << vol[i] << "," << paw[i] << "\n";
  }
  const std::string script =
      "import numpy as np; d = np.loadtxt('" + data +
      "', delimiter=','); A = np.column_stack([d[:,0], d[:,1], np.ones(len(d))]); "
      "x = np.linalg.lstsq(A, d[:,2], rcond=None)[0]; print('%.12f %.12f %.12f' % tuple(x))";
  const auto x = three_numbers_from(script);
  ASSERT_TRUE(x);
  const auto [r, e, p0] = *x;
  // Same least-squares problem: agreement to rounding (numpy.linalg.lstsq as reference).
  EXPECT_NEAR(in_cmH2O_per_L_per_s(fit->resistance), r, 1e-6);
  EXPECT_NEAR(in_cmH2O_per_L(fit->elastance), e, 1e-6);
  EXPECT_NEAR(in_cmH2O(fit->p0), p0, 1e-6);
  // And both near the truth despite the noise (synthetic truth, 3 %).
  EXPECT_NEAR(r, spec.resistance, 0.03 * spec.resistance);
  EXPECT_NEAR(e, spec.elastance, 0.03 * spec.elastance);
}

TEST(ScipyCrossCheck, StressIndexMatchesScipyCurveFit) {
  if (const std::string why = missing_module("scipy.optimize", "python3-scipy"); !why.empty())
    GTEST_SKIP() << why;

  // Constant-flow inflations P = c + a t^b from t = 0 (Ranieri 2000 model) with pseudo-random
  // noise; b, a, c and the noise are synthetic. The same samples go to scipy.
  const std::string dir = test::temp_dir("scipy_stress_index");
  for (double b_true : {0.6, 1.0, 1.5}) {
    std::vector<double> t, p;
    unsigned state = 12345;
    for (int i = 0; i < 120; ++i) {
      state = state * 1103515245u + 12345u;  // small LCG: reproducible noise of +-0.25 cmH2O
      const double noise = (static_cast<double>((state >> 16) & 0x7fff) / 32767.0 - 0.5) * 0.5;
      t.push_back(i / 125.0);
      p.push_back(5.0 + 18.0 * std::pow(i / 125.0, b_true) + noise);
    }
    const auto fit = fit_stress_index(t, p);
    ASSERT_TRUE(fit);
    const std::string data = dir + "/inflation.csv";
    {
      std::ofstream out(data);
      out << std::setprecision(17);
      for (std::size_t i = 0; i < t.size(); ++i) out << t[i] << "," << p[i] << "\n";
    }
    const std::string script =
        "import numpy as np; from scipy.optimize import curve_fit; d = np.loadtxt('" + data +
        "', delimiter=','); f = lambda t, a, b, c: a * np.power(t, b) + c; "
        "x = curve_fit(f, d[:,0], d[:,1], p0=[10.0, 1.0, 0.0], bounds=([-1e6, 0.1, -1e6], "
        "[1e6, 5.0, 1e6]), xtol=1e-12, ftol=1e-12, gtol=1e-12)[0]; "
        "print('%.12f %.12f %.12f' % tuple(x))";
    const auto x = three_numbers_from(script);
    ASSERT_TRUE(x);
    const auto [a, b, c] = *x;
    // Same least-squares problem: agreement to the solvers' tolerances (scipy as reference).
    EXPECT_NEAR(fit->b, b, 1e-4) << "b_true " << b_true;
    EXPECT_NEAR(fit->a, a, 1e-3 * std::abs(a)) << "b_true " << b_true;
    EXPECT_NEAR(in_cmH2O(fit->c), c, 1e-3) << "b_true " << b_true;
    // And near the synthetic truth despite the noise.
    EXPECT_NEAR(fit->b, b_true, 0.05);
  }
}

}  // namespace
}  // namespace bb::wave
