#include "server/api/services/report_cache.hpp"

#include <algorithm>

namespace pbfleet::api {

std::shared_ptr<const void> ReportCache::find(const std::string& key, std::type_index type,
                                              std::int64_t version, std::chrono::sys_seconds now) {
  std::lock_guard lock(mutex_);
  const auto it = entries_.find(key);
  const bool fresh = it != entries_.end() && it->second.type == type &&
                     it->second.version == version && now >= it->second.built_at &&
                     now - it->second.built_at < options_.max_age;
  if (!fresh) {
    ++counts_.misses;
    return nullptr;
  }
  ++counts_.hits;
  return it->second.value;
}

void ReportCache::put(const std::string& key, std::type_index type, std::int64_t version,
                      std::chrono::sys_seconds now, std::shared_ptr<const void> value) {
  std::lock_guard lock(mutex_);
  if (!entries_.contains(key) && entries_.size() >= options_.max_entries && !entries_.empty()) {
    const auto oldest = std::min_element(entries_.begin(), entries_.end(), [](const auto& a, const auto& b) {
      return a.second.built_at < b.second.built_at;
    });
    entries_.erase(oldest);
  }
  entries_.insert_or_assign(key, Entry{type, version, now, std::move(value)});
}

ReportCache::Counts ReportCache::counts() const {
  std::lock_guard lock(mutex_);
  return counts_;
}

std::string report_key(std::string_view name, std::optional<storage::Id> depot,
                       std::string_view params) {
  std::string key(name);
  key += depot ? "|depot=" + std::to_string(*depot) : std::string("|depot=all");
  key += '|';
  key += params;
  return key;
}

}  // namespace pbfleet::api
