// Bad PPV input is refused with an InputError naming the field.
#include <gtest/gtest.h>

#include <functional>

#include "breathbeat/haemodynamics.hpp"
#include "breathbeat/thresholds.hpp"

namespace bb {
namespace {

std::string error_field(const std::function<void()>& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.field();
  }
  return "(no error)";
}

// The field (an id) and, for a value inside a list, the place in its problem.
std::string error_field_and_place(const std::function<void()>& f) {
  try {
    f();
  } catch (const InputError& e) {
    return e.field() + " | " + e.problem();
  }
  return "(no error)";
}

bool starts_with(const std::string& s, const std::string& prefix) {
  return s.rfind(prefix, 0) == 0;
}

TEST(PpvValidation, FewerThanThreeBreathsIsRefused) {
  // PPV is averaged over at least three breaths (Michard et al., AJRCCM 2000;162:134)
  const Thresholds t = Thresholds::built_in();
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47");
  EXPECT_EQ(error_field([&] { validate_ppv(in, t); }), "pp_cycles");
}

TEST(PpvValidation, PulsePressureMinimumAboveMaximumIsRefused) {
  const Thresholds t = Thresholds::built_in();
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,47/60,63/50");
  EXPECT_TRUE(starts_with(error_field_and_place([&] { validate_ppv(in, t); }),
                          "pp_cycles | breath 2: PPmin"));
}

TEST(PpvValidation, NegativePressureIsRefused) {
  const Thresholds t = Thresholds::built_in();
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/-47,63/50");
  EXPECT_EQ(error_field_and_place([&] { validate_ppv(in, t); }),
            "pp_cycles | breath 2, PPmin must be positive");
}

TEST(PpvValidation, MalformedCyclesAreRefused) {
  EXPECT_EQ(error_field([] { parse_pulse_pressure_cycles("62-48,60/47,63/50"); }), "pp_cycles");
  EXPECT_TRUE(
      starts_with(error_field_and_place([] { parse_pulse_pressure_cycles("62/48,,63/50"); }),
                  "pp_cycles | breath 2 is not"));
  EXPECT_TRUE(
      starts_with(error_field_and_place([] { parse_pulse_pressure_cycles("62/abc,60/47,63/50"); }),
                  "pp_cycles | breath 1, PPmin "));
  EXPECT_EQ(error_field([] { parse_pulse_pressure_cycles(""); }), "pp_cycles");
  EXPECT_EQ(error_field([] { parse_pulse_pressure_cycles("62/48/40,60/47,63/50"); }), "pp_cycles");
  // A caller reading another source names its own field.
  EXPECT_EQ(error_field([] { parse_pulse_pressure_cycles("", "circulation.pp_cycles"); }),
            "circulation.pp_cycles");
}

TEST(PpvValidation, BeatsNeedDiastolicBelowSystolicAndTwoBeatsPerBreath) {
  const Thresholds t = Thresholds::built_in();
  PpvInputs in;
  in.beats = parse_beats_by_breath("120/70,118/69;119/70,70/116;121/71,117/68");
  EXPECT_TRUE(starts_with(error_field_and_place([&] { validate_ppv(in, t); }),
                          "beats | breath 2, beat 2: DBP"));
  in.beats = parse_beats_by_breath("120/70,118/69;119/70;121/71,117/68");
  EXPECT_TRUE(starts_with(error_field_and_place([&] { validate_ppv(in, t); }),
                          "beats | breath 2 has fewer than 2 beats"));
  EXPECT_EQ(error_field([] { parse_beats_by_breath("120/70,118/69;;121/71,117/68"); }), "beats");
}

TEST(PpvValidation, CyclesAndBeatsTogetherAreRefused) {
  const Thresholds t = Thresholds::built_in();
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
  in.beats = parse_beats_by_breath("120/70,118/69;119/70,116/68;121/71,117/68");
  EXPECT_EQ(error_field([&] { validate_ppv(in, t); }), "beats");
}

TEST(PpvValidation, UnitsWrittenPerNumberAreRead) {
  // 8.266 kPa = 62 mmHg (1 kPa = 7.50062 mmHg, NIST SP 811, 2008)
  const auto c = parse_pulse_pressure_cycles("8.266kPa/48,60/47,63/50");
  EXPECT_NEAR(in_mmHg(c[0].pp_max), 62.0, 0.01);
}

TEST(PpvValidation, NegativeConditionsAreRefusedEvenWhenImplausibleIsAllowed) {
  Thresholds t = Thresholds::built_in();
  t.allow_implausible(true);
  PpvInputs in;
  in.cycles = parse_pulse_pressure_cycles("62/48,60/47,63/50");
  in.conditions.hr = per_min(-80);
  EXPECT_EQ(error_field([&] { validate_ppv(in, t); }), "hr");
  in.conditions.hr = per_min(80);
  in.conditions.crs = mL_per_cmH2O(0);
  EXPECT_EQ(error_field([&] { validate_ppv(in, t); }), "crs");
  in.conditions.crs.reset();
  EXPECT_EQ(error_field([&] { validate_ppv(in, t); }), "(no error)");
}

TEST(PercentPoints, BareNumberIsPercent) {
  EXPECT_NEAR(in_percent(parse_percent_points("12", "svv")), 12.0, 1e-12);   // by definition of %
  EXPECT_NEAR(in_percent(parse_percent_points("12%", "svv")), 12.0, 1e-12);  // by definition of %
  EXPECT_NEAR(in_percent(parse_percent_points("0.5%", "svv")), 0.5, 1e-12);  // by definition of %
  // A bare 0.5 may be a fraction: refused (common practice, no source).
  EXPECT_EQ(error_field([] { parse_percent_points("0.5", "svv"); }), "svv");
  EXPECT_EQ(error_field([] { parse_percent_points("12 mmHg", "svv"); }), "svv");
}

}  // namespace
}  // namespace bb
