// Cross-check of the equation-of-motion fit (Bates, Lung Mechanics: An Inverse
// Modeling Approach, 2009) against a general-purpose reference library:
// numpy.linalg.lstsq on the same samples, run with Debian's /usr/bin/python3.
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iomanip>
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

TEST(NumpyCrossCheck, EquationOfMotionMatchesNumpyLstsq) {
  const std::string python = BREATHBEAT_PYTHON;
  int status = 0;
  if (python.empty())
    GTEST_SKIP() << "no /usr/bin/python3 (scripts/bootstrap installs python3-numpy)";
  run_capture(python + " -c 'import numpy' 2>/dev/null", status);
  if (status != 0)
    GTEST_SKIP() << "python3-numpy missing in " << python << " (scripts/bootstrap installs it)";

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
  const std::string out = run_capture(python + " -c \"" + script + "\"", status);
  ASSERT_EQ(status, 0) << out;
  std::istringstream in(out);
  double r = 0, e = 0, p0 = 0;
  in >> r >> e >> p0;
  // Same least-squares problem: agreement to rounding (numpy.linalg.lstsq as reference).
  EXPECT_NEAR(in_cmH2O_per_L_per_s(fit->resistance), r, 1e-6);
  EXPECT_NEAR(in_cmH2O_per_L(fit->elastance), e, 1e-6);
  EXPECT_NEAR(in_cmH2O(fit->p0), p0, 1e-6);
  // And both near the truth despite the noise (synthetic truth, 3 %).
  EXPECT_NEAR(r, spec.resistance, 0.03 * spec.resistance);
  EXPECT_NEAR(e, spec.elastance, 0.03 * spec.elastance);
}

}  // namespace
}  // namespace bb::wave
