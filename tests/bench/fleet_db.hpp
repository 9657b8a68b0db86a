// The generated fleet the report benchmarks read: the demo generator's
// fictional fleet (deploy/demogen), bulk-loaded through the storage layer
// into a database file kept in a cache folder between runs.
#pragma once

#include <chrono>
#include <filesystem>
#include <string>

#include "server/storage/store.hpp"

namespace pbfleet::demogen {
struct Fleet;
}

namespace pbfleet::bench {

// Date of the newest generated round (a Monday); fixed so cached databases
// and report results stay the same from run to run.
inline constexpr std::chrono::sys_days kLastRound{std::chrono::year{2026} / 11 / 30};
// "Now" for the reports: the day after the last round, noon UTC.
inline constexpr std::chrono::sys_seconds kReportNow{
    std::chrono::sys_days{kLastRound + std::chrono::days{1}} + std::chrono::hours{12}};

struct FleetDb {
  std::filesystem::path file;
  int batteries = 0;
  int weeks = 0;
  bool reused = false;        // found complete in the cache
  double build_seconds = 0;   // generation and load time when built now
};

// The database of `batteries` x `weeks` in `cache_dir`, built when missing
// (or left half-built by an interrupted run). Readings are stored week by
// week within groups of batteries, as weekly rounds would store them, so a
// battery's readings are spread over the file as in a real database.
// Exits the process with a message on any storage error.
FleetDb fleet_db(const std::filesystem::path& cache_dir, int batteries, int weeks);

// Stores a generated fleet's depots, vehicles and batteries (fitted) in an
// empty database.
void load_structure(storage::Store& store, const demogen::Fleet& fleet);

// Generates the fleet of `batteries` x `weeks` into an empty store (any
// backend), in the same order as fleet_db; returns the readings stored.
std::size_t load_generated_fleet(storage::Store& store, int batteries, int weeks);

// Opens a store on an existing database (exits on error).
std::unique_ptr<storage::Store> open_store(const std::filesystem::path& file);

// A fresh admin token stored in `store`; returns the raw token.
std::string admin_token(storage::Store& store);

// Exits with a message when `r` holds an error; the value otherwise.
template <class T>
T must(storage::StoreResult<T> r, const char* what);

}  // namespace pbfleet::bench

#include <cstdio>
#include <cstdlib>

template <class T>
T pbfleet::bench::must(storage::StoreResult<T> r, const char* what) {
  if (!r.ok()) {
    std::fprintf(stderr, "%s failed: %s\n", what, r.error().detail.c_str());
    std::exit(1);
  }
  return std::move(r).value();
}
