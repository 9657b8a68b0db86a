#include "deploy/demogen/generator.hpp"

#include <doctest/doctest.h>

#include <cmath>
#include <map>

#include "models/nernst.hpp"
#include "models/specific_gravity.hpp"
#include "models/wire/csv.hpp"
#include "models/wire/reading.hpp"

using namespace pbfleet;

namespace {

demogen::FleetConfig small_config(std::uint64_t seed) {
  demogen::FleetConfig c;
  c.seed = seed;
  c.batteries = 24;
  c.weeks = 52;
  c.last_round = std::chrono::sys_days{std::chrono::year{2026} / 11 / 30};
  return c;
}

std::string generate_csv(const demogen::FleetConfig& config) {
  const auto fleet = demogen::make_fleet(config);
  std::string all;
  demogen::generate_readings(config, fleet, [&](const auto&, const auto& rows) {
    all += models::wire::format_reading_csv(rows);
  });
  return all;
}

}  // namespace

TEST_CASE("the same seed gives the same fleet and readings, another seed differs") {
  const auto a = generate_csv(small_config(7));
  CHECK(a == generate_csv(small_config(7)));
  CHECK(a != generate_csv(small_config(8)));
  CHECK(a.size() > 1000);
}

TEST_CASE("every generated reading passes the shared validation") {
  const auto config = small_config(11);
  const auto fleet = demogen::make_fleet(config);
  const auto now = std::chrono::sys_seconds{config.last_round} + std::chrono::hours{24};
  std::size_t count = 0;
  demogen::generate_readings(config, fleet, [&](const auto& battery, const auto& rows) {
    for (const auto& r : rows) {
      const auto errors = models::wire::validate_reading(r, now, battery.cells);
      if (!errors.empty()) FAIL_CHECK(battery.serial << ": " << errors.front().field << " " << errors.front().detail);
      ++count;
    }
  });
  CHECK(count > 24 * 40);
}

TEST_CASE("generated numbers are finite and in whole instrument steps") {
  // As a crew would enter them: SG to 0.001 (hydrometer), OCV to 0.01 V,
  // rest to 0.5 h; vehicles' cranking need in 10 A and displacement in 0.1 l.
  // v is the double a crew's decimal text of it reads as.
  const auto whole_steps = [](double v, double step) {
    if (!std::isfinite(v)) return false;
    if (step >= 1) return std::fmod(v, step) == 0;
    const double per_unit = std::round(1 / step);
    return std::round(v * per_unit) / per_unit == v;
  };
  const auto config = small_config(13);
  const auto fleet = demogen::make_fleet(config);
  for (const auto& v : fleet.vehicles) {
    CHECK(whole_steps(v.required_cca_a, 10));
    CHECK(whole_steps(v.displacement_l, 0.1));
    CHECK(v.required_cca_a > 0);
  }
  std::size_t count = 0;
  demogen::generate_readings(config, fleet, [&](const auto&, const auto& rows) {
    for (const auto& r : rows) {
      for (const auto& sg : r.cell_sg) CHECK(whole_steps(sg.value, 0.001));
      if (r.ocv) CHECK(whole_steps(r.ocv->value, 0.01));
      if (r.rest) CHECK(whole_steps(r.rest->value, 0.5));
      ++count;
    }
  });
  CHECK(count > 0);
}

TEST_CASE("generated hydrometer readings correct back to an SG the OCV agrees with when settled") {
  // The generator runs the models in reverse; running them forward again on a
  // settled healthy reading must land near the OCV it wrote (meter noise 10 mV,
  // rounding of SG to 0.001 ~ 6 mV on six cells; allow 60 mV).
  const auto config = small_config(5);
  const auto fleet = demogen::make_fleet(config);
  int checked = 0;
  demogen::generate_readings(config, fleet, [&](const auto& battery, const auto& rows) {
    if (battery.condition != demogen::Condition::healthy || rows.empty()) return;
    for (const auto& r : rows) {
      if (r.cell_sg.empty() || !r.rest || r.rest->value < 6.0 || !r.electrolyte || !r.ocv) continue;
      double sum = 0.0;
      for (auto sg : r.cell_sg) sum += models::correct_sg(sg, r.electrolyte->value).value;
      const models::SpecificGravity mean{sum / r.cell_sg.size()};
      const auto emf = models::cell_emf_from_sg(mean, r.electrolyte->value);
      REQUIRE(emf.ok());
      CHECK(std::abs(models::battery_ocv(*emf, battery.cells).value - r.ocv->value) < 0.06);
      ++checked;
    }
  });
  CHECK(checked > 50);
}

TEST_CASE("the demo fleet has every simulated condition and every chemistry it advertises") {
  auto config = small_config(20261202);
  config.batteries = 320;
  const auto fleet = demogen::make_fleet(config);
  std::map<demogen::Condition, int> conditions;
  std::map<models::Chemistry, int> chemistries;
  for (const auto& b : fleet.batteries) {
    ++conditions[b.condition];
    ++chemistries[b.chemistry];
  }
  CHECK(conditions.size() == 6);
  CHECK(chemistries.size() == 3);
  CHECK(fleet.depots.size() == 4);
}
