// The median and quantile helpers of the waveform analysis, checked against a
// full std::sort of the same values (the C++ standard library as reference).
#include <gtest/gtest.h>

#include <algorithm>
#include <random>
#include <vector>

#include "../../src/waveform/analysis/stats.hpp"

namespace bb::wave {
namespace {

double sorted_median(std::vector<double> v) {  // textbook definition on a sorted copy
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 == 1 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

std::vector<std::vector<double>> awkward_inputs() {
  std::mt19937 rng(20261202);
  std::vector<std::vector<double>> cases;
  for (std::size_t n : {1u, 2u, 3u, 16u, 17u, 18u, 100u, 281u, 1000u}) {
    std::vector<double> smooth(n), few(n), same(n, 5.0), up(n), down(n), spikes(n);
    std::uniform_real_distribution<double> uniform(-10, 10);
    std::uniform_int_distribution<int> level(0, 2);
    for (std::size_t i = 0; i < n; ++i) {
      smooth[i] = uniform(rng);
      few[i] = level(rng);  // many equal values, as in quantised recordings
      up[i] = static_cast<double>(i);
      down[i] = static_cast<double>(n - i);
      spikes[i] = i % 7 == 0 ? 1e6 : 1.0;
    }
    for (auto* v : {&smooth, &few, &same, &up, &down, &spikes}) cases.push_back(*v);
  }
  return cases;
}

TEST(Stats, MedianEqualsTheMedianOfTheSortedValues) {
  for (std::vector<double> v : awkward_inputs()) {
    const double expected = sorted_median(v);
    EXPECT_DOUBLE_EQ(median_of(v), expected) << "n = " << v.size();
  }
  std::vector<double> none;
  EXPECT_TRUE(std::isnan(median_of(none)));
}

TEST(Stats, QuantilesInterpolateBetweenOrderStatistics) {
  // Linear interpolation between order statistics (Hyndman and Fan, Am Stat 1996, definition 7,
  // the default of numpy.quantile and R): for 1..10, q = 0.1 -> 1.9, q = 0.9 -> 9.1.
  std::vector<double> v{10, 9, 8, 7, 6, 5, 4, 3, 2, 1};
  EXPECT_DOUBLE_EQ(quantile_of(v, 0.1), 1.9);
  EXPECT_DOUBLE_EQ(quantile_of(v, 0.9), 9.1);
  EXPECT_DOUBLE_EQ(quantile_of(v, 0.5), 5.5);
  EXPECT_DOUBLE_EQ(quantile_of(v, 0.0), 1.0);
  EXPECT_DOUBLE_EQ(quantile_of(v, 1.0), 10.0);
  std::vector<double> none;
  EXPECT_TRUE(std::isnan(quantile_of(none, 0.5)));
}

}  // namespace
}  // namespace bb::wave
