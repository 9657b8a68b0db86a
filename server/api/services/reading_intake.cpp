#include "server/api/services/reading_intake.hpp"

namespace pbfleet::api {

namespace {

// Looks up each distinct serial once. Missing or out-of-scope serials map
// to nullopt.
std::map<std::string, std::optional<storage::Battery>> lookup_batteries(
    storage::Store& store, const std::vector<models::wire::ReadingInput>& batch,
    std::optional<storage::Id> scope, IntakeResult& out) {
  std::map<std::string, std::optional<storage::Battery>> found;
  for (const auto& r : batch) {
    if (r.serial.empty() || found.contains(r.serial)) continue;
    auto battery = store.get_battery(r.serial);
    if (!battery && battery.error().code != storage::StoreErrc::not_found) {
      out.storage_failed = true;
      out.storage_error = battery.error();
      return found;
    }
    if (battery && (!scope || battery->depot_id == scope)) {
      found[r.serial] = battery.value();
    } else {
      found[r.serial] = std::nullopt;
    }
  }
  return found;
}

}  // namespace

IntakeResult check_batch(storage::Store& store, const std::vector<models::wire::ReadingInput>& batch,
                         std::chrono::sys_seconds now, std::optional<storage::Id> depot_scope,
                         const FieldNamer& name) {
  IntakeResult out;
  auto batteries = lookup_batteries(store, batch, depot_scope, out);
  if (out.storage_failed) return out;
  for (std::size_t i = 0; i < batch.size(); ++i) {
    const auto& r = batch[i];
    int cells = 0;
    if (auto it = batteries.find(r.serial); it != batteries.end()) {
      if (!it->second) {
        auto f = name(i, "serial");
        f.detail = "no battery with serial '" + r.serial.substr(0, 64) + "'";
        f.allowed = "the serial of a registered battery";
        out.problems.push_back(std::move(f));
      } else if (it->second->status == storage::BatteryStatus::retired) {
        auto f = name(i, "serial");
        f.detail = "battery '" + r.serial + "' is retired";
        f.allowed = "an in-service battery";
        out.problems.push_back(std::move(f));
      } else {
        cells = it->second->cells;
      }
    }
    for (auto& e : models::wire::validate_reading(r, now, cells)) {
      auto f = name(i, e.field);
      f.detail = std::move(e.detail);
      f.allowed = std::move(e.allowed);
      out.problems.push_back(std::move(f));
    }
  }
  for (auto& [serial, battery] : batteries)
    if (battery) out.batteries.emplace(serial, std::move(*battery));
  return out;
}

}  // namespace pbfleet::api
