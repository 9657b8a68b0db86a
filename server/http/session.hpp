// One HTTP connection (internal to server/http; includes Beast).
#pragma once

#include <array>
#include <atomic>
#include <memory>
#include <mutex>
#include <optional>
#include <unordered_map>

#include <boost/asio/dispatch.hpp>
#include <boost/asio/post.hpp>
#include <boost/asio/thread_pool.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>

#include "server/http/server.hpp"

namespace pbfleet::http::detail {

namespace beast = boost::beast;
namespace net = boost::asio;
using tcp = net::ip::tcp;

class Session;

// What every session shares with the listener.
struct Shared {
  ServerOptions options;
  Dispatch dispatch;
  Refusal refusal;
  net::thread_pool workers;
  std::atomic<bool> draining{false};
  std::atomic<std::size_t> open{0};
  std::mutex mutex;                                     // guards `sessions`
  std::unordered_map<Session*, std::weak_ptr<Session>> sessions;
  std::function<void()> on_all_closed;                  // called when draining and open hits 0

  Shared(ServerOptions o, Dispatch d, Refusal r)
      : options(std::move(o)), dispatch(std::move(d)), refusal(std::move(r)),
        workers(options.worker_threads) {}
};

class Session : public std::enable_shared_from_this<Session> {
 public:
  Session(tcp::socket&& socket, std::shared_ptr<Shared> shared);
  ~Session();
  void start();
  // Closes the connection if it waits for a request; a request being
  // handled finishes first. Called on stop.
  void close_if_idle();

 private:
  using Parser = beast::http::request_parser<beast::http::string_body>;

  void read_header();
  void on_header(beast::error_code ec);
  void on_body(beast::error_code ec);
  void handle();
  void refuse(int status, std::string_view detail);
  void write(Response response, bool keep_alive);
  void on_write(bool keep_alive, beast::error_code ec);
  void drain();
  void close();

  beast::tcp_stream stream_;
  beast::flat_buffer buffer_;
  std::optional<Parser> parser_;
  std::shared_ptr<Shared> shared_;
  std::string peer_;
  std::size_t served_ = 0;
  std::array<char, 16 * 1024> scratch_{};  // discarded input during a lingering close
  bool idle_ = false;  // waiting for a request head (strand only)
};

}  // namespace pbfleet::http::detail
