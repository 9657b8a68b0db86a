#include "server/api/request_util.hpp"

#include <cctype>

#include <nlohmann/json.hpp>

#include "server/api/problem.hpp"

namespace pbfleet::api {

namespace {

int hex_value(char c) {
  if (c >= '0' && c <= '9') return c - '0';
  if (c >= 'a' && c <= 'f') return c - 'a' + 10;
  if (c >= 'A' && c <= 'F') return c - 'A' + 10;
  return -1;
}

}  // namespace

std::string percent_decode(std::string_view text, bool* ok, bool plus_is_space) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size(); ++i) {
    if (text[i] == '+' && plus_is_space) {
      out += ' ';
    } else if (text[i] == '%') {
      const int hi = i + 1 < text.size() ? hex_value(text[i + 1]) : -1;
      const int lo = i + 2 < text.size() ? hex_value(text[i + 2]) : -1;
      if (hi < 0 || lo < 0) {
        if (ok) *ok = false;
        return out;
      }
      out += static_cast<char>(hi * 16 + lo);
      i += 2;
    } else {
      out += text[i];
    }
  }
  return out;
}

Target parse_target(std::string_view target) {
  Target out;
  auto q = target.find('?');
  bool ok = true;
  out.path = percent_decode(target.substr(0, q), &ok, false);
  if (q != std::string_view::npos) {
    std::string_view rest = target.substr(q + 1);
    while (!rest.empty()) {
      auto amp = rest.find('&');
      std::string_view pair = rest.substr(0, amp);
      rest = amp == std::string_view::npos ? std::string_view{} : rest.substr(amp + 1);
      if (pair.empty()) continue;
      auto eq = pair.find('=');
      std::string key = percent_decode(pair.substr(0, eq), &ok, true);
      std::string value =
          eq == std::string_view::npos ? std::string{} : percent_decode(pair.substr(eq + 1), &ok, true);
      out.query[key] = value;
    }
  }
  out.malformed = !ok;
  return out;
}

std::string media_type(std::string_view content_type) {
  std::string out(content_type.substr(0, content_type.find(';')));
  while (!out.empty() && out.back() == ' ') out.pop_back();
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

std::variant<nlohmann::json, http::Response> json_body(const http::Request& request) {
  const std::string type = media_type(request.header("content-type"));
  if (type != "application/json")
    return problem(ProblemKind::unsupported_media_type,
                   "send the body as application/json (got '" + type + "')");
  auto parsed = nlohmann::json::parse(request.body, nullptr, /*allow_exceptions=*/false);
  if (parsed.is_discarded())
    return problem(ProblemKind::malformed_body, "the body is not valid JSON");
  return parsed;
}

std::string dump(const nlohmann::json& body) {
  return body.dump(-1, ' ', false, nlohmann::json::error_handler_t::replace);
}

http::Response json_response(int status, const nlohmann::json& body) {
  http::Response r;
  r.status = status;
  r.content_type = "application/json";
  r.body = dump(body);
  return r;
}

bool wants_csv(const http::Request& request) {
  return request.header("accept").find("text/csv") != std::string_view::npos;
}

}  // namespace pbfleet::api
