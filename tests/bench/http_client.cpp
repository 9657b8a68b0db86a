#include "tests/bench/http_client.hpp"

#include <algorithm>
#include <limits>
#include <utility>

#include <boost/asio/connect.hpp>
#include <boost/asio/read.hpp>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core/flat_buffer.hpp>
#include <boost/beast/http.hpp>
#include <stdexcept>

namespace pbfleet::bench {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace bhttp = beast::http;

struct HttpClient::Impl {
  asio::io_context io;
  asio::ip::tcp::socket socket{io};
  beast::flat_buffer buffer;
  std::string host;
  std::string authorization;
};

HttpClient::HttpClient(const std::string& host, std::uint16_t port) : impl_(std::make_unique<Impl>()) {
  impl_->host = host + ":" + std::to_string(port);
  boost::system::error_code ec;
  impl_->socket.connect({asio::ip::make_address(host), port}, ec);
  if (ec) throw std::runtime_error("connect to " + impl_->host + ": " + ec.message());
  impl_->socket.set_option(asio::ip::tcp::no_delay(true));
}

HttpClient::~HttpClient() {
  boost::system::error_code ignored;
  impl_->socket.shutdown(asio::ip::tcp::socket::shutdown_both, ignored);
}

void HttpClient::set_token(std::string token) {
  impl_->authorization = token.empty() ? std::string{} : "Bearer " + token;
}

HttpReply HttpClient::send(std::string_view method, std::string_view target, std::string body,
                           std::string_view content_type) {
  bhttp::request<bhttp::string_body> req{bhttp::string_to_verb(method), target, 11};
  req.set(bhttp::field::host, impl_->host);
  req.keep_alive(true);
  if (!impl_->authorization.empty()) req.set(bhttp::field::authorization, impl_->authorization);
  if (!body.empty()) req.set(bhttp::field::content_type, content_type);
  if (!if_none_match_.empty()) req.set(bhttp::field::if_none_match, std::exchange(if_none_match_, {}));
  req.body() = std::move(body);
  req.prepare_payload();

  boost::system::error_code ec;
  bhttp::write(impl_->socket, req, ec);
  if (ec) throw std::runtime_error("write: " + ec.message());
  // The head through Beast; the body (pbfleetd always sends a
  // Content-Length) straight into one string of its size, so the client
  // costs little beside a server answer of many megabytes.
  bhttp::response_parser<bhttp::empty_body> parser;
  parser.body_limit(std::numeric_limits<std::uint64_t>::max());  // the body is read below
  bhttp::read_header(impl_->socket, impl_->buffer, parser, ec);
  if (ec) throw std::runtime_error("read: " + ec.message());
  const auto& head = parser.get();
  HttpReply reply{static_cast<int>(head.result_int()), {}, std::string(head[bhttp::field::etag])};
  if (parser.is_done()) return reply;  // no body (304, or Content-Length: 0)
  const auto length = parser.content_length();
  if (!length) throw std::runtime_error("read: an answer without Content-Length");
  reply.body.resize(static_cast<std::size_t>(*length));
  const std::size_t buffered = std::min(impl_->buffer.size(), reply.body.size());
  asio::buffer_copy(asio::buffer(reply.body.data(), buffered), impl_->buffer.data());
  impl_->buffer.consume(buffered);
  asio::read(impl_->socket, asio::buffer(reply.body.data() + buffered, reply.body.size() - buffered), ec);
  if (ec) throw std::runtime_error("read body: " + ec.message());
  return reply;
}

}  // namespace pbfleet::bench
