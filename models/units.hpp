// Strong types for the physical quantities pbfleet computes with.
//
// One small struct per quantity and no implicit conversions, so that a
// Fahrenheit/Celsius or volt/millivolt mix-up fails to compile instead of
// skewing a state-of-charge figure. Fahrenheit never enters the models: it is
// converted at the edges (CLI and API parsing) with the helpers below.
#pragma once

#include <compare>

namespace pbfleet::models {

struct Celsius {
  double value;
  auto operator<=>(const Celsius&) const = default;
};
struct Kelvin {
  double value;
  auto operator<=>(const Kelvin&) const = default;
};
struct Volts {
  double value;
  auto operator<=>(const Volts&) const = default;
};
// Specific gravity, dimensionless. Model basis (see specific_gravity.hpp):
// density of the electrolyte relative to water at the same temperature.
struct SpecificGravity {
  double value;
  auto operator<=>(const SpecificGravity&) const = default;
};
// Molality of H2SO4, mol per kg of water.
struct Molality {
  double value;
  auto operator<=>(const Molality&) const = default;
};
// Mass fraction of H2SO4 in the electrolyte, in percent (0..100).
struct WeightPercent {
  double value;
  auto operator<=>(const WeightPercent&) const = default;
};
struct Amperes {
  double value;
  auto operator<=>(const Amperes&) const = default;
};
struct Hours {
  double value;
  auto operator<=>(const Hours&) const = default;
};
struct Days {
  double value;
  auto operator<=>(const Days&) const = default;
};
// A share in percent, 0..100 (state of charge, capacity).
struct Percent {
  double value;
  auto operator<=>(const Percent&) const = default;
};

// 0 degC = 273.15 K (SI definition of the kelvin scale offset).
inline constexpr double kCelsiusToKelvinOffset = 273.15;

// Thermodynamic temperature of a Celsius value (K).
constexpr Kelvin to_kelvin(Celsius t) { return Kelvin{t.value + kCelsiusToKelvinOffset}; }
// Celsius value of a Fahrenheit number; degF = degC * 9/5 + 32 (definition).
constexpr Celsius celsius_from_fahrenheit(double degrees_f) {
  return Celsius{(degrees_f - 32.0) * 5.0 / 9.0};
}
// Fahrenheit number of a Celsius value, for display only.
constexpr double fahrenheit_from_celsius(Celsius t) { return t.value * 9.0 / 5.0 + 32.0; }

}  // namespace pbfleet::models
