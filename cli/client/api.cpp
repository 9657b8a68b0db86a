#include "cli/client/api.hpp"

#include <cctype>

#include <fmt/format.h>

namespace pbfleet::cli::client {
namespace {

constexpr std::string_view kJsonType = "application/json";

bool is_success(int status) { return status >= 200 && status < 300; }

bool is_json(std::string_view content_type) {
  return content_type.find("json") != std::string_view::npos;
}

}  // namespace

Transport http_transport(Url url, std::chrono::seconds timeout) {
  return [url = std::move(url), timeout](const HttpRequest& request) { return send(url, request, timeout); };
}

Reply Api::exchange(HttpRequest request) const {
  request.bearer_token = token_;
  Reply reply;
  auto response = transport_(request);
  if (!response) {
    reply.transport_error = response.error().detail;
    return reply;
  }
  reply.status = response->status;
  reply.text = response->body;
  if (!is_success(reply.status)) {
    reply.problem = parse_problem(reply.status, reply.text);
    return reply;
  }
  reply.ok = true;
  if (is_json(response->content_type) && !reply.text.empty()) {
    reply.json = Json::parse(reply.text, nullptr, /*allow_exceptions=*/false);
    if (reply.json.is_discarded()) {
      reply.ok = false;
      reply.transport_error = "the server sent JSON that does not parse";
    }
  }
  return reply;
}

Reply Api::get(const std::string& target, std::string_view accept) const {
  HttpRequest r;
  r.target = target;
  r.accept = std::string(accept);
  return exchange(std::move(r));
}

Reply Api::post(const std::string& target, const Json& body, std::string_view prefer) const {
  HttpRequest r;
  r.method = "POST";
  r.target = target;
  r.body = body.dump();
  r.content_type = kJsonType;
  r.prefer = std::string(prefer);
  return exchange(std::move(r));
}

Reply Api::patch(const std::string& target, const Json& body) const {
  HttpRequest r;
  r.method = "PATCH";
  r.target = target;
  r.body = body.dump();
  r.content_type = kJsonType;
  return exchange(std::move(r));
}

Reply Api::remove(const std::string& target) const {
  HttpRequest r;
  r.method = "DELETE";
  r.target = target;
  return exchange(std::move(r));
}

std::string url_encode(std::string_view text) {
  std::string out;
  for (unsigned char c : text) {
    if (std::isalnum(c) || c == '-' || c == '_' || c == '.' || c == '~') {
      out += static_cast<char>(c);
    } else {
      out += fmt::format("%{:02X}", c);
    }
  }
  return out;
}

std::string with_query(std::string path, const std::vector<std::pair<std::string, std::string>>& query) {
  char sep = '?';
  for (const auto& [key, value] : query) {
    if (value.empty()) continue;
    path += sep + key + "=" + url_encode(value);
    sep = '&';
  }
  return path;
}

}  // namespace pbfleet::cli::client
