#include "tests/bench/load.hpp"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <boost/asio/co_spawn.hpp>
#include <boost/asio/detached.hpp>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/use_awaitable.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <chrono>
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
  std::vector<double> latencies_s;
  for (std::size_t i = 0; s.take(i);) {
    auto req = make_request(s, s.spec.make(i));
    stream.expires_after(kRequestTimeout);
    const auto sent = SteadyClock::now();
    co_await bhttp::async_write(stream, req, asio::use_awaitable);
    bhttp::response<bhttp::string_body> res;
    co_await bhttp::async_read(stream, buffer, res, asio::use_awaitable);
    if (static_cast<int>(res.result_int()) != s.spec.expect_status) {
      s.fail(std::string(req.target()) + " answered " + std::to_string(res.result_int()) + ": " +
             res.body().substr(0, 300));
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
