// PostgreSQL figures, against limits measured in the same run on a
// throwaway PostgreSQL 15 cluster this benchmark starts (fsync on, as in
// production; tests/support/pg_cluster.hpp) and stops:
//   pg.ingest.single     POST /v1/readings, one reading per request, through
//                        pbfleetd --database; vs its own GET /healthz rate
//                        (the HTTP ceiling, target >= 0.5 as on SQLite) and
//                        vs a raw libpqxx insert of the same rows, one row per
//                        transaction from 8 connections;
//   pg.ingest.batch500   500 readings per request vs a raw libpqxx prepared
//                        insert of the same rows, 500 per transaction
//                        (target >= 0.7);
//   pg.report.winter     the winter report (in process, the service the
//                        handler calls) at B batteries x W weeks on
//                        PostgreSQL vs the same fleet on SQLite.
//
//   bench_pg --pbfleetd PATH --work DIR [--single N] [--batches M] [--seconds S]
//            [--connections C] [--batteries B] [--weeks W] [--repeat R]
//            [--fsync off]   (--batteries 0 skips the report figure)
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

#include "deploy/demogen/generator.hpp"
#include "server/api/services/reports.hpp"
#include "server/storage/pg_store.hpp"
#include "tests/bench/daemon.hpp"
#include "tests/bench/figure.hpp"
#include "tests/bench/ingest_bodies.hpp"
#include "tests/bench/fleet_db.hpp"
#include "tests/bench/load.hpp"
#include "tests/bench/raw_pg.hpp"
#include "tests/support/pg_cluster.hpp"

namespace {

using namespace pbfleet;
using namespace pbfleet::bench;
namespace fs = std::filesystem;
using models::wire::ReadingInput;

constexpr std::size_t kBatch = 500;
constexpr int kRawSingleConnections = 8;

struct Options {
  fs::path pbfleetd, work;
  std::size_t single = 50'000;
  std::size_t batches = 100;
  double seconds = 3.0;
  int connections = 32;
  int batteries = 10'000;
  int weeks = 260;
  int repeat = 3;
  bool fsync = true;
};

Options parse(int argc, char** argv) {
  Options o;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string key = argv[i], value = argv[i + 1];
    if (key == "--pbfleetd") o.pbfleetd = value;
    else if (key == "--work") o.work = value;
    else if (key == "--single") o.single = std::stoul(value);
    else if (key == "--batches") o.batches = std::stoul(value);
    else if (key == "--seconds") o.seconds = std::stod(value);
    else if (key == "--connections") o.connections = std::stoi(value);
    else if (key == "--batteries") o.batteries = std::stoi(value);
    else if (key == "--weeks") o.weeks = std::stoi(value);
    else if (key == "--repeat") o.repeat = std::stoi(value);
    else if (key == "--fsync") o.fsync = value != "off";
    else { std::fprintf(stderr, "unknown option %s\n", key.c_str()); std::exit(2); }
  }
  if (o.pbfleetd.empty() || o.work.empty()) {
    std::fprintf(stderr, "usage: bench_pg --pbfleetd PATH --work DIR [options]\n");
    std::exit(2);
  }
  return o;
}

template <class Make>
double drive(std::uint16_t port, const std::string& token, const Options& o, std::size_t limit,
             int expect, Make make) {
  LoadSpec spec;
  spec.port = port;
  spec.token = token;
  spec.threads = 2;
  spec.connections_per_thread = o.connections;
  spec.limit = limit;
  spec.seconds = o.seconds;
  spec.expect_status = expect;
  spec.make = make;
  const auto result = run_load(spec);
  if (!result.error.empty()) std::exit((std::fprintf(stderr, "load failed: %s\n", result.error.c_str()), 1));
  return result.rate();
}

std::unique_ptr<storage::Store> open_pg(const std::string& uri) {
  return must(storage::open_postgres_store(uri), "open PostgreSQL store");
}

// A fresh PostgreSQL database with the fleet's structure.
std::string fresh_pg(testing::PgCluster& cluster, const std::string& name,
                     const demogen::Fleet& fleet, std::string* token) {
  const std::string uri = cluster.create_database(name);
  auto store = open_pg(uri);
  load_structure(*store, fleet);
  if (token) *token = admin_token(*store);
  return uri;
}

double winter_seconds(storage::Store& store, int repeat) {
  analytics::ColdSpec cold;
  cold.cold_date = kLastRound + std::chrono::days{14};
  return median_seconds(repeat, [&] {
    auto r = api::build_winter_report(store, std::nullopt, cold, kReportNow, {});
    if (!r) std::exit((std::fprintf(stderr, "winter: %s\n", r.error().detail.c_str()), 1));
  });
}

