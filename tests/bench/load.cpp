#include "tests/bench/load.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <boost/asio/co_spawn.hpp>
#include <boost/asio/detached.hpp>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/read.hpp>
#include <boost/asio/use_awaitable.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <chrono>
#include <limits>
#include <string>
#include <mutex>
#include <thread>
#include <vector>

#include "tests/bench/figure.hpp"

namespace pbfleet::bench {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace bhttp = beast::http;

namespace {

constexpr auto kRequestTimeout = std::chrono::seconds{30};

struct Shared {
  explicit Shared(const LoadSpec& s) : spec(s) {}
  const LoadSpec& spec;
  SteadyClock::time_point start = SteadyClock::now();
  std::atomic<std::size_t> next{0}, done{0};
  std::atomic<bool> failed{false};
  std::mutex mutex;
  std::string error;
  std::vector<double> latencies_s;

  void keep(const std::vector<double>& mine) {
    std::lock_guard lock(mutex);
    latencies_s.insert(latencies_s.end(), mine.begin(), mine.end());
  }
  void fail(std::string what) {
    std::lock_guard lock(mutex);
    if (error.empty()) error = std::move(what);
    failed = true;
  }
  // Index of the next request to send, or false when the run is over.
  bool take(std::size_t& i) {
    if (failed || seconds_since(start) >= spec.seconds) return false;
    i = next++;
    return i < spec.limit;
  }
};

bhttp::request<bhttp::string_body> make_request(const Shared& s, LoadRequest r) {
  bhttp::request<bhttp::string_body> req{bhttp::string_to_verb(r.method), r.target, 11};
  req.set(bhttp::field::host, "127.0.0.1:" + std::to_string(s.spec.port));
  req.keep_alive(true);
  if (!s.spec.token.empty()) req.set(bhttp::field::authorization, "Bearer " + s.spec.token);
  if (!r.body.empty()) req.set(bhttp::field::content_type, "application/json");
  if (!r.prefer.empty()) req.set("Prefer", r.prefer);
  req.body() = std::move(r.body);
  req.prepare_payload();
  return req;
}

asio::awaitable<void> connection(Shared& s) {
  beast::tcp_stream stream(co_await asio::this_coro::executor);
  stream.expires_after(kRequestTimeout);
  co_await stream.async_connect({asio::ip::make_address("127.0.0.1"), s.spec.port}, asio::use_awaitable);
  stream.socket().set_option(asio::ip::tcp::no_delay(true));
  beast::flat_buffer buffer;
  std::string body;  // the last answer's body, its capacity reused
  std::vector<double> latencies_s;
  for (std::size_t i = 0; s.take(i);) {
    auto req = make_request(s, s.spec.make(i));
    stream.expires_after(kRequestTimeout);
    const auto sent = SteadyClock::now();
    co_await bhttp::async_write(stream, req, asio::use_awaitable);
    // The head through Beast; the body (pbfleetd always sends a
    // Content-Length) straight into one string of its size: Beast's
    // string-body parser cost the load generator more than the server
    // spent on a history answer kept in its cache.
    bhttp::response_parser<bhttp::empty_body> parser;
    parser.body_limit(std::numeric_limits<std::uint64_t>::max());  // the body is read below
    co_await bhttp::async_read_header(stream, buffer, parser, asio::use_awaitable);
    body.clear();
    if (!parser.is_done()) {
      const auto length = parser.content_length();
      if (!length) {
        s.fail(std::string(req.target()) + ": an answer without Content-Length");
        break;
      }
      body.resize(static_cast<std::size_t>(*length));
      const std::size_t buffered = std::min(buffer.size(), body.size());
      asio::buffer_copy(asio::buffer(body.data(), buffered), buffer.data());
      buffer.consume(buffered);
      co_await asio::async_read(stream, asio::buffer(body.data() + buffered, body.size() - buffered),
                                asio::use_awaitable);
    }
    const int status = static_cast<int>(parser.get().result_int());
    if (status != s.spec.expect_status) {
      s.fail(std::string(req.target()) + " answered " + std::to_string(status) + ": " + body.substr(0, 300));
      break;
    }
    latencies_s.push_back(seconds_since(sent));
    ++s.done;
  }
  s.keep(latencies_s);
  beast::error_code ignored;
  stream.socket().shutdown(asio::ip::tcp::socket::shutdown_both, ignored);
}

void client_thread(Shared& s) {
  asio::io_context io;
  for (int c = 0; c < s.spec.connections_per_thread; ++c) {
    asio::co_spawn(io, connection(s), [&s](std::exception_ptr e) {
      if (!e) return;
      try {
        std::rethrow_exception(e);
      } catch (const std::exception& x) {
        s.fail(x.what());
      }
    });
  }
  io.run();
}

}  // namespace

LoadResult run_load(const LoadSpec& spec) {
  Shared shared(spec);
  std::vector<std::thread> threads;
  for (int t = 0; t < spec.threads; ++t) threads.emplace_back([&] { client_thread(shared); });
  for (auto& t : threads) t.join();
  return {shared.done.load(), seconds_since(shared.start), shared.error, std::move(shared.latencies_s)};
}

double LoadResult::percentile_s(double p) const {
  if (latencies_s.empty()) return 0.0;
  std::vector<double> sorted = latencies_s;
  std::sort(sorted.begin(), sorted.end());
  const auto rank = static_cast<std::size_t>(std::ceil(p / 100.0 * static_cast<double>(sorted.size())));
  return sorted[std::clamp<std::size_t>(rank, 1, sorted.size()) - 1];
}

}  // namespace pbfleet::bench
