// One connection: read a head within the header timeout, the body within
// the body timeout and size limit, dispatch on a worker, write within the
// write timeout, repeat while keep-alive allows.
#include "server/http/session.hpp"

#include <array>
#include <cctype>

namespace pbfleet::http::detail {

namespace bhttp = beast::http;

namespace {

// How long a refused client may keep sending before the socket closes.
constexpr std::chrono::seconds kLingerTime{2};

std::string lower(beast::string_view text) {
  std::string out(text);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

Request to_request(bhttp::request<bhttp::string_body>&& in, const std::string& peer) {
  Request out;
  out.method = std::string(in.method_string());
  out.target = std::string(in.target());
  for (const auto& field : in) out.headers[lower(field.name_string())] = std::string(field.value());
  out.body = std::move(in.body());
  out.peer = peer;
  return out;
}

// Status line and headers of `in` on `out`.
template <class Message>
void set_head(Message& out, const Response& in, bool keep_alive) {
  out.result(static_cast<bhttp::status>(in.status));
  out.version(11);
  out.set(bhttp::field::content_type, in.content_type);
  // insert, not set: a response may carry a header twice (Set-Cookie).
  for (const auto& [name, value] : in.headers) out.insert(name, value);
  out.keep_alive(keep_alive);
}

// An answer whose body is shared (Response::shared_body): the message
// points into it, and holds it while it is written.
struct SharedAnswer {
  std::shared_ptr<const std::string> body;
  bhttp::response<bhttp::span_body<const char>> message;
};

}  // namespace

Session::Session(tcp::socket&& socket, std::shared_ptr<Shared> shared)
    : stream_(std::move(socket)), shared_(std::move(shared)) {
  beast::error_code ec;
  auto endpoint = stream_.socket().remote_endpoint(ec);
  if (!ec) peer_ = endpoint.address().to_string() + ":" + std::to_string(endpoint.port());
}

Session::~Session() {
  bool last = false;
  {
    std::lock_guard lock(shared_->mutex);
    shared_->sessions.erase(this);
    last = --shared_->open == 0;
  }
  if (last && shared_->draining && shared_->on_all_closed) shared_->on_all_closed();
}

void Session::start() {
  net::dispatch(stream_.get_executor(), [self = shared_from_this()] { self->read_header(); });
}

void Session::close_if_idle() {
  net::post(stream_.get_executor(), [self = shared_from_this()] {
    if (self->idle_) self->close();
  });
}

void Session::read_header() {
  if (shared_->draining || served_ >= shared_->options.limits.max_requests_per_connection) {
    close();
    return;
  }
  parser_.emplace();
  parser_->header_limit(static_cast<std::uint32_t>(shared_->options.limits.header_bytes));
  parser_->body_limit(shared_->options.limits.body_bytes);
  idle_ = true;
  // One deadline for the whole head: a client trickling bytes cannot extend it.
  stream_.expires_after(shared_->options.limits.header_timeout);
  bhttp::async_read_header(stream_, buffer_, *parser_,
                           [self = shared_from_this()](beast::error_code ec, std::size_t) {
                             self->on_header(ec);
                           });
}

void Session::on_header(beast::error_code ec) {
  idle_ = false;
  if (ec == bhttp::error::body_limit) return refuse(413, "request body exceeds the size limit");
  if (ec == bhttp::error::header_limit) return refuse(431, "request header exceeds the size limit");
  if (ec == bhttp::error::end_of_stream || ec) return close();
  stream_.expires_after(shared_->options.limits.body_timeout);
  bhttp::async_read(stream_, buffer_, *parser_,
                    [self = shared_from_this()](beast::error_code ec2, std::size_t) {
                      self->on_body(ec2);
                    });
}

void Session::on_body(beast::error_code ec) {
  if (ec == bhttp::error::body_limit) return refuse(413, "request body exceeds the size limit");
  if (ec) return close();
  stream_.expires_never();  // the handler may take its time; the client waits
  handle();
}

void Session::handle() {
  ++served_;
  const bool keep_alive = parser_->keep_alive();
  Request request = to_request(parser_->release(), peer_);
  auto self = shared_from_this();
  Reply reply = [self, keep_alive](Response response) {
    net::post(self->stream_.get_executor(), [self, keep_alive, r = std::move(response)]() mutable {
      self->write(std::move(r), keep_alive);
    });
  };
  net::post(shared_->workers, [self, request = std::move(request), reply]() mutable {
    try {
      self->shared_->dispatch(std::move(request), reply);
    } catch (const std::exception& e) {
      reply(self->shared_->refusal(500, "internal error"));
    }
  });
}

void Session::refuse(int status, std::string_view detail) {
  write(shared_->refusal(status, detail), false);
}

void Session::write(Response response, bool keep_alive) {
  keep_alive = keep_alive && !shared_->draining;
  stream_.expires_after(shared_->options.limits.write_timeout);
  // `owner` keeps `message` (and what it points into) alive until written.
  auto send = [&](auto owner, auto& message) {
    set_head(message, response, keep_alive);
    message.prepare_payload();
    bhttp::async_write(stream_, message,
                       [self = shared_from_this(), owner, keep_alive](beast::error_code ec,
                                                                      std::size_t) {
                         self->on_write(keep_alive, ec);
                       });
  };
  if (response.shared_body) {
    auto answer = std::make_shared<SharedAnswer>();
    answer->body = std::move(response.shared_body);
    answer->message.body() = {answer->body->data(), answer->body->size()};
    return send(answer, answer->message);
  }
  auto message = std::make_shared<bhttp::response<bhttp::string_body>>();
  message->body() = std::move(response.body);
  send(message, *message);
}

void Session::on_write(bool keep_alive, beast::error_code ec) {
  if (ec) return close();
  if (keep_alive) return read_header();
  // Lingering close: stop sending, then drain what the client still sends
  // for a moment, so it can read our answer before the socket resets.
  beast::error_code ignored;
  stream_.socket().shutdown(tcp::socket::shutdown_send, ignored);
  stream_.expires_after(kLingerTime);
  drain();
}

void Session::drain() {
  stream_.async_read_some(net::buffer(scratch_),
                          [self = shared_from_this()](beast::error_code ec, std::size_t) {
                            if (ec) return self->close();
                            self->drain();
                          });
}

void Session::close() {
  beast::error_code ignored;
  stream_.socket().shutdown(tcp::socket::shutdown_both, ignored);
  stream_.socket().close(ignored);
}

}  // namespace pbfleet::http::detail
