#include "tests/bench/ingest_bodies.hpp"

#include <algorithm>
#include <cstdio>
#include <cstdlib>

#include <nlohmann/json.hpp>

namespace pbfleet::bench {
namespace {

using models::wire::ReadingInput;

nlohmann::json reading_json(const ReadingInput& r) {
  nlohmann::json j{{"reading_id", r.reading_id}, {"serial", r.serial},
                   {"taken_at", models::wire::format_timestamp(r.taken_at)}};
  if (r.ocv) j["ocv_v"] = r.ocv->value;
  auto& cells = j["cell_sg"] = nlohmann::json::array();
  for (const auto& sg : r.cell_sg) cells.push_back(sg.value);
  if (r.electrolyte) j["electrolyte_temp_c"] = r.electrolyte->value.value;
  if (r.ambient) j["ambient_temp_c"] = r.ambient->value.value;
  if (r.rest) j["rest_h"] = r.rest->value;
  j["logged_by"] = r.logged_by;
  j["source"] = r.source;
  if (!r.note.empty()) j["note"] = r.note;
  if (r.after_charge) j["after_charge"] = true;
  if (r.water_added) j["water_added"] = true;
  return j;
}

}  // namespace

demogen::Fleet small_fleet(std::size_t wanted, std::chrono::sys_days last_round,
                           std::vector<ReadingInput>& readings) {
  demogen::FleetConfig config;
  config.weeks = 260;
  config.batteries = static_cast<int>(wanted / 200 + 20);
  config.last_round = last_round;
  auto fleet = demogen::make_fleet(config);
  demogen::generate_readings(config, fleet, [&](const auto&, const std::vector<ReadingInput>& r) {
    readings.insert(readings.end(), r.begin(), r.end());
  });
  if (readings.size() < wanted) {
    std::fprintf(stderr, "generator gave %zu readings, %zu wanted\n", readings.size(), wanted);
    std::exit(1);
  }
  readings.resize(wanted);
  return fleet;
}

std::vector<std::string> bodies(const std::vector<ReadingInput>& r, std::size_t from, std::size_t count,
                                std::size_t per_body) {
  std::vector<std::string> out;
  for (std::size_t i = from; i < from + count; i += per_body) {
    if (per_body == 1) {
      out.push_back(reading_json(r[i]).dump());
      continue;
    }
    nlohmann::json list = nlohmann::json::array();
    for (std::size_t k = i; k < std::min(from + count, i + per_body); ++k) list.push_back(reading_json(r[k]));
    out.push_back(list.dump());
  }
  return out;
}

}  // namespace pbfleet::bench
