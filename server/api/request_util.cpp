#include "server/api/request_util.hpp"

#include <algorithm>
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

http::Response json_text_response(int status, std::string body) {
  http::Response r;
  r.status = status;
  r.content_type = "application/json";
  r.body = std::move(body);
  return r;
}

namespace {

std::string_view trimmed(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// Calls `each(item)` for every comma-separated, trimmed, non-empty item.
template <class F>
void for_each_item(std::string_view list, F&& each) {
  while (!list.empty()) {
    const auto comma = list.find(',');
    const auto item = trimmed(list.substr(0, comma));
    if (!item.empty()) each(item);
    if (comma == std::string_view::npos) break;
    list.remove_prefix(comma + 1);
  }
}

// True when a media range ("text/*;q=0.5") has q=0.
bool refused_by_quality(std::string_view range) {
  for (auto semi = range.find(';'); semi != std::string_view::npos; semi = range.find(';')) {
    range.remove_prefix(semi + 1);
    const auto param = trimmed(range.substr(0, range.find(';')));
    if (param.size() >= 2 && (param[0] == 'q' || param[0] == 'Q') && param[1] == '=') {
      const auto value = param.substr(2);
      return !value.empty() && value.find_first_not_of("0.") == std::string_view::npos;
    }
  }
  return false;
}

bool range_matches(std::string_view range, std::string_view type) {
  const std::string wanted = media_type(range);
  if (wanted == "*/*" || wanted == type) return true;
  return wanted.size() > 2 && wanted.ends_with("/*") &&
         type.starts_with(std::string_view(wanted).substr(0, wanted.size() - 1));
}

}  // namespace

bool accepts(std::string_view accept, std::string_view produced) {
  if (trimmed(accept).empty()) return true;
  bool ok = false;
  for_each_item(accept, [&](std::string_view range) {
    if (ok || refused_by_quality(range)) return;
    for_each_item(produced, [&](std::string_view type) { ok = ok || range_matches(range, type); });
  });
  return ok;
}

bool wants_csv(const http::Request& request) {
  return request.header("accept").find("text/csv") != std::string_view::npos;
}

bool prefers(std::string_view prefer, std::string_view preference) {
  const auto eq = preference.find('=');
  const std::string_view want_name = preference.substr(0, eq);
  const std::string_view want_value =
      eq == std::string_view::npos ? std::string_view{} : preference.substr(eq + 1);
  const auto same_name = [](std::string_view a, std::string_view b) {
    return a.size() == b.size() &&
           std::equal(a.begin(), a.end(), b.begin(), [](char x, char y) {
             return std::tolower(static_cast<unsigned char>(x)) ==
                    std::tolower(static_cast<unsigned char>(y));
           });
  };
  while (!prefer.empty()) {
    const auto comma = prefer.find(',');
    std::string_view item = prefer.substr(0, comma);
    prefer = comma == std::string_view::npos ? std::string_view{} : prefer.substr(comma + 1);
    item = trimmed(item.substr(0, item.find(';')));
    const auto item_eq = item.find('=');
    const std::string_view name = trimmed(item.substr(0, item_eq));
    std::string_view value =
        item_eq == std::string_view::npos ? std::string_view{} : trimmed(item.substr(item_eq + 1));
    if (value.size() >= 2 && value.front() == '"' && value.back() == '"')
      value = value.substr(1, value.size() - 2);
    if (same_name(name, want_name) && value == want_value) return true;
  }
  return false;
}

}  // namespace pbfleet::api
