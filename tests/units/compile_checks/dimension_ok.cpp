// Positive control for dimension_mismatch.cpp: the same code with matching
// dimensions compiles.
#include "breathbeat/units.hpp"

int main() {
  const bb::Pressure p = bb::cmH2O(25) - bb::cmH2O(10);
  const bb::Compliance c = bb::mL(500) / p;
  return c.value() > 0 ? 0 : 1;
}
