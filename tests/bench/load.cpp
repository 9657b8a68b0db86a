#include "tests/bench/load.hpp"

#include <atomic>
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
  for (std::size_t i = 0; s.take(i);) {
    auto req = make_request(s, s.spec.make(i));
    stream.expires_after(kRequestTimeout);
    co_await bhttp::async_write(stream, req, asio::use_awaitable);
    bhttp::response<bhttp::string_body> res;
    co_await bhttp::async_read(stream, buffer, res, asio::use_awaitable);
    if (static_cast<int>(res.result_int()) != s.spec.expect_status) {
      s.fail(std::string(req.target()) + " answered " + std::to_string(res.result_int()) + ": " +
             res.body().substr(0, 300));
      break;
    }
    ++s.done;
  }
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
  return {shared.done.load(), seconds_since(shared.start), shared.error};
}

}  // namespace pbfleet::bench