void ingest(testing::PgCluster& cluster, const Options& o) {
  std::vector<ReadingInput> readings;
  const auto fleet = small_fleet(o.single + o.batches * kBatch, kLastRound, readings);
  const auto single_bodies = bodies(readings, 0, o.single, 1);
  const auto batch_bodies = bodies(readings, o.single, o.batches * kBatch, kBatch);
  std::string token;
  const std::string served = fresh_pg(cluster, "served", fleet, &token);
  double healthz = 0, single = 0, batched = 0;
  std::size_t single_done = 0;
  {
    Daemon daemon(o.pbfleetd, served, o.work / "pbfleetd.log");
    const auto port = daemon.port();
    healthz = drive(port, token, o, 10'000'000, 200, [](std::size_t) {
      return LoadRequest{"GET", "/healthz", {}, {}};
    });
    single = drive(port, token, o, single_bodies.size(), 201, [&](std::size_t i) {
      return LoadRequest{"POST", "/v1/readings", single_bodies[i], {}};
    });
    single_done = static_cast<std::size_t>(open_pg(served)->readings_count().value());
    batched = kBatch * drive(port, token, o, batch_bodies.size(), 201, [&](std::size_t i) {
      return LoadRequest{"POST", "/v1/readings", batch_bodies[i], {}};
    });
  }
  // The raw limits insert exactly the rows the server stored in each phase.
  const std::vector<ReadingInput> single_rows(readings.begin(),
                                              readings.begin() + static_cast<long>(single_done));
  const auto first_batch = readings.begin() + static_cast<long>(o.single);
  const std::vector<ReadingInput> batch_rows(first_batch,
                                             first_batch + static_cast<long>(o.batches * kBatch));
  const double raw_single =
      raw_pg_insert_rate(fresh_pg(cluster, "raw_single", fleet, nullptr), single_rows, 1,
                         kRawSingleConnections);
  const double raw_batch =
      raw_pg_insert_rate(fresh_pg(cluster, "raw_batch", fleet, nullptr), batch_rows, kBatch, 1);
  const std::string load = "2 threads x " + std::to_string(o.connections) + " keep-alive conns";
  print_figure({"pg.ingest.single", single, "readings/s", "GET /healthz", healthz, "req/s",
                single / healthz, at_least(0.5, ">= 0.50"), {}, load});
  print_figure({"pg.ingest.single.vs_raw", single, "readings/s", "raw libpqxx insert", raw_single,
                "rows/s", single / raw_single, {}, {},
                "raw: 1 row per transaction from " + std::to_string(kRawSingleConnections) +
                    " connections"});
  print_figure({"pg.ingest.batch500", batched, "readings/s", "raw libpqxx insert", raw_batch,
                "rows/s", batched / raw_batch, at_least(0.7, ">= 0.70"), {},
                "500 per request and per raw transaction"});
}

void winter(testing::PgCluster& cluster, const Options& o) {
  const auto lite = fleet_db(o.work / "bench-data", o.batteries, o.weeks);
  const std::string uri = cluster.create_database("fleet");
  double load_seconds = 0;
  {
    auto store = open_pg(uri);
    const auto start = SteadyClock::now();
    const std::size_t n = load_generated_fleet(*store, o.batteries, o.weeks);
    load_seconds = seconds_since(start);
    std::fprintf(stderr, "PostgreSQL: loaded %zu readings in %.1f s (%.0f rows/s)\n", n,
                 load_seconds, static_cast<double>(n) / load_seconds);
  }
  auto pg = open_pg(uri);
  auto sqlite = open_store(lite.file);
  const double on_pg = winter_seconds(*pg, o.repeat);
  const double on_sqlite = winter_seconds(*sqlite, o.repeat);
  const std::string size = std::to_string(o.batteries) + " x " + std::to_string(o.weeks);
  print_figure({"pg.report.winter", on_pg * 1000, "ms", "same report on SQLite", on_sqlite * 1000,
                "ms", on_pg / on_sqlite, {}, {}, size + ", in process, median of " +
                                                     std::to_string(o.repeat)});
}

}  // namespace

int main(int argc, char** argv) {
  const Options o = parse(argc, argv);
  arm_watchdog(std::chrono::seconds{3000}, kill_daemons);
  fs::create_directories(o.work);
  testing::PgCluster cluster({.fsync = o.fsync});
  std::fprintf(stderr, "PostgreSQL cluster on 127.0.0.1:%u (fsync %s)\n", cluster.port(),
               o.fsync ? "on" : "off");
  ingest(cluster, o);
  if (o.batteries > 0) winter(cluster, o);
  return 0;  // a missed target is a figure to read, not a failed run
}
