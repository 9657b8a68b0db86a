// Load generator for the HTTP figures, in the manner of wrk: a few client
// threads, each driving many keep-alive connections, each connection
// sending its next request as soon as the last reply arrived. Every
// request is bounded by a timeout; the run by a count and a time.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

namespace pbfleet::bench {

struct LoadRequest {
  std::string method;
  std::string target;
  std::string body;    // sent as application/json when not empty
  std::string prefer;  // Prefer header (RFC 7240) when not empty
};

struct LoadSpec {
  std::uint16_t port = 0;              // on 127.0.0.1
  std::string token;                   // Bearer token, or empty
  int threads = 2;
  int connections_per_thread = 32;
  std::size_t limit = 0;               // requests at most
  double seconds = 3.0;                // no request starts after this
  int expect_status = 200;             // any other answer stops the run
  std::function<LoadRequest(std::size_t)> make;  // the i-th request; called from any thread
};

struct LoadResult {
  std::size_t requests = 0;  // answered as expected
  double seconds = 0.0;
  std::string error;         // first failure; empty when none
  std::vector<double> latencies_s;  // each answered request, write to last byte read (unsorted)
  [[nodiscard]] double rate() const { return seconds > 0 ? requests / seconds : 0.0; }
  // The p-th percentile (0 < p <= 100, nearest rank) of the latencies; 0 when none.
  [[nodiscard]] double percentile_s(double p) const;
};

LoadResult run_load(const LoadSpec& spec);

}  // namespace pbfleet::bench
