#include "server/api/metrics.hpp"

#include <cstdio>
#include <sstream>

namespace pbfleet::api {

namespace {

// Label values escape backslash, double quote and newline (format 0.0.4).
std::string escape_label(const std::string& value) {
  std::string out;
  for (char c : value) {
    if (c == '\\' || c == '"') out += '\\';
    if (c == '\n') {
      out += "\\n";
      continue;
    }
    out += c;
  }
  return out;
}

// Shortest text that round-trips the bucket bound ("0.0005", "1", "2.5").
std::string number(double v) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%.17g", v);
  for (int precision = 1; precision <= 17; ++precision) {
    char shorter[32];
    std::snprintf(shorter, sizeof shorter, "%.*g", precision, v);
    if (std::stod(shorter) == v) return shorter;
  }
  return buffer;
}

}  // namespace

void Metrics::record_request(const std::string& route, int status,
                             std::chrono::nanoseconds duration) {
  const double seconds = std::chrono::duration<double>(duration).count();
  std::lock_guard lock(mutex_);
  ++requests_[{route, status}];
  Histogram& h = latency_[route];
  for (std::size_t i = 0; i < kBucketsS.size(); ++i) {
    if (seconds <= kBucketsS[i]) {
      ++h.buckets[i];
      break;
    }
  }
  ++h.count;
  h.sum_s += seconds;
}

void Metrics::add_readings_stored(std::uint64_t count) {
  std::lock_guard lock(mutex_);
  readings_stored_ += count;
}

std::string Metrics::render(std::int64_t readings_in_db) const {
  std::ostringstream out;
  std::lock_guard lock(mutex_);
  out << "# HELP pbfleet_http_requests_total HTTP requests answered, by route and status.\n"
      << "# TYPE pbfleet_http_requests_total counter\n";
  for (const auto& [key, count] : requests_)
    out << "pbfleet_http_requests_total{route=\"" << escape_label(key.first) << "\",status=\""
        << key.second << "\"} " << count << '\n';
  out << "# HELP pbfleet_http_request_duration_seconds Time from request read to response ready.\n"
      << "# TYPE pbfleet_http_request_duration_seconds histogram\n";
  for (const auto& [route, h] : latency_) {
    const std::string label = "route=\"" + escape_label(route) + "\"";
    std::uint64_t cumulative = 0;
    for (std::size_t i = 0; i < kBucketsS.size(); ++i) {
      cumulative += h.buckets[i];
      out << "pbfleet_http_request_duration_seconds_bucket{" << label << ",le=\""
          << number(kBucketsS[i]) << "\"} " << cumulative << '\n';
    }
    out << "pbfleet_http_request_duration_seconds_bucket{" << label << ",le=\"+Inf\"} " << h.count
        << '\n'
        << "pbfleet_http_request_duration_seconds_sum{" << label << "} " << number(h.sum_s) << '\n'
        << "pbfleet_http_request_duration_seconds_count{" << label << "} " << h.count << '\n';
  }
  out << "# HELP pbfleet_readings_stored_total Readings newly stored by this process.\n"
      << "# TYPE pbfleet_readings_stored_total counter\n"
      << "pbfleet_readings_stored_total " << readings_stored_ << '\n';
  if (readings_in_db >= 0) {
    out << "# HELP pbfleet_readings Readings in the database.\n"
        << "# TYPE pbfleet_readings gauge\n"
        << "pbfleet_readings " << readings_in_db << '\n';
  }
  return out.str();
}

}  // namespace pbfleet::api
