// Reports asked again with no new data in between come from memory.
//
// An entry is keyed by what the report depends on: its name, the depot
// scope and its parameters (low temperature, cold date, days), and holds
// the store's data version (Store::data_version) read before it was built.
// A stored reading or a change to depots, vehicles or batteries, made by
// this process or another sharing the database, moves the version on, so
// the next request builds afresh. Entries also age out after `max_age`,
// since reports measure data ages against "now".
//
// Holds built report objects (shared by the API and the dashboard) and
// rendered bodies, each under its own key. Safe to use from any thread; two
// requests missing the same entry at once both build it.
#pragma once

#include <chrono>
#include <cstdint>
#include <memory>
#include <mutex>
#include <optional>
#include <string>
#include <string_view>
#include <typeindex>
#include <unordered_map>

#include "server/storage/store.hpp"

namespace pbfleet::api {

struct ReportCacheOptions {
  std::size_t max_entries = 64;     // beyond it the oldest entry goes
  std::chrono::seconds max_age{60};  // an entry older than this is built again
};

class ReportCache {
 public:
  explicit ReportCache(ReportCacheOptions options = {}) : options_(options) {}

  // The value under `key` built at data `version`, or `make()`'s value
  // (StoreResult<T>) kept under it. Errors are passed on, never kept.
  template <class T, class Make>
  storage::StoreResult<std::shared_ptr<const T>> get(const std::string& key, std::int64_t version,
                                                     std::chrono::sys_seconds now, Make&& make) {
    if (auto hit = find(key, typeid(T), version, now)) return std::static_pointer_cast<const T>(hit);
    storage::StoreResult<T> made = make();
    if (!made) return made.error();
    auto value = std::make_shared<const T>(std::move(made).value());
    put(key, typeid(T), version, now, value);
    return value;
  }

  struct Counts {
    std::uint64_t hits = 0;
    std::uint64_t misses = 0;
  };
  [[nodiscard]] Counts counts() const;

 private:
  struct Entry {
    std::type_index type;
    std::int64_t version;
    std::chrono::sys_seconds built_at;
    std::shared_ptr<const void> value;
  };
  std::shared_ptr<const void> find(const std::string& key, std::type_index type,
                                   std::int64_t version, std::chrono::sys_seconds now);
  void put(const std::string& key, std::type_index type, std::int64_t version,
           std::chrono::sys_seconds now, std::shared_ptr<const void> value);

  ReportCacheOptions options_;
  mutable std::mutex mutex_;
  std::unordered_map<std::string, Entry> entries_;  // GUARDED_BY(mutex_)
  Counts counts_;                                   // GUARDED_BY(mutex_)
};

// The key of a report: its name, the depot scope ("all" or the id) and its
// parameters as the caller spells them, e.g. report_key("winter", 3,
// "low=-25;on=2026-12-14").
std::string report_key(std::string_view name, std::optional<storage::Id> depot,
                       std::string_view params);

}  // namespace pbfleet::api
