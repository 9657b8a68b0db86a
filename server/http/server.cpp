// Listener: accepts connections up to the cap, starts a Session for each,
// and runs the graceful stop (stop accepting, finish in-flight, close idle).
#include "server/http/server.hpp"

#include <csignal>
#include <optional>
#include <thread>
#include <vector>

#include <boost/asio/io_context.hpp>
#include <boost/asio/signal_set.hpp>
#include <boost/asio/strand.hpp>
#include <boost/asio/write.hpp>
#include <boost/asio/steady_timer.hpp>

#include "server/http/session.hpp"
#include "server/http/thread_name.hpp"

namespace pbfleet::http {

using namespace detail;  // NOLINT: internal names of this module

struct Server::Impl {
  net::io_context ioc;
  tcp::acceptor acceptor{net::make_strand(ioc)};
  std::shared_ptr<Shared> shared;
  std::optional<net::executor_work_guard<net::io_context::executor_type>> guard;
  net::signal_set signals{ioc};
  net::steady_timer grace_timer{ioc};

  Impl(ServerOptions o, Dispatch d, Refusal r)
      : shared(std::make_shared<Shared>(std::move(o), std::move(d), std::move(r))) {}

  void accept();
  void on_accept(beast::error_code ec, tcp::socket socket);
  void refuse_connection(tcp::socket socket);
  void begin_stop();
  void finish();
};

void Server::Impl::accept() {
  acceptor.async_accept(net::make_strand(ioc), [this](beast::error_code ec, tcp::socket socket) {
    on_accept(ec, std::move(socket));
  });
}

void Server::Impl::on_accept(beast::error_code ec, tcp::socket socket) {
  if (ec == net::error::operation_aborted || !acceptor.is_open()) return;
  if (!ec) {
    if (shared->open.load() >= shared->options.limits.max_connections) {
      refuse_connection(std::move(socket));
    } else {
      auto session = std::make_shared<Session>(std::move(socket), shared);
      {
        std::lock_guard lock(shared->mutex);
        ++shared->open;
        shared->sessions.emplace(session.get(), session);
      }
      session->start();
    }
  }
  accept();
}

// Over the connection cap: a fixed 503 and close, without reading the request.
void Server::Impl::refuse_connection(tcp::socket socket) {
  Response r = shared->refusal(503, "too many open connections; retry shortly");
  auto text = std::make_shared<std::string>(
      "HTTP/1.1 503 Service Unavailable\r\nContent-Type: " + r.content_type +
      "\r\nRetry-After: 1\r\nConnection: close\r\nContent-Length: " + std::to_string(r.body.size()) +
      "\r\n\r\n" + r.body);
  auto stream = std::make_shared<beast::tcp_stream>(std::move(socket));
  stream->expires_after(shared->options.limits.write_timeout);
  net::async_write(*stream, net::buffer(*text), [stream, text](beast::error_code, std::size_t) {
    beast::error_code ignored;
    stream->socket().shutdown(tcp::socket::shutdown_both, ignored);
  });
}

void Server::Impl::begin_stop() {
  if (shared->draining.exchange(true)) return;
  beast::error_code ignored;
  acceptor.close(ignored);
  signals.cancel(ignored);
  std::vector<std::shared_ptr<Session>> live;
  {
    std::lock_guard lock(shared->mutex);
    for (auto& [ptr, weak] : shared->sessions)
      if (auto s = weak.lock()) live.push_back(std::move(s));
  }
  for (auto& s : live) s->close_if_idle();
  live.clear();
  // In-flight requests get the grace period; then the loop stops regardless.
  grace_timer.expires_after(shared->options.drain_grace);
  grace_timer.async_wait([this](beast::error_code ec) {
    if (!ec) ioc.stop();
  });
  if (shared->open.load() == 0) finish();
}

void Server::Impl::finish() {
  net::post(acceptor.get_executor(), [this] {
    grace_timer.cancel();
    guard.reset();
  });
}

Server::Server(ServerOptions options, Dispatch dispatch, Refusal refusal)
    : impl_(std::make_unique<Impl>(std::move(options), std::move(dispatch), std::move(refusal))) {
  impl_->shared->on_all_closed = [impl = impl_.get()] { impl->finish(); };
}

Server::~Server() {
  impl_->shared->workers.join();
}

bool Server::listen(const std::string& host, std::uint16_t port, std::string* error) {
  beast::error_code ec;
  auto address = net::ip::make_address(host, ec);
  if (ec) {
    if (error) *error = "not an IP address: " + host;
    return false;
  }
  tcp::endpoint endpoint{address, port};
  auto& a = impl_->acceptor;
  a.open(endpoint.protocol(), ec);
  if (!ec) a.set_option(net::socket_base::reuse_address(true), ec);
  if (!ec) a.bind(endpoint, ec);
  if (!ec) a.listen(net::socket_base::max_listen_connections, ec);
  if (ec) {
    if (error) *error = host + ":" + std::to_string(port) + ": " + ec.message();
    return false;
  }
  return true;
}

std::uint16_t Server::port() const {
  beast::error_code ec;
  auto endpoint = impl_->acceptor.local_endpoint(ec);
  return ec ? 0 : endpoint.port();
}

void Server::run() {
  auto& impl = *impl_;
  impl.guard.emplace(impl.ioc.get_executor());
  if (impl.shared->options.stop_on_signals) {
    impl.signals.add(SIGTERM);
    impl.signals.add(SIGINT);
    impl.signals.async_wait([&impl](beast::error_code ec, int) {
      if (!ec) net::post(impl.acceptor.get_executor(), [&impl] { impl.begin_stop(); });
    });
  }
  net::dispatch(impl.acceptor.get_executor(), [&impl] { impl.accept(); });
  std::vector<std::thread> threads;
  for (std::size_t i = 1; i < impl.shared->options.io_threads; ++i)
    threads.emplace_back([&impl] {
      name_this_thread("http-io");
      impl.ioc.run();
    });
  impl.ioc.run();
  for (auto& t : threads) t.join();
}

void Server::stop() {
  net::post(impl_->acceptor.get_executor(), [impl = impl_.get()] { impl->begin_stop(); });
}

std::size_t Server::connections() const { return impl_->shared->open.load(); }

}  // namespace pbfleet::http
