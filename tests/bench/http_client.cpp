#include "tests/bench/http_client.hpp"

#include <utility>

#include <boost/asio/connect.hpp>
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
  bhttp::response_parser<bhttp::string_body> parser;
  parser.body_limit(512 * 1024 * 1024);  // reports of a large fleet are big
  bhttp::read(impl_->socket, impl_->buffer, parser, ec);
  if (ec) throw std::runtime_error("read: " + ec.message());
  auto res = parser.release();
  return {static_cast<int>(res.result_int()), std::move(res.body()), std::string(res[bhttp::field::etag])};
}

}  // namespace pbfleet::bench
