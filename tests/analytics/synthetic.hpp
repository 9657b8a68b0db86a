// Synthetic battery histories with known truth for the analytics tests.
//
// Readings are generated FORWARD with the models: the true corrected SG of
// each cell goes through models::reading_at_temperature to the raw
// hydrometer value the crew would see, and through models::cell_emf_from_sg
// and models::battery_ocv to the open-circuit voltage. The analytics must
// then recover the truth from the raw values.
#pragma once

#include <chrono>
#include <vector>

#include "models/analytics/history.hpp"
#include "models/nernst.hpp"
#include "models/specific_gravity.hpp"

namespace pbfleet::analytics::testing {

using namespace std::chrono_literals;
using std::chrono::sys_days;
using std::chrono::sys_seconds;

// A fixed "now" for every test: 2026-12-01 08:00 UTC.
inline sys_seconds test_now() {
  return sys_days{std::chrono::year{2026} / 12 / 1} + 8h;
}

inline sys_seconds days_before_now(double days) {
  return test_now() - std::chrono::seconds(static_cast<long long>(days * 86400.0));
}

// What a true battery state looks like at one reading.
struct Truth {
  double cell_sg = 1.265;          // true corrected SG 25/25 of every cell
  std::vector<double> cells_sg{};  // per-cell override (size = cells)
  double electrolyte_c = 5.0;
  double rest_h = 12.0;
  bool with_ocv = true;
  bool with_sg = true;
  bool after_charge = false;
  bool water_added = false;
};

// A reading generated forward from the truth.
inline ReadingPoint reading_from_truth(sys_seconds at, const Truth& truth, int cells = 6) {
  ReadingPoint p;
  p.taken_at = at;
  p.electrolyte_c = truth.electrolyte_c;
  const models::Celsius t{truth.electrolyte_c};
  std::vector<double> sgs = truth.cells_sg;
  if (sgs.empty()) sgs.assign(static_cast<std::size_t>(cells), truth.cell_sg);
  double emf_sum = 0.0;
  for (const double sg : sgs) {
    if (truth.with_sg) p.cells.push_back(models::reading_at_temperature(models::SpecificGravity{sg}, t));
    emf_sum += models::cell_emf_from_sg(models::SpecificGravity{sg}, t).value().value;
  }
  if (truth.with_ocv) {
    p.ocv_v = emf_sum;  // cells in series
    p.rest_h = truth.rest_h;
  }
  p.after_charge = truth.after_charge;
  p.water_added = truth.water_added;
  return p;
}

// Deterministic zero-mean "measurement noise": a fixed pattern in
// -amplitude..+amplitude (no random numbers, so every run is the same).
inline double wiggle(int i, double amplitude) {
  static constexpr double kPattern[] = {0.0, 0.8, -0.6, 0.3, -1.0, 0.5, -0.2, 0.9, -0.7, 0.1, -0.4, 0.6};
  return amplitude * kPattern[static_cast<std::size_t>(i) % std::size(kPattern)];
}

inline BatteryContext flooded_battery(const char* serial, double rated_cca = 800.0, double need_a = 400.0) {
  BatteryContext b;
  b.serial = serial;
  b.spec = models::default_spec(models::Chemistry::flooded, 6);
  b.spec.full_charge_sg = models::SpecificGravity{1.265};
  b.spec.discharged_sg = models::SpecificGravity{1.120};
  b.spec.rated_cca = models::Amperes{rated_cca};
  b.depot_id = 1;
  b.depot_name = "North Yard";
  b.depot_design_low = models::Celsius{-25.0};
  if (need_a > 0.0) b.required_cca = models::Amperes{need_a};
  b.installed_on = sys_days{std::chrono::year{2024} / 10 / 1};
  return b;
}

}  // namespace pbfleet::analytics::testing
