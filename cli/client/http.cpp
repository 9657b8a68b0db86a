#include "cli/client/http.hpp"

#include <boost/asio/connect.hpp>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <boost/beast/version.hpp>
#include <charconv>

namespace pbfleet::cli::client {
namespace {

namespace beast = boost::beast;
namespace http = beast::http;
namespace net = boost::asio;
using tcp = net::ip::tcp;
using models::Error;

constexpr std::string_view kScheme = "http://";
constexpr std::string_view kUserAgent = "pbfleet-cli/" PBFLEET_VERSION;

Error url_error(std::string_view text, std::string_view why) {
  return Error{"server", "cannot use server URL '" + std::string(text) + "': " + std::string(why),
               "http://HOST[:PORT][/PATH]"};
}

Error transport_error(const Url& url, std::string_view step, const beast::error_code& ec) {
  return Error{"server", "cannot " + std::string(step) + " " + url.host + ":" + url.port + ": " + ec.message(), ""};
}

bool valid_port(std::string_view port) {
  int value = 0;
  auto [end, ec] = std::from_chars(port.data(), port.data() + port.size(), value);
  return ec == std::errc{} && end == port.data() + port.size() && value > 0 && value < 65536;
}

}  // namespace

models::Result<Url> parse_url(std::string_view text) {
  if (text.substr(0, 8) == "https://") return url_error(text, "https is not supported yet; use http:// to a local TLS proxy");
  if (text.substr(0, kScheme.size()) != kScheme) return url_error(text, "it must start with http://");
  auto rest = text.substr(kScheme.size());
  auto slash = rest.find('/');
  auto authority = rest.substr(0, slash);
  Url url;
  url.base_path = slash == std::string_view::npos ? "" : std::string(rest.substr(slash));
  while (!url.base_path.empty() && url.base_path.back() == '/') url.base_path.pop_back();
  if (authority.find('@') != std::string_view::npos) return url_error(text, "user info is not allowed (use a token)");
  auto colon = authority.rfind(':');
  bool bracketed = authority.find(']') != std::string_view::npos;
  if (colon != std::string_view::npos && (!bracketed || colon > authority.find(']'))) {
    url.port = std::string(authority.substr(colon + 1));
    authority = authority.substr(0, colon);
  } else {
    url.port = "80";
  }
  if (authority.size() >= 2 && authority.front() == '[' && authority.back() == ']') {
    authority = authority.substr(1, authority.size() - 2);
  }
  url.host = std::string(authority);
  if (url.host.empty()) return url_error(text, "the host is empty");
  if (!valid_port(url.port)) return url_error(text, "the port must be 1 to 65535");
  return url;
}

models::Result<HttpResponse> send(const Url& url, const HttpRequest& request, std::chrono::seconds timeout) {
  net::io_context ioc;
  tcp::resolver resolver(ioc);
  beast::tcp_stream stream(ioc);
  beast::error_code ec;

  auto endpoints = resolver.resolve(url.host, url.port, ec);
  if (ec) return transport_error(url, "resolve", ec);
  stream.expires_after(timeout);
  stream.connect(endpoints, ec);
  if (ec) return transport_error(url, "connect to", ec);

  http::request<http::string_body> req{http::string_to_verb(request.method), url.base_path + request.target, 11};
  req.set(http::field::host, url.host);
  req.set(http::field::user_agent, kUserAgent);
  req.set(http::field::accept, request.accept);
  if (!request.bearer_token.empty()) req.set(http::field::authorization, "Bearer " + request.bearer_token);
  if (!request.prefer.empty()) req.set("Prefer", request.prefer);
  if (!request.content_type.empty()) {
    req.set(http::field::content_type, request.content_type);
    req.body() = request.body;
  }
  req.prepare_payload();

  stream.expires_after(timeout);
  http::write(stream, req, ec);
  if (ec) return transport_error(url, "send to", ec);

  beast::flat_buffer buffer;
  http::response_parser<http::string_body> parser;
  parser.body_limit(kMaxResponseBytes);
  stream.expires_after(timeout);
  http::read(stream, buffer, parser, ec);
  if (ec) return transport_error(url, "read the answer from", ec);

  stream.socket().shutdown(tcp::socket::shutdown_both, ec);  // the peer may have closed first
  const auto& res = parser.get();
  return HttpResponse{static_cast<int>(res.result_int()), std::string(res[http::field::content_type]),
                      res.body()};
}

}  // namespace pbfleet::cli::client
