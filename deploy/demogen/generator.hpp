// Seeded, deterministic generator of a fictional fleet and its weekly
// readings, for the demo and the benchmarks.
//
// The readings are produced by running the project's own models in reverse:
// a simulated state of charge (seasons, self-discharge, ageing, sulfation,
// a weak cell) becomes acid content, then a corrected SG, then the raw
// hydrometer reading at the electrolyte temperature and the OCV the Nernst
// model predicts (plus surface charge when the battery had little rest).
// Invented data: it belongs to the demo and to benchmarks, never to tests
// that check the models.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "models/battery.hpp"
#include "models/cranking.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::demogen {

struct FleetConfig {
  std::uint64_t seed = 20261202;
  int batteries = 320;                   // spread over the depots
  int weeks = 156;                       // about three years of weekly rounds
  std::chrono::sys_days last_round{};    // date of the newest round
};

struct DepotSpec {
  std::string name;
  std::string time_zone;  // IANA
  double design_low_c;
  double mean_c;          // yearly mean air temperature
  double swing_c;         // half the summer-winter difference
  bool crew_uses_fahrenheit;
};

struct VehicleSpec {
  std::string code;
  int depot_index;        // 0-based into depots, id = index + 1 on a fresh database
  models::EngineKind engine;
  double displacement_l;
  double required_cca_a;  // cranking need at -18 C, as the fleet's engineers specified it
};

// How the simulated battery ages (what the demo shows off).
enum class Condition { healthy, sulfating, weak_cell, neglected, surface_charge_habit, stale };

struct BatterySpecOut {
  std::string serial;
  models::Chemistry chemistry;
  int cells;
  double rated_cca_a;
  double reserve_capacity_min;
  double full_charge_sg;
  std::chrono::sys_days installed_on;
  int vehicle_index;      // 0-based into vehicles, id = index + 1
  Condition condition;
};

struct Fleet {
  std::vector<DepotSpec> depots;
  std::vector<VehicleSpec> vehicles;
  std::vector<BatterySpecOut> batteries;
};

// The fleet's structure: depots, vehicles and batteries.
Fleet make_fleet(const FleetConfig& config);

// Calls `sink` once per battery with all of its readings, oldest first.
using ReadingSink = std::function<void(const BatterySpecOut&,
                                       const std::vector<models::wire::ReadingInput>&)>;
void generate_readings(const FleetConfig& config, const Fleet& fleet, const ReadingSink& sink);

// Plain name of a simulated condition.
std::string_view to_string(Condition condition);

}  // namespace pbfleet::demogen
