// Cell EMF of the lead-acid couple from the Nernst equation.
//
//   Pb + PbO2 + 2 H2SO4 -> 2 PbSO4 + 2 H2O,  n = 2
//   E = E0 + (RT/F) ln(a_H2SO4 / a_H2O),  a_H2SO4 = 4 m^3 gamma_pm^3
//
// Activity data, E0, temperature coefficient and the high-molality
// extension are cited in the .cpp. CODATA 2018 values for R and F.
#pragma once

#include "models/result.hpp"
#include "models/units.hpp"

namespace pbfleet::models {

// CODATA 2018 exact values.
inline constexpr double kFaradayCPerMol = 96485.33212;
inline constexpr double kGasConstantJPerMolK = 8.314462618;
inline constexpr int kElectronsPerCellReaction = 2;

// Molality range the cell model covers (mol/kg).
inline constexpr Molality kMinModelMolality{0.1};
inline constexpr Molality kMaxModelMolality{8.0};
// Upper end of the activity table (Clegg, Rard & Pitzer 1994 model range);
// above it the EMF follows Bode's measured OCV fit (see the .cpp).
inline constexpr Molality kMaxActivityMolality{6.0};
// Electrolyte temperatures the cell model accepts (degC); the same bounds as
// the reading format. The temperature coefficient is linear about 25 degC.
inline constexpr Celsius kMinModelTemperature{-60.0};
inline constexpr Celsius kMaxModelTemperature{80.0};
// dE/dT of the cell at open circuit, V per K (positive: a warm cell reads
// higher). Value and its (secondary) source in the .cpp.
inline constexpr double kCellEmfTemperatureCoefficientVPerK = 0.00025;

// Standard EMF of the cell at 25 degC (V), calibrated to be consistent with
// the activity data used (see the .cpp).
Volts standard_cell_emf();

// Mean stoichiometric activity coefficient gamma_pm of H2SO4 at 25 degC.
Result<double> mean_activity_coefficient(Molality m);
// Water activity a_w of aqueous H2SO4 at 25 degC.
Result<double> water_activity(Molality m);

// Cell EMF (V) at molality m and electrolyte temperature t.
Result<Volts> cell_emf(Molality m, Celsius t);
// Cell EMF (V) at temperature t of a cell whose EMF at 25 degC is
// `emf_25`: the model's linear temperature law, with the same arithmetic as
// cell_emf (so cell_emf(m, t) == cell_emf_at(cell_emf(m, 25 degC), t)).
Result<Volts> cell_emf_at(Volts emf_25, Celsius t);
// Cell EMF (V) from SG 25/25 and electrolyte temperature.
Result<Volts> cell_emf_from_sg(SpecificGravity sg25, Celsius t);
// Open-circuit voltage of `cells` cells in series (V).
Volts battery_ocv(Volts cell_emf, int cells);

// Inverse model: molality whose EMF equals `cell` at temperature t, by a
// bracketed monotone solver. Error when no concentration in the model range
// produces that EMF.
Result<Molality> molality_from_cell_emf(Volts cell, Celsius t);
// The same inverse from a table built once: ln m against the 25 degC EMF,
// every knot of the activity table and the 6 mol/kg branch joint a node
// (kEmfInverseNodesPerPiece nodes between knots), cubic Hermite
// interpolation with the curve's own slopes. Same range and errors as
// molality_from_cell_emf; differs from it by less than
// kEmfInverseMaxRelativeError (tested against it). About 30 times cheaper.
Result<Molality> molality_from_cell_emf_tabulated(Volts cell, Celsius t);
inline constexpr int kEmfInverseNodesPerPiece = 64;
inline constexpr double kEmfInverseMaxRelativeError = 1e-9;
// Inverse model to SG 25/25: battery OCV of `cells` cells at temperature t
// (through molality_from_cell_emf_tabulated: reports derive it per reading).
Result<SpecificGravity> sg_from_ocv(Volts ocv, int cells, Celsius t);

}  // namespace pbfleet::models
