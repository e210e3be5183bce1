// Inner stages of the waveform engine on synthetic signals (no I/O): slope-sum
// beat detection, breath detection with per-breath mechanics, the
// equation-of-motion fit and the stress-index fit of one breath. Figures: docs/performance.md.
#include <benchmark/benchmark.h>

#include "breathbeat/thresholds.hpp"
#include "breathbeat/waveform/beats.hpp"
#include "breathbeat/waveform/breaths.hpp"
#include "breathbeat/waveform/mechanics_fit.hpp"
#include "synthetic_signals.hpp"

namespace {

const bb::test::Synth& signals() {
  static const bb::test::Synth s = [] {
    bb::test::SynthSpec spec;
    spec.fs = 125;
    spec.duration_s = 600;
    spec.noise_abp_mmHg = 0.5;
    spec.noise_paw_cmH2O = 0.2;
    return bb::test::make_synth(spec);
  }();
  return s;
}

void BM_SlopeSumBeats(benchmark::State& state) {
  const auto& s = signals();
  const auto settings = bb::wave::beat_settings(bb::Thresholds::built_in(), 125);
  std::vector<bb::wave::Beat> beats;
  for (auto _ : state) {
    bb::wave::BeatDetector d(settings);
    beats.clear();
    d.push(s.abp, 0.0, beats);
    d.finish(beats);
    benchmark::DoNotOptimize(beats.data());
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(s.abp.size()));
}
BENCHMARK(BM_SlopeSumBeats)->Unit(benchmark::kMillisecond);

void BM_BreathsWithMechanics(benchmark::State& state) {
  const auto& s = signals();
  const auto settings = bb::wave::breath_settings(
      bb::Thresholds::built_in(), 125, bb::wave::BreathSignal::airway_pressure, true, true);
  std::vector<bb::wave::Breath> breaths;
  for (auto _ : state) {
    bb::wave::BreathDetector d(settings);
    breaths.clear();
    d.push(s.paw, s.flow, {}, 0.0, breaths);
    d.finish(breaths);
    benchmark::DoNotOptimize(breaths.data());
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(s.paw.size()));
}
BENCHMARK(BM_BreathsWithMechanics)->Unit(benchmark::kMillisecond);

void BM_BreathsPressureOnly(benchmark::State& state) {
  const auto& s = signals();
  const auto settings = bb::wave::breath_settings(
      bb::Thresholds::built_in(), 125, bb::wave::BreathSignal::airway_pressure, true, false);
  std::vector<bb::wave::Breath> breaths;
  for (auto _ : state) {
    bb::wave::BreathDetector d(settings);
    breaths.clear();
    d.push(s.paw, {}, {}, 0.0, breaths);
    d.finish(breaths);
    benchmark::DoNotOptimize(breaths.data());
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(s.paw.size()));
}
BENCHMARK(BM_BreathsPressureOnly)->Unit(benchmark::kMillisecond);

void BM_EquationOfMotionFit(benchmark::State& state) {
  const auto& s = signals();
  const auto from = static_cast<std::size_t>(s.breath_starts[5] * 125);
  const auto to = static_cast<std::size_t>(s.breath_starts[6] * 125);
  std::vector<double> paw(s.paw.begin() + from, s.paw.begin() + to);
  std::vector<double> flow(s.flow.begin() + from, s.flow.begin() + to);
  std::vector<double> vol(flow.size());
  bb::wave::integrate_volume(flow, 125, true, vol);
  for (auto _ : state) {
    auto fit = bb::wave::fit_equation_of_motion(paw, flow, vol);
    benchmark::DoNotOptimize(fit);
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_EquationOfMotionFit)->Unit(benchmark::kMicrosecond);

void BM_StressIndexFit(benchmark::State& state) {
  // The inflation of one synthetic breath: its first 40 % (constant flow).
  const auto& s = signals();
  const auto from = static_cast<std::size_t>(s.breath_starts[5] * 125);
  const auto to = static_cast<std::size_t>(s.breath_starts[6] * 125);
  const std::size_t n = (to - from) * 4 / 10;
  std::vector<double> t(n), paw(s.paw.begin() + from, s.paw.begin() + from + n);
  for (std::size_t i = 0; i < n; ++i) t[i] = static_cast<double>(i) / 125;
  for (auto _ : state) {
    auto fit = bb::wave::fit_stress_index(t, paw);
    benchmark::DoNotOptimize(fit);
  }
  state.SetItemsProcessed(state.iterations());
}
BENCHMARK(BM_StressIndexFit)->Unit(benchmark::kMicrosecond);

}  // namespace
