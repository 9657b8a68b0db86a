// Bounds on what one client may cost the service. Each is a named constant
// with its reason; all can be changed through the configuration.
#pragma once

#include <chrono>
#include <cstddef>

namespace pbfleet::http {

struct Limits {
  // A weekly round of a large depot as JSON is well under 1 MiB; anything
  // bigger is refused with 413 before it is buffered.
  std::size_t body_bytes = 1024 * 1024;
  // Beast's default; a real client's request line and headers fit in 1-2 KiB.
  std::size_t header_bytes = 8 * 1024;
  // Whole request head (line and headers) must arrive within this, so a
  // client that trickles bytes (slowloris) is cut off. Also the keep-alive
  // idle time before the next request's first header.
  std::chrono::milliseconds header_timeout{10'000};
  // Whole body must arrive within this once the head is read.
  std::chrono::milliseconds body_timeout{30'000};
  // Whole response must be taken by the client within this.
  std::chrono::milliseconds write_timeout{30'000};
  // Open connections beyond this are answered 503 and closed at once.
  std::size_t max_connections = 512;
  // Requests served on one keep-alive connection before it is closed, so
  // one client cannot hold a connection forever.
  std::size_t max_requests_per_connection = 10'000;
};

}  // namespace pbfleet::http
