// Storage figures (a benchmark, not a test): insert rates and report query
// times on a temporary database of a fictional fleet.
//
//   storage_bench [batteries=1000] [readings_per_battery=260]
//
// Prints one line per figure. The database lives in a temporary folder that
// is removed at the end.
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <ctime>
#include <filesystem>
#include <string>
#include <vector>

#include "server/storage/sqlite_store.hpp"
#include "server/storage/store.hpp"

namespace {

using namespace pbfleet;
using namespace pbfleet::storage;
using Clock = std::chrono::steady_clock;

const auto kEpoch = std::chrono::sys_days{std::chrono::year{2021} / 1 / 4};

double seconds_since(Clock::time_point start) {
  return std::chrono::duration<double>(Clock::now() - start).count();
}

// Process CPU seconds: on a shared machine wall time alone misleads.
double cpu_seconds() { return static_cast<double>(std::clock()) / CLOCKS_PER_SEC; }

std::string serial_of(int battery) { return "FT-" + std::to_string(100000 + battery); }

models::wire::ReadingInput weekly(int battery, int week, const std::string& prefix) {
  models::wire::ReadingInput r;
  r.reading_id = prefix + std::to_string(battery) + "-" + std::to_string(week);
  r.serial = serial_of(battery);
  r.taken_at = kEpoch + std::chrono::days{7 * week} + std::chrono::hours{battery % 10};
  r.ocv = models::Volts{12.40 + 0.01 * (week % 25)};
  for (int c = 0; c < 6; ++c) r.cell_sg.push_back(models::SpecificGravity{1.240 + 0.001 * c});
  r.electrolyte = models::wire::EnteredTemperature{models::Celsius{4.0}, models::wire::TempUnit::c};
  r.rest = models::Hours{week % 3 == 0 ? 2.0 : 14.0};
  r.logged_by = "crew-north";
  r.source = "round";
  return r;
}

template <class T>
T must(StoreResult<T> r, const char* what) {
  if (!r.ok()) {
    std::fprintf(stderr, "%s failed: %s\n", what, r.error().detail.c_str());
    std::exit(1);
  }
  return std::move(r).value();
}

void create_fleet(Store& store, int batteries) {
  const Id depot =
      must(store.create_depot({0, "North Yard", "Europe/Oslo", models::Celsius{-25}}), "depot").id;
  const Id vehicle =
      must(store.create_vehicle({0, "TR-1", depot, Engine::diesel, 7.7, {}}), "vehicle").id;
  for (int b = 0; b < batteries; ++b) {
    Battery battery;
    battery.serial = serial_of(b);
    battery.rated_cca_a = models::Amperes{800};
    battery.installed_on = kEpoch;
    battery.vehicle_id = vehicle;
    must(store.create_battery(battery, std::chrono::sys_seconds{kEpoch}), "battery");
  }
}

void bulk_load(Store& store, int batteries, int weeks) {
  constexpr std::size_t kBatch = 10000;
  std::vector<models::wire::ReadingInput> batch;
  std::size_t total = 0;
  const auto start = Clock::now();
  const double cpu = cpu_seconds();
  for (int w = 0; w < weeks; ++w) {
    for (int b = 0; b < batteries; ++b) {
      batch.push_back(weekly(b, w, "bulk-"));
      if (batch.size() == kBatch) {
        total += must(store.load_readings(batch, std::chrono::sys_seconds{kEpoch}), "load");
        batch.clear();
      }
    }
  }
  total += must(store.load_readings(batch, std::chrono::sys_seconds{kEpoch}), "load");
  const double s = seconds_since(start);
  const double c = cpu_seconds() - cpu;
  std::printf(
      "bulk load: %zu readings in %.2f s = %.0f rows/s (batches of %zu; CPU %.2f s = %.0f "
      "rows/CPU-s)\n",
      total, s, total / s, kBatch, c, total / c);
}

void single_appends(Store& store, int count) {
  const auto start = Clock::now();
  for (int i = 0; i < count; ++i) {
    must(store.append_readings({weekly(i % 50, 100000 + i, "one-")},
                               std::chrono::sys_seconds{kEpoch}),
         "append");
  }
  const double s = seconds_since(start);
  std::printf("append_readings, 1 reading per transaction (FULL sync): %d in %.2f s = %.0f/s\n",
              count, s, count / s);
}

void group_commits(Store& store, int transactions, int per_transaction) {
  const auto start = Clock::now();
  for (int t = 0; t < transactions; ++t) {
    std::vector<std::vector<PreparedReading>> requests;
    for (int i = 0; i < per_transaction; ++i) {
      requests.push_back(prepare_readings({weekly(i % 50, 200000 + t * per_transaction + i, "group-")}));
    }
    must(store.append_reading_batches(requests, std::chrono::sys_seconds{kEpoch}), "group");
  }
  const double s = seconds_since(start);
  const int total = transactions * per_transaction;
  std::printf("group commit, %d one-reading requests per transaction: %d in %.2f s = %.0f/s\n",
              per_transaction, total, s, total / s);
}

void replays(Store& store, int count) {
  const auto start = Clock::now();
  for (int i = 0; i < count; ++i) {
    must(store.append_readings({weekly(i % 50, 100000 + i, "one-")},
                               std::chrono::sys_seconds{kEpoch}),
         "replay");
  }
  const double s = seconds_since(start);
  std::printf("replayed appends (idempotent retries): %d in %.2f s = %.0f/s\n", count, s,
              count / s);
}

template <class F>
void timed(const char* what, F&& f) {
  const auto start = Clock::now();
  const double cpu = cpu_seconds();
  const std::size_t n = f();
  std::printf("%s: %.1f ms wall, %.1f ms CPU (%zu items)\n", what, seconds_since(start) * 1000,
              (cpu_seconds() - cpu) * 1000, n);
}

void queries(Store& store) {
  timed("latest reading of every battery (last_readings 1)",
        [&] { return must(store.last_readings({}, 1), "last").size(); });
  timed("last 13 readings of every battery", [&] {
    std::size_t n = 0;
    for (const auto& b : must(store.last_readings({}, 13), "last13")) n += b.readings.size();
    return n;
  });
  timed("latest settled (rest >= 6 h) of every battery",
        [&] { return must(store.latest_settled({}, models::Hours{6}), "settled").size(); });
  timed("one battery's whole history", [&] {
    return must(store.readings_for(serial_of(7), std::nullopt, std::nullopt), "history").size();
  });
  timed("readings count",
        [&] { return static_cast<std::size_t>(must(store.readings_count(), "count")); });
}

}  // namespace

int main(int argc, char** argv) {
  const int batteries = argc > 1 ? std::atoi(argv[1]) : 1000;
  const int weeks = argc > 2 ? std::atoi(argv[2]) : 260;
  std::string pattern = (std::filesystem::temp_directory_path() / "pbfleet-bench-XXXXXX").string();
  if (::mkdtemp(pattern.data()) == nullptr) return 1;
  const std::filesystem::path dir = pattern;
  {
    SqliteOptions options;
    options.file = dir / "bench.db";
    auto store = must(open_sqlite_store(options), "open");
    std::printf("fleet: %d batteries x %d weekly readings\n", batteries, weeks);
    create_fleet(*store, batteries);
    bulk_load(*store, batteries, weeks);
    single_appends(*store, 300);
    group_commits(*store, 100, 64);
    replays(*store, 300);
    queries(*store);
    const auto count = must(store->readings_count(), "count");
    store.reset();  // checkpoint: the WAL folds into the file
    const auto bytes = std::filesystem::file_size(dir / "bench.db");
    std::printf("database: %.1f MB, %.0f bytes per reading (all tables and indexes)\n", bytes / 1e6,
                static_cast<double>(bytes) / count);
  }
  std::filesystem::remove_all(dir);
  return 0;
}
