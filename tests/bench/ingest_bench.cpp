// Ingest figures: readings per second through POST /v1/readings, one
// reading per request and in batches of 500 (keep-alive, 2 client threads,
// loopback), against limits measured in the same run:
//   single  vs pbfleetd's own GET /healthz rate (the HTTP stack's ceiling);
//   batched vs a raw SQLite insert of the same rows (one prepared INSERT,
//           one transaction per 500 rows, the server's schema and pragmas);
//           once with the default answer (every reading echoed with its
//           derived values) and once with "Prefer: return=minimal" (counts,
//           reading ids and flags, as the CLI's import asks for);
//   store   the same rows through Store::append_reading_batches in process
//           (no HTTP, no JSON) vs the raw insert: the storage layer's share.
//
//   bench_ingest --pbfleetd PATH --work DIR [--single N] [--batches M] [--seconds S]
//                [--connections C]
//
// Load as wrk makes it: 2 client threads, each driving C keep-alive
// connections (default 32) that send the next request as soon as the last
// reply came; the healthz limit is measured with the same load. N and M
// bound the requests; S bounds each phase's time (whichever ends first). The server runs on 127.0.0.1 with a temporary database in DIR.
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <nlohmann/json.hpp>
#include <string>
#include <tuple>
#include <utility>
#include <vector>

#include "deploy/demogen/generator.hpp"
#include "server/storage/store.hpp"
#include "tests/bench/daemon.hpp"
#include "tests/bench/figure.hpp"
#include "tests/bench/ingest_bodies.hpp"
#include "tests/bench/fleet_db.hpp"
#include "tests/bench/load.hpp"
#include "tests/bench/raw_sqlite.hpp"

namespace {

using namespace pbfleet;
using namespace pbfleet::bench;
namespace fs = std::filesystem;
using models::wire::ReadingInput;

constexpr int kClientThreads = 2;
constexpr std::size_t kBatch = 500;

struct Options {
  fs::path pbfleetd, work;
  std::size_t single = 100'000;  // single-reading requests at most
  std::size_t batches = 200;     // batched requests at most
  double seconds = 3.0;          // per phase at most
  int connections = 32;          // keep-alive connections per client thread
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
    else { std::fprintf(stderr, "unknown option %s\n", key.c_str()); std::exit(2); }
  }
  if (o.pbfleetd.empty() || o.work.empty()) {
    std::fprintf(stderr, "usage: bench_ingest --pbfleetd PATH --work DIR [--single N] "
                         "[--batches M] [--seconds S] [--connections C]\n");
    std::exit(2);
  }
  return o;
}

// Requests/s of `make` over the standard load; exits on any failure.
template <class Make>
LoadResult drive_load(std::uint16_t port, const std::string& token, const Options& o,
                      std::size_t limit, int expect, Make make) {
  LoadSpec spec;
  spec.port = port;
  spec.token = token;
  spec.threads = kClientThreads;
  spec.connections_per_thread = o.connections;
  spec.limit = limit;
  spec.seconds = o.seconds;
  spec.expect_status = expect;
  spec.make = make;
  auto result = run_load(spec);
  if (!result.error.empty()) {
    std::fprintf(stderr, "load failed: %s\n", result.error.c_str());
    std::exit(1);
  }
  return result;
}

template <class Make>
double drive(std::uint16_t port, const std::string& token, const Options& o, std::size_t limit,
             int expect, Make make) {
  return drive_load(port, token, o, limit, expect, make).rate();
}

// What the daemon's CPU went to during a batched phase, per reading: a
// steadier figure than the rate on a shared machine, for comparing changes
// to the request path (parsing, deriving, rendering) run against run.
struct CpuSplit {
  double all_us = 0;     // every thread
  double writer_us = 0;  // the writer thread alone
};

template <class Make>
std::pair<double, CpuSplit> drive_batches(const Daemon& daemon, const std::string& token,
                                          const Options& o, std::size_t limit, Make make) {
  const double all = daemon.cpu_seconds(), writer = daemon.cpu_seconds("reading-writer");
  const LoadResult result = drive_load(daemon.port(), token, o, limit, 201, make);
  const double readings = static_cast<double>(result.requests * kBatch);
  CpuSplit split;
  split.all_us = (daemon.cpu_seconds() - all) / readings * 1e6;
  split.writer_us = (daemon.cpu_seconds("reading-writer") - writer) / readings * 1e6;
  return {result.rate() * kBatch, split};
}

void print_cpu(const std::string& name, const CpuSplit& split) {
  print_figure({name, split.all_us, "us CPU/reading", "writer thread", split.writer_us, "us",
                split.writer_us > 0 ? split.all_us / split.writer_us : 0, Target{}, std::nullopt,
                "pbfleetd's CPU per reading stored, all threads against the writer's"});
}

// A fresh database with the fleet's depots, vehicles and batteries.
fs::path fresh_db(const fs::path& dir, const std::string& name, const demogen::Fleet& fleet,
                  std::string* token) {
  const fs::path file = dir / name;
  auto store = open_store(file);
  load_structure(*store, fleet);
  if (token) *token = admin_token(*store);
  return file;
}

}  // namespace

