// The HTTP/1.1 listener: accepts connections, reads requests within the
// limits, hands each to one Dispatch function and writes its reply.
//
// Knows nothing of batteries, JSON or storage. Beast and Asio stay inside
// server.cpp and session.cpp so the rest of the service compiles fast.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>

#include "server/http/limits.hpp"
#include "server/http/message.hpp"

namespace pbfleet::http {

// Builds the response for a request refused by the transport itself
// (413 body too large, 431 header too large, 503 too many connections),
// so error bodies come from the application's one problem builder.
using Refusal = std::function<Response(int status, std::string_view detail)>;

struct ServerOptions {
  Limits limits;
  std::size_t io_threads = 2;      // threads running the sockets
  std::size_t worker_threads = 8;  // threads running Dispatch (handlers may block on the database)
  std::chrono::milliseconds drain_grace{10'000};  // longest wait for in-flight requests at stop
  bool stop_on_signals = true;     // SIGTERM / SIGINT start a graceful stop
};

class Server {
 public:
  Server(ServerOptions options, Dispatch dispatch, Refusal refusal);
  ~Server();
  Server(const Server&) = delete;
  Server& operator=(const Server&) = delete;

  // Binds host:port (port 0 = ephemeral). False and `error` set on failure.
  bool listen(const std::string& host, std::uint16_t port, std::string* error);
  // The bound port (after listen).
  [[nodiscard]] std::uint16_t port() const;
  // Serves until stop() or a signal; returns after in-flight requests
  // finished (or the drain grace ran out). REQUIRES: listen() succeeded.
  void run();
  // Stops accepting, lets in-flight requests finish, closes idle
  // connections. Safe from any thread.
  void stop();
  // Open connections right now.
  [[nodiscard]] std::size_t connections() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace pbfleet::http
