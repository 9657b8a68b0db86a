#include "tests/support/web_session.hpp"

#include <cctype>
#include <sstream>

namespace pbfleet::testing {
namespace {

std::string trim(std::string s) {
  while (!s.empty() && s.front() == ' ') s.erase(0, 1);
  while (!s.empty() && s.back() == ' ') s.pop_back();
  return s;
}

std::string form_encode(const std::string& text) {
  static constexpr char kHex[] = "0123456789ABCDEF";
  std::string out;
  for (unsigned char c : text) {
    if (std::isalnum(c) || c == '-' || c == '_' || c == '.') {
      out += static_cast<char>(c);
    } else {
      out += '%';
      out += kHex[c >> 4];
      out += kHex[c & 15];
    }
  }
  return out;
}

}  // namespace

std::vector<SetCookie> set_cookies(const HttpReply& reply) {
  std::vector<SetCookie> out;
  std::istringstream lines(reply.header("set-cookie"));
  for (std::string line; std::getline(lines, line);) {
    SetCookie c;
    std::istringstream parts(line);
    bool first = true;
    for (std::string part; std::getline(parts, part, ';');) {
      part = trim(part);
      const auto eq = part.find('=');
      std::string name = part.substr(0, eq);
      std::string value = eq == std::string::npos ? "" : part.substr(eq + 1);
      if (first) {
        c.name = name;
        c.value = value;
        first = false;
      } else {
        for (auto& ch : name) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
        c.attributes[name] = value;
      }
    }
    out.push_back(std::move(c));
  }
  return out;
}

std::optional<std::string> input_value(const std::string& html, const std::string& name) {
  const std::string key = "name=\"" + name + "\"";
  auto at = html.find(key);
  if (at == std::string::npos) return std::nullopt;
  const auto tag_end = html.find('>', at);
  const auto v = html.find("value=\"", at);
  if (v == std::string::npos || v > tag_end) return std::nullopt;
  const auto end = html.find('"', v + 7);
  return html.substr(v + 7, end - v - 7);
}

WebSession::WebSession(std::uint16_t port) : client_(port) {}

Headers WebSession::with_cookies(Headers extra) const {
  std::string jar;
  for (const auto& [name, value] : cookies_) jar += (jar.empty() ? "" : "; ") + name + "=" + value;
  if (!jar.empty()) extra.emplace_back("Cookie", jar);
  return extra;
}

HttpReply WebSession::remember(HttpReply reply) {
  for (const auto& c : set_cookies(reply)) {
    const auto age = c.attributes.find("max-age");
    if (c.value.empty() || (age != c.attributes.end() && age->second == "0")) {
      cookies_.erase(c.name);
    } else {
      cookies_[c.name] = c.value;
    }
  }
  return reply;
}

HttpReply WebSession::get(const std::string& target, const Headers& extra) {
  return remember(client_.send("GET", target, {}, "text/plain", with_cookies(extra)));
}

HttpReply WebSession::post_form(const std::string& target, const std::map<std::string, std::string>& fields,
                                const Headers& extra) {
  std::string body;
  for (const auto& [k, v] : fields) body += (body.empty() ? "" : "&") + form_encode(k) + "=" + form_encode(v);
  return remember(client_.send("POST", target, body, "application/x-www-form-urlencoded", with_cookies(extra)));
}

HttpReply WebSession::sign_in(const std::string& token) {
  const auto form = get("/ui/sign-in");
  const auto nonce = input_value(form.body, "nonce").value_or("");
  return post_form("/ui/sign-in", {{"token", token}, {"nonce", nonce}, {"next", "/"}});
}

std::string WebSession::csrf_from(const std::string& page) {
  return input_value(get(page).body, "csrf").value_or("");
}

}  // namespace pbfleet::testing
