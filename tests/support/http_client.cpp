#include "tests/support/http_client.hpp"

#include <netinet/in.h>
#include <poll.h>
#include <sys/socket.h>
#include <unistd.h>

#include <arpa/inet.h>
#include <cctype>
#include <cerrno>

#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core/flat_buffer.hpp>
#include <boost/beast/core/tcp_stream.hpp>
#include <boost/beast/http.hpp>
#include <optional>

namespace pbfleet::testing {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace bhttp = beast::http;

namespace {

// Big enough for any report or the 10 MB refusal tests' replies.
constexpr std::uint64_t kReplyBodyLimit = 64ULL * 1024 * 1024;

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

}  // namespace

std::string HttpReply::header(const std::string& name) const {
  auto it = headers.find(name);
  return it == headers.end() ? std::string{} : it->second;
}

nlohmann::json HttpReply::json() const {
  return nlohmann::json::parse(body, nullptr, /*allow_exceptions=*/false);
}

struct HttpClient::Impl {
  std::uint16_t port;
  std::chrono::milliseconds timeout;
  asio::io_context io;
  std::optional<beast::tcp_stream> stream;
  beast::flat_buffer buffer;
  std::string authorization;
  std::string source;  // local address to bind, empty = any

  // Runs one asynchronous step to completion (the stream's deadline bounds it).
  void run() {
    io.restart();
    io.run();
  }

  void connect() {
    if (stream) return;
    stream.emplace(io);
    buffer.clear();
    beast::error_code ec = asio::error::would_block;
    if (!source.empty()) {
      stream->socket().open(asio::ip::tcp::v4());
      stream->socket().bind({asio::ip::make_address(source), 0});
    }
    stream->expires_after(timeout);
    stream->async_connect(asio::ip::tcp::endpoint{asio::ip::make_address("127.0.0.1"), port},
                          [&ec](beast::error_code e) { ec = e; });
    run();
    if (ec) {
      stream.reset();
      throw TransportError("connect to port " + std::to_string(port) + ": " + ec.message());
    }
    stream->socket().set_option(asio::ip::tcp::no_delay(true));
  }

  void drop() {
    if (!stream) return;
    beast::error_code ignored;
    stream->socket().shutdown(asio::ip::tcp::socket::shutdown_both, ignored);
    stream->close();
    stream.reset();
  }
};

HttpClient::HttpClient(std::uint16_t port, std::chrono::milliseconds timeout)
    : impl_(std::make_unique<Impl>()) {
  impl_->port = port;
  impl_->timeout = timeout;
}

HttpClient::~HttpClient() {
  if (impl_) impl_->drop();
}
HttpClient::HttpClient(HttpClient&&) noexcept = default;
HttpClient& HttpClient::operator=(HttpClient&&) noexcept = default;

void HttpClient::set_token(std::string token) {
  impl_->authorization = token.empty() ? std::string{} : "Bearer " + token;
}

void HttpClient::set_source_address(std::string address) {
  impl_->source = std::move(address);
  impl_->drop();
}

void HttpClient::disconnect() { impl_->drop(); }

HttpReply HttpClient::send(std::string_view method, std::string_view target, std::string body,
                           std::string_view content_type, const Headers& extra) {
  Impl& im = *impl_;
  im.connect();
  bhttp::request<bhttp::string_body> req{bhttp::string_to_verb(method), target, 11};
  req.set(bhttp::field::host, "127.0.0.1:" + std::to_string(im.port));
  req.keep_alive(true);
  if (!im.authorization.empty()) req.set(bhttp::field::authorization, im.authorization);
  if (!body.empty() || method == "POST" || method == "PATCH")
    req.set(bhttp::field::content_type, content_type);
  for (const auto& [name, value] : extra) req.set(name, value);
  req.body() = std::move(body);
  req.prepare_payload();

  beast::error_code ec = asio::error::would_block;
  im.stream->expires_after(im.timeout);
  bhttp::async_write(*im.stream, req, [&ec](beast::error_code e, std::size_t) { ec = e; });
  im.run();
  // A server may answer early (413) and close while we still write: read anyway.
  const beast::error_code write_ec = ec;
  bhttp::response_parser<bhttp::string_body> parser;
  parser.body_limit(kReplyBodyLimit);
  ec = asio::error::would_block;
  im.stream->expires_after(im.timeout);
  bhttp::async_read(*im.stream, im.buffer, parser, [&ec](beast::error_code e, std::size_t) { ec = e; });
  im.run();
  if (ec) {
    im.drop();
    throw TransportError("request " + std::string(method) + " " + std::string(target) + ": " +
                         (write_ec ? "write " + write_ec.message() + ", " : std::string{}) +
                         "read " + ec.message());
  }
  auto res = parser.release();
  HttpReply reply;
  reply.status = static_cast<int>(res.result_int());
  // A header sent more than once (Set-Cookie) keeps every value, one per line.
  for (const auto& field : res) {
    auto& value = reply.headers[lower(field.name_string())];
    if (!value.empty()) value += '\n';
    value += std::string(field.value());
  }
  reply.body = std::move(res.body());
  if (!res.keep_alive()) im.drop();
  return reply;
}

RawConnection::RawConnection(std::uint16_t port) {
  fd_ = ::socket(AF_INET, SOCK_STREAM, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_port = htons(port);
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  if (fd_ < 0 || ::connect(fd_, reinterpret_cast<sockaddr*>(&addr), sizeof addr) != 0) {
    if (fd_ >= 0) ::close(fd_);
    throw TransportError("raw connect to port " + std::to_string(port) + " failed");
  }
}

RawConnection::~RawConnection() {
  if (fd_ >= 0) ::close(fd_);
}

bool RawConnection::write(std::string_view bytes) {
  while (!bytes.empty()) {
    const ssize_t n = ::send(fd_, bytes.data(), bytes.size(), MSG_NOSIGNAL);
    if (n < 0 && errno == EINTR) continue;
    if (n <= 0) return false;
    bytes.remove_prefix(static_cast<std::size_t>(n));
  }
  return true;
}

std::string RawConnection::read_until_close(std::chrono::milliseconds limit) {
  std::string out;
  const auto deadline = std::chrono::steady_clock::now() + limit;
  char buffer[4096];
  for (;;) {
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
        deadline - std::chrono::steady_clock::now());
    if (left.count() <= 0) return out;
    pollfd p{fd_, POLLIN, 0};
    if (::poll(&p, 1, static_cast<int>(left.count())) <= 0) return out;
    const ssize_t n = ::recv(fd_, buffer, sizeof buffer, 0);
    if (n <= 0) return out;
    out.append(buffer, static_cast<std::size_t>(n));
  }
}

bool RawConnection::closed_within(std::chrono::milliseconds limit) {
  const auto deadline = std::chrono::steady_clock::now() + limit;
  char buffer[4096];
  for (;;) {
    const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
        deadline - std::chrono::steady_clock::now());
    if (left.count() <= 0) return false;
    pollfd p{fd_, POLLIN, 0};
    if (::poll(&p, 1, static_cast<int>(left.count())) <= 0) return false;
    const ssize_t n = ::recv(fd_, buffer, sizeof buffer, 0);
    if (n <= 0) return true;  // orderly close or reset
  }
}

}  // namespace pbfleet::testing