int main(int argc, char** argv) {
  const Options o = parse(argc, argv);
  arm_watchdog(std::chrono::seconds{60 + static_cast<int>(6 * o.seconds)}, kill_daemons);
  fs::create_directories(o.work);
  std::vector<ReadingInput> readings;
  const auto fleet = small_fleet(o.single + 2 * o.batches * kBatch, kLastRound, readings);
  const auto single_bodies = bodies(readings, 0, o.single, 1);
  const auto batch_bodies = bodies(readings, o.single, o.batches * kBatch, kBatch);
  const auto minimal_bodies =
      bodies(readings, o.single + o.batches * kBatch, o.batches * kBatch, kBatch);

  std::string token;
  const fs::path served = fresh_db(o.work, "served.db", fleet, &token);
  double healthz = 0, single = 0, batched = 0, minimal = 0;
  CpuSplit batched_cpu, minimal_cpu;
  {
    Daemon daemon(o.pbfleetd, served, o.work / "pbfleetd.log");
    const auto port = daemon.port();
    const std::size_t many = 10'000'000;
    healthz = drive(port, token, o, many, 200, [](std::size_t) {
      return LoadRequest{"GET", "/healthz", {}, {}};
    });
    single = drive(port, token, o, single_bodies.size(), 201, [&](std::size_t i) {
      return LoadRequest{"POST", "/v1/readings", single_bodies[i], {}};
    });
    std::tie(batched, batched_cpu) = drive_batches(daemon, token, o, batch_bodies.size(), [&](std::size_t i) {
      return LoadRequest{"POST", "/v1/readings", batch_bodies[i], {}};
    });
    std::tie(minimal, minimal_cpu) = drive_batches(daemon, token, o, minimal_bodies.size(), [&](std::size_t i) {
      return LoadRequest{"POST", "/v1/readings", minimal_bodies[i], "return=minimal"};
    });
  }
  const fs::path raw = fresh_db(o.work, "raw.db", fleet, nullptr);
  const auto first_batch = readings.begin() + static_cast<long>(o.single);
  const std::vector<ReadingInput> same_rows(first_batch,
                                            first_batch + static_cast<long>(o.batches * kBatch));
  const double raw_rate = raw_insert_rate(raw, same_rows, kBatch);
  // The same rows again, 32 to a statement as the store writes them.
  const fs::path raw32 = fresh_db(o.work, "raw32.db", fleet, nullptr);
  const double raw32_rate = raw_insert_rate(raw32, same_rows, kBatch, 32);
  // The same rows through the store alone (no HTTP, no JSON): what the
  // writer thread does per batch, one batch per transaction.
  const fs::path direct = fresh_db(o.work, "store.db", fleet, nullptr);
  double store_rate = 0;
  {
    auto store = open_store(direct);
    const auto start = SteadyClock::now();
    for (std::size_t i = 0; i < same_rows.size(); i += kBatch) {
      const auto end = same_rows.begin() + static_cast<long>(std::min(same_rows.size(), i + kBatch));
      std::vector<std::vector<storage::PreparedReading>> group;
      group.push_back(storage::prepare_readings({same_rows.begin() + static_cast<long>(i), end}));
      auto stored = store->append_reading_batches(std::move(group), kReportNow);
      if (!stored || !stored->front().accepted()) {
        std::fprintf(stderr, "store append failed\n");
        return 1;
      }
    }
    store_rate = static_cast<double>(same_rows.size()) / seconds_since(start);
  }

  const Target none;  // printed for reading, nothing to meet
  print_figure({"ingest.single", single, "readings/s", "GET /healthz", healthz, "req/s",
                single / healthz, at_least(0.5, ">= 0.50"), {},
                "2 threads x " + std::to_string(o.connections) + " keep-alive conns"});
  print_figure({"ingest.batch500", batched, "readings/s", "raw SQLite insert", raw_rate, "rows/s",
                batched / raw_rate, at_least(0.85, ">= 0.85"), {},
                "500 per request and per raw transaction"});
  print_figure({"ingest.store.batch500", store_rate, "readings/s", "raw SQLite insert", raw_rate,
                "rows/s", store_rate / raw_rate, none, {},
                "the store alone in process, preparing too, 500 per transaction"});
  print_figure({"ingest.batch500.minimal", minimal, "readings/s", "raw SQLite insert", raw_rate,
                "rows/s", minimal / raw_rate, at_least(0.9, ">= 0.90"), {},
                "as above, Prefer: return=minimal"});
  print_figure({"ingest.raw.rows32", raw32_rate, "rows/s", "raw SQLite insert", raw_rate, "rows/s",
                raw32_rate / raw_rate, none, {},
                "the raw insert 32 rows to a statement, as the store writes; batch500 is " +
                    std::to_string(batched / raw32_rate).substr(0, 4) + " of it"});
  print_cpu("ingest.batch500.cpu", batched_cpu);
  print_cpu("ingest.batch500.minimal.cpu", minimal_cpu);
  return 0;  // a missed target is a figure to read, not a failed run
}
