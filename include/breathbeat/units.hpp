// Unit-safe quantities for bedside physiology.
//
// Every physical value inside the library is a Boost.Units quantity in SI, so a
// pressure cannot be passed where a volume is expected: the mistake does not
// compile. Values enter through the named constructors below (cmH2O(25),
// mL(500), per_min(20)) and leave through the matching in_*() readers, which
// are the only places a bedside unit meets SI.
//
// Conversion factors: NIST Special Publication 811 (Thompson & Taylor, 2008),
// Appendix B.8 and B.9.
#pragma once

#include <boost/units/quantity.hpp>
#include <boost/units/systems/si.hpp>

namespace bb {

namespace bu = boost::units;
namespace si = boost::units::si;

// ---- dimensions used at the bedside --------------------------------------
using Pressure = bu::quantity<si::pressure>;
using Volume = bu::quantity<si::volume>;
using Flow = bu::quantity<bu::divide_typeof_helper<si::volume, si::time>::type>;
using Time = bu::quantity<si::time>;
using Length = bu::quantity<si::length>;
using Area = bu::quantity<si::area>;
using Mass = bu::quantity<si::mass>;
using Frequency = bu::quantity<si::frequency>;
using Power = bu::quantity<si::power>;
using Energy = bu::quantity<si::energy>;
using MassConcentration = bu::quantity<si::mass_density>;
using AmountConcentration = bu::quantity<bu::divide_typeof_helper<si::amount, si::volume>::type>;
using Compliance = bu::quantity<bu::divide_typeof_helper<si::volume, si::pressure>::type>;
using Elastance = bu::quantity<bu::divide_typeof_helper<si::pressure, si::volume>::type>;
using Resistance = bu::quantity<bu::divide_typeof_helper<si::pressure, Flow::unit_type>::type>;
using VolumePerMass = bu::quantity<bu::divide_typeof_helper<si::volume, si::mass>::type>;
using FlowPerArea = bu::quantity<bu::divide_typeof_helper<Flow::unit_type, si::area>::type>;
using Ratio = bu::quantity<si::dimensionless>;

// ---- conversion factors (NIST SP 811, 2008, Appendix B) -------------------
namespace factor {
inline constexpr double kPascalPerCmH2O = 98.0665;       // centimetre of water, conventional
inline constexpr double kPascalPerMmHg = 133.322387415;  // millimetre of mercury, conventional
inline constexpr double kPascalPerKPa = 1000.0;
inline constexpr double kCubicMetrePerLitre = 1.0e-3;
inline constexpr double kSecondPerMinute = 60.0;
inline constexpr double kSecondPerHour = 3600.0;
inline constexpr double kSecondPerDay = 86400.0;   // day (d), NIST SP 811 table 6
inline constexpr double kKgPerM3PerGPerDL = 10.0;  // 1 g/dL = 10 g/L = 10 kg/m3
// Haemoglobin monomer 16.11 kDa: 1 mmol/L = 1.611 g/dL (common practice in
// Dutch and Nordic laboratories; the monomer mass is from memory).
inline constexpr double kGPerDLPerMmolPerL = 1.611;
}  // namespace factor

// ---- constructors from bedside units ---------------------------------------
inline Pressure pascal(double v) {
  return Pressure::from_value(v);
}
inline Pressure cmH2O(double v) {
  return Pressure::from_value(v * factor::kPascalPerCmH2O);
}
inline Pressure mmHg(double v) {
  return Pressure::from_value(v * factor::kPascalPerMmHg);
}
inline Pressure kPa(double v) {
  return Pressure::from_value(v * factor::kPascalPerKPa);
}

inline Volume litre(double v) {
  return Volume::from_value(v * factor::kCubicMetrePerLitre);
}
inline Volume mL(double v) {
  return Volume::from_value(v * factor::kCubicMetrePerLitre * 1e-3);
}

inline Flow L_per_min(double v) {
  return Flow::from_value(v * factor::kCubicMetrePerLitre / factor::kSecondPerMinute);
}
inline Flow L_per_s(double v) {
  return Flow::from_value(v * factor::kCubicMetrePerLitre);
}
inline Flow mL_per_min(double v) {
  return L_per_min(v / 1000.0);
}

inline Time seconds(double v) {
  return Time::from_value(v);
}
inline Time minutes(double v) {
  return Time::from_value(v * factor::kSecondPerMinute);
}

inline Length cm(double v) {
  return Length::from_value(v * 1e-2);
}
inline Length mm(double v) {
  return Length::from_value(v * 1e-3);
}
inline Length metre(double v) {
  return Length::from_value(v);
}

inline Area square_metre(double v) {
  return Area::from_value(v);
}
inline Area square_cm(double v) {
  return Area::from_value(v * 1e-4);
}

inline Mass kg(double v) {
  return Mass::from_value(v);
}
inline Mass gram(double v) {
  return Mass::from_value(v * 1e-3);
}

inline Frequency per_min(double v) {
  return Frequency::from_value(v / factor::kSecondPerMinute);
}
inline Frequency hertz(double v) {
  return Frequency::from_value(v);
}

inline Power J_per_min(double v) {
  return Power::from_value(v / factor::kSecondPerMinute);
}
inline Power watt(double v) {
  return Power::from_value(v);
}

inline MassConcentration g_per_dL(double v) {
  return MassConcentration::from_value(v * factor::kKgPerM3PerGPerDL);
}
inline MassConcentration g_per_L(double v) {
  return MassConcentration::from_value(v);
}
inline MassConcentration hb_mmol_per_L(double v) {
  return g_per_dL(v * factor::kGPerDLPerMmolPerL);
}

// mol/m3 equals mmol/L.
inline AmountConcentration mmol_per_L(double v) {
  return AmountConcentration::from_value(v);
}

inline Compliance mL_per_cmH2O(double v) {
  return mL(v) / cmH2O(1.0);
}
inline Elastance cmH2O_per_L(double v) {
  return cmH2O(v) / litre(1.0);
}
inline Resistance cmH2O_per_L_per_s(double v) {
  return cmH2O(v) / L_per_s(1.0);
}
inline VolumePerMass mL_per_kg(double v) {
  return mL(v) / kg(1.0);
}

inline Ratio fraction(double v) {
  return Ratio::from_value(v);
}
inline Ratio percent(double v) {
  return Ratio::from_value(v / 100.0);
}

// ---- readers into bedside units --------------------------------------------
inline double in_cmH2O(Pressure p) {
  return p.value() / factor::kPascalPerCmH2O;
}
inline double in_mmHg(Pressure p) {
  return p.value() / factor::kPascalPerMmHg;
}
inline double in_kPa(Pressure p) {
  return p.value() / factor::kPascalPerKPa;
}
inline double in_mL(Volume v) {
  return v.value() / factor::kCubicMetrePerLitre * 1e3;
}
inline double in_litre(Volume v) {
  return v.value() / factor::kCubicMetrePerLitre;
}
inline double in_L_per_min(Flow f) {
  return f.value() / factor::kCubicMetrePerLitre * factor::kSecondPerMinute;
}
inline double in_L_per_s(Flow f) {
  return f.value() / factor::kCubicMetrePerLitre;
}
inline double in_mL_per_min(Flow f) {
  return in_L_per_min(f) * 1000.0;
}
inline double in_seconds(Time t) {
  return t.value();
}
inline double in_minutes(Time t) {
  return t.value() / factor::kSecondPerMinute;
}
inline double in_cm(Length l) {
  return l.value() * 1e2;
}
inline double in_mm(Length l) {
  return l.value() * 1e3;
}
inline double in_square_metre(Area a) {
  return a.value();
}
inline double in_square_cm(Area a) {
  return a.value() * 1e4;
}
inline double in_kg(Mass m) {
  return m.value();
}
inline double in_per_min(Frequency f) {
  return f.value() * factor::kSecondPerMinute;
}
inline double in_J_per_min(Power p) {
  return p.value() * factor::kSecondPerMinute;
}
inline double in_g_per_dL(MassConcentration c) {
  return c.value() / factor::kKgPerM3PerGPerDL;
}
inline double in_g_per_L(MassConcentration c) {
  return c.value();
}
inline double in_mmol_per_L(AmountConcentration c) {
  return c.value();
}
inline double in_mL_per_cmH2O(Compliance c) {
  return c.value() * factor::kPascalPerCmH2O * 1e6;
}
inline double in_cmH2O_per_L(Elastance e) {
  return e.value() / factor::kPascalPerCmH2O * 1e-3;
}
inline double in_cmH2O_per_L_per_s(Resistance r) {
  return r.value() / factor::kPascalPerCmH2O * 1e-3;
}
inline double in_mL_per_kg(VolumePerMass v) {
  return v.value() * 1e6;
}
inline double in_fraction(Ratio r) {
  return r.value();
}
inline double in_percent(Ratio r) {
  return r.value() * 100.0;
}

}  // namespace bb
