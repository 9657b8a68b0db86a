#include "tests/bench/fleet_db.hpp"

#include <map>
#include <vector>

#include "deploy/demogen/generator.hpp"
#include "server/storage/sqlite_store.hpp"
#include "server/storage/tokens.hpp"
#include "tests/bench/figure.hpp"

namespace pbfleet::bench {

namespace fs = std::filesystem;
using models::wire::ReadingInput;

namespace {

// Batteries whose readings are interleaved week by week before loading:
// enough that two readings of one battery never share a database page.
constexpr std::size_t kInterleaveGroup = 1000;
// Readings per load transaction.
constexpr std::size_t kLoadBatch = 20000;

demogen::FleetConfig config_for(int batteries, int weeks) {
  demogen::FleetConfig c;
  c.batteries = batteries;
  c.weeks = weeks;
  c.last_round = kLastRound;
  return c;
}

storage::Engine engine_of(models::EngineKind kind) {
  return kind == models::EngineKind::diesel ? storage::Engine::diesel : storage::Engine::gasoline;
}

}  // namespace

void load_structure(storage::Store& store, const demogen::Fleet& fleet) {
  std::vector<storage::Id> depot_ids, vehicle_ids;
  for (const auto& d : fleet.depots)
    depot_ids.push_back(must(store.create_depot({0, d.name, d.time_zone, models::Celsius{d.design_low_c}}),
                             "create depot").id);
  for (const auto& v : fleet.vehicles)
    vehicle_ids.push_back(must(store.create_vehicle({0, v.code, depot_ids.at(v.depot_index),
                                                     engine_of(v.engine), v.displacement_l, {}}),
                               "create vehicle").id);
  for (const auto& b : fleet.batteries) {
    storage::Battery battery;
    battery.serial = b.serial;
    battery.chemistry = b.chemistry;
    battery.cells = b.cells;
    battery.rated_cca_a = models::Amperes{b.rated_cca_a};
    battery.reserve_capacity_min = b.reserve_capacity_min;
    battery.full_charge_sg = models::SpecificGravity{b.full_charge_sg};
    battery.installed_on = b.installed_on;
    battery.vehicle_id = vehicle_ids.at(b.vehicle_index);
    must(store.create_battery(battery, std::chrono::sys_seconds{b.installed_on}), "create battery");
  }
}

namespace {

// Gathers one group of batteries' readings and stores them week by week.
class InterleavedLoader {
 public:
  explicit InterleavedLoader(storage::Store& store) : store_(store) {}

  void add(const std::vector<ReadingInput>& readings) {
    group_.push_back(readings);
    if (group_.size() == kInterleaveGroup) flush();
  }

  std::size_t finish() {
    flush();
    store_batch();
    return stored_;
  }

 private:
  void flush() {
    std::size_t longest = 0;
    for (const auto& g : group_) longest = std::max(longest, g.size());
    for (std::size_t week = 0; week < longest; ++week) {
      for (auto& g : group_) {
        if (week < g.size()) batch_.push_back(std::move(g[week]));
        if (batch_.size() == kLoadBatch) store_batch();
      }
    }
    group_.clear();
  }

  void store_batch() {
    if (batch_.empty()) return;
    stored_ += must(store_.load_readings(batch_, kReportNow), "load readings");
    batch_.clear();
  }

  storage::Store& store_;
  std::vector<std::vector<ReadingInput>> group_;
  std::vector<ReadingInput> batch_;
  std::size_t stored_ = 0;
};

fs::path file_for(const fs::path& dir, int batteries, int weeks) {
  return dir / ("fleet-" + std::to_string(batteries) + "x" + std::to_string(weeks) + ".db");
}

fs::path done_marker(const fs::path& db) { return fs::path(db.string() + ".complete"); }

void remove_db(const fs::path& db) {
  for (const char* suffix : {"", "-wal", "-shm", ".complete"}) fs::remove(db.string() + suffix);
}

}  // namespace

std::unique_ptr<storage::Store> open_store(const fs::path& file) {
  storage::SqliteOptions options;
  options.file = file;
  return must(storage::open_sqlite_store(options), "open database");
}

FleetDb fleet_db(const fs::path& cache_dir, int batteries, int weeks) {
  FleetDb out{file_for(cache_dir, batteries, weeks), batteries, weeks};
  if (fs::exists(done_marker(out.file))) {
    out.reused = true;
    return out;
  }
  fs::create_directories(cache_dir);
  remove_db(out.file);
  const auto start = SteadyClock::now();
  std::fprintf(stderr, "generating %d batteries x %d weeks into %s ...\n", batteries, weeks,
               out.file.c_str());
  {
    auto store = open_store(out.file);
    const std::size_t n = load_generated_fleet(*store, batteries, weeks);
    std::fprintf(stderr, "stored %zu readings\n", n);
  }  // closing checkpoints the WAL into the file
  std::FILE* marker = std::fopen(done_marker(out.file).c_str(), "w");
  if (marker) std::fclose(marker);
  out.build_seconds = seconds_since(start);
  std::fprintf(stderr, "built in %.1f s\n", out.build_seconds);
  return out;
}

std::size_t load_generated_fleet(storage::Store& store, int batteries, int weeks) {
  const auto config = config_for(batteries, weeks);
  const auto fleet = demogen::make_fleet(config);
  load_structure(store, fleet);
  InterleavedLoader loader(store);
  demogen::generate_readings(config, fleet,
                             [&](const demogen::BatterySpecOut&,
                                 const std::vector<ReadingInput>& r) { loader.add(r); });
  return loader.finish();
}

std::string admin_token(storage::Store& store) {
  const std::string raw = storage::new_raw_token();
  must(store.create_token("bench", storage::Role::admin, std::nullopt, storage::hash_token(raw),
                          kReportNow),
       "create token");
  return raw;
}

}  // namespace pbfleet::bench
