#include "deploy/demogen/generator.hpp"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <random>

#include "models/nernst.hpp"
#include "models/self_discharge.hpp"
#include "models/specific_gravity.hpp"

namespace pbfleet::demogen {
namespace {

using models::Celsius;
using models::Chemistry;
using models::SpecificGravity;

// Portable random numbers: the engine is specified by the standard, the
// distributions below are ours, so a seed gives the same fleet everywhere.
class Dice {
 public:
  explicit Dice(std::uint64_t seed) : engine_(seed) {}
  double uniform() { return static_cast<double>(engine_() >> 11) * 0x1.0p-53; }
  double between(double lo, double hi) { return lo + (hi - lo) * uniform(); }
  int pick(int n) { return static_cast<int>(uniform() * n) % n; }
  bool chance(double p) { return uniform() < p; }
  double normal(double mean, double sd) {  // Box-Muller
    const double u1 = std::max(uniform(), 1e-12);
    const double u2 = uniform();
    return mean + sd * std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
  }

 private:
  std::mt19937_64 engine_;
};

std::vector<DepotSpec> demo_depots() {
  // Fjellvik Transport (fictional): four depots with different winters.
  return {
      {"North Yard", "Europe/Oslo", -30.0, 2.0, 14.0, false},
      {"Harbour", "Europe/Oslo", -12.0, 7.5, 9.0, true},
      {"Ridge Pass", "Europe/Oslo", -38.0, -1.0, 16.0, false},
      {"Valley", "Europe/Oslo", -20.0, 5.0, 12.0, false},
  };
}

struct VehicleKind {
  const char* prefix;
  models::EngineKind engine;
  double min_l, max_l;
  double rated_cca_a;
};

constexpr VehicleKind kKinds[] = {
    {"TRK", models::EngineKind::diesel, 7.0, 12.8, 1000.0},
    {"VAN", models::EngineKind::diesel, 2.0, 3.0, 760.0},
    {"CAR", models::EngineKind::gasoline, 1.4, 2.5, 560.0},
    {"PLW", models::EngineKind::diesel, 4.5, 6.7, 900.0},
};

Condition roll_condition(Dice& dice) {
  const double r = dice.uniform();
  if (r < 0.62) return Condition::healthy;
  if (r < 0.74) return Condition::sulfating;
  if (r < 0.80) return Condition::weak_cell;
  if (r < 0.87) return Condition::neglected;
  if (r < 0.94) return Condition::surface_charge_habit;
  return Condition::stale;
}

Chemistry roll_chemistry(Dice& dice) {
  const double r = dice.uniform();
  if (r < 0.60) return Chemistry::flooded;
  if (r < 0.80) return Chemistry::efb;
  return Chemistry::agm;
}

// Air temperature on a given day at a depot: yearly cosine, coldest about
// 20 January, plus weather noise.
double air_temperature_c(const DepotSpec& depot, std::chrono::sys_days day, Dice& dice) {
  const auto ymd = std::chrono::year_month_day{day};
  const auto jan20 = std::chrono::sys_days{ymd.year() / std::chrono::January / 20};
  const double phase = (day - jan20).count() / 365.25 * 2.0 * std::numbers::pi;
  return depot.mean_c - depot.swing_c * std::cos(phase) + dice.normal(0.0, 3.0);
}

struct BatteryState {
  double soc = 95.0;          // %
  double capacity = 1.0;      // share of the acid swing still reachable (sulfation, age)
  double weak_offset = 0.0;   // SG below the others, in the weak cell
  int weak_cell = 0;
};

double sg_at_soc(const models::BatterySpec& spec, double soc, double capacity) {
  const double span = spec.full_charge_sg.value - spec.discharged_sg.value;
  return spec.discharged_sg.value + span * capacity * soc / 100.0;
}

// One week of service: driving charges the battery back towards its
// reachable top; cold and short trips leave it lower; parked days self-discharge.
void simulate_week(BatteryState& s, Condition condition, double air_c, Chemistry chem, Dice& dice) {
  const double cold = std::clamp(-air_c / 30.0, 0.0, 1.0);
  double top = 97.0 - 12.0 * cold;
  if (condition == Condition::neglected) top -= 18.0;
  const double parked_days = dice.chance(0.15) ? dice.between(3.0, 7.0) : dice.between(0.0, 1.5);
  s.soc = std::clamp(dice.normal(top, 3.0), 20.0, 100.0);
  s.soc = models::project_soc(models::Percent{s.soc}, models::Days{parked_days},
                              Celsius{air_c}, chem).value;
  if (condition == Condition::sulfating) s.capacity = std::max(0.35, s.capacity - 0.0035);
  else s.capacity = std::max(0.6, s.capacity - 0.0006);
  if (condition == Condition::weak_cell) s.weak_offset = std::min(0.12, s.weak_offset + 0.0012);
}

std::string round_id(const std::string& serial, std::chrono::sys_days day) {
  const auto ymd = std::chrono::year_month_day{day};
  char buf[96];
  std::snprintf(buf, sizeof buf, "%s-%04d%02u%02u", serial.c_str(), int(ymd.year()),
                unsigned(ymd.month()), unsigned(ymd.day()));
  return buf;
}

// `v` to a whole number of `step`s (0.001, 0.5, 10), as an instrument
// shows it: 1.273, not 1273 * 0.001 = 1.2730000000000001. A fraction of a
// unit divides by the steps per unit, which is exact for the decimal.
double round_to(double v, double step) {
  if (step >= 1.0) return std::round(v / step) * step;
  const double per_unit = std::round(1.0 / step);
  return std::round(v * per_unit) / per_unit;
}

models::wire::ReadingInput make_reading(const BatterySpecOut& b, const models::BatterySpec& spec,
                                        const BatteryState& s, const DepotSpec& depot,
                                        std::chrono::sys_days day, double air_c, Dice& dice) {
  models::wire::ReadingInput r;
  r.reading_id = round_id(b.serial, day);
  r.serial = b.serial;
  r.taken_at = std::chrono::sys_seconds{day} + std::chrono::hours{7} +
               std::chrono::minutes{dice.pick(120)};
  const double electrolyte_c = std::round(air_c + dice.between(1.0, 6.0));
  const auto unit = depot.crew_uses_fahrenheit ? models::wire::TempUnit::f : models::wire::TempUnit::c;
  r.electrolyte = models::wire::EnteredTemperature{Celsius{electrolyte_c}, unit};
  r.ambient = models::wire::EnteredTemperature{Celsius{std::round(air_c)}, unit};
  const bool short_rest = b.condition == Condition::surface_charge_habit ? dice.chance(0.7)
                                                                         : dice.chance(0.08);
  const double rest_h = short_rest ? dice.between(0.3, 2.5) : dice.between(6.0, 16.0);
  r.rest = models::Hours{round_to(rest_h, 0.5)};

  const double mean_sg = sg_at_soc(spec, s.soc, s.capacity);
  if (b.chemistry != Chemistry::agm) {  // AGM is sealed: no hydrometer
    for (int c = 0; c < b.cells; ++c) {
      double sg = mean_sg + dice.normal(0.0, 0.003);
      if (c == s.weak_cell) sg -= s.weak_offset;
      const auto raw = models::reading_at_temperature(SpecificGravity{sg}, Celsius{electrolyte_c});
      r.cell_sg.push_back(SpecificGravity{round_to(raw.value, 0.001)});
    }
  }
  auto emf = models::cell_emf_from_sg(SpecificGravity{mean_sg}, Celsius{electrolyte_c});
  double ocv = emf ? models::battery_ocv(*emf, b.cells).value : 12.0;
  ocv -= s.weak_offset;  // a cell's EMF follows its SG about 1:1 (EMF ~ SG + 0.84 V)
  if (short_rest) ocv += dice.between(0.08, 0.25);  // surface charge after driving
  r.ocv = models::Volts{round_to(ocv + dice.normal(0.0, 0.01), 0.01)};
  r.logged_by = depot.name == "Harbour" ? "crew-h" : "crew-" + std::to_string(b.vehicle_index % 3 + 1);
  r.source = "round";
  return r;
}

}  // namespace

std::string_view to_string(Condition condition) {
  switch (condition) {
    case Condition::healthy: return "healthy";
    case Condition::sulfating: return "sulfating";
    case Condition::weak_cell: return "weak cell";
    case Condition::neglected: return "undercharged";
    case Condition::surface_charge_habit: return "read without rest";
    case Condition::stale: return "not read lately";
  }
  return "?";
}

Fleet make_fleet(const FleetConfig& config) {
  Dice dice(config.seed);
  Fleet fleet;
  fleet.depots = demo_depots();
  const int per_depot = (config.batteries + 3) / 4;
  for (int i = 0; i < config.batteries; ++i) {
    const int depot = i / per_depot;
    const VehicleKind& kind = kKinds[dice.pick(4)];
    VehicleSpec v;
    v.code = std::string(kind.prefix) + "-" + std::to_string(100 + i);
    v.depot_index = std::min(depot, 3);
    v.engine = kind.engine;
    v.displacement_l = round_to(dice.between(kind.min_l, kind.max_l), 0.1);
    // Fjellvik sizes its batteries generously for the cold: the engines need
    // well under the rating at -18 C (invented for the demo).
    v.required_cca_a = round_to(kind.rated_cca_a * dice.between(0.28, 0.42), 10.0);
    fleet.vehicles.push_back(v);

    BatterySpecOut b;
    char serial[32];
    std::snprintf(serial, sizeof serial, "FJ-%c%04d", "NHRV"[v.depot_index], i + 1);
    b.serial = serial;
    b.chemistry = roll_chemistry(dice);
    b.cells = 6;
    b.rated_cca_a = kind.rated_cca_a + 20.0 * dice.pick(5);
    b.reserve_capacity_min = std::round(b.rated_cca_a / 5.5);
    b.full_charge_sg = models::default_spec(b.chemistry, b.cells).full_charge_sg.value;
    const int weeks_old = config.weeks + dice.pick(60) - 20;
    b.installed_on = config.last_round - std::chrono::days{7 * std::max(weeks_old, 10)};
    b.vehicle_index = i;
    b.condition = roll_condition(dice);
    fleet.batteries.push_back(b);
  }
  return fleet;
}

void generate_readings(const FleetConfig& config, const Fleet& fleet, const ReadingSink& sink) {
  std::vector<models::wire::ReadingInput> readings;
  for (std::size_t i = 0; i < fleet.batteries.size(); ++i) {
    const BatterySpecOut& b = fleet.batteries[i];
    Dice dice(config.seed * 7919 + i);
    const DepotSpec& depot = fleet.depots[fleet.vehicles[b.vehicle_index].depot_index];
    auto spec = models::default_spec(b.chemistry, b.cells);
    BatteryState state;
    state.weak_cell = dice.pick(b.cells);
    readings.clear();
    const auto first = config.last_round - std::chrono::days{7 * (config.weeks - 1)};
    const int skip_last = b.condition == Condition::stale ? 3 + dice.pick(4) : 0;
    bool charged = false;
    for (int w = 0; w < config.weeks - skip_last; ++w) {
      const auto day = first + std::chrono::days{7 * w};
      if (day < b.installed_on) continue;
      const double air_c = air_temperature_c(depot, day, dice);
      simulate_week(state, b.condition, air_c, b.chemistry, dice);
      if (dice.chance(0.03)) continue;  // a missed round now and then
      auto reading = make_reading(b, spec, state, depot, day, air_c, dice);
      reading.after_charge = charged;
      charged = state.soc < 60.0 && dice.chance(0.5);
      if (charged) reading.note = "low: put on charge";
      readings.push_back(std::move(reading));
    }
    sink(b, readings);
  }
}

}  // namespace pbfleet::demogen
