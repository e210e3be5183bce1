// Must NOT compile: a volume passed where a pressure is expected. ctest runs the
// compiler on this file and expects failure (WILL_FAIL).
#include "breathbeat/units.hpp"

int main() {
  const bb::Pressure p = bb::cmH2O(25) - bb::mL(10);
  return p.value() > 0 ? 0 : 1;
}
