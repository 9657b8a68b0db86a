// A browser's side of the dashboard without a browser: one keep-alive
// client, a cookie jar filled from Set-Cookie, form posts, and sign-in the
// way the sign-in page does it (nonce cookie and field, then the token).
#pragma once

#include <map>
#include <optional>
#include <string>
#include <vector>

#include "tests/support/http_client.hpp"

namespace pbfleet::testing {

// One Set-Cookie value split into name, value and attributes (lower-case
// attribute names, e.g. "httponly", "samesite", "max-age").
struct SetCookie {
  std::string name, value;
  std::map<std::string, std::string> attributes;
};
std::vector<SetCookie> set_cookies(const HttpReply& reply);

// The value="..." of the input named `name` in an HTML page, or nullopt.
std::optional<std::string> input_value(const std::string& html, const std::string& name);

class WebSession {
 public:
  explicit WebSession(std::uint16_t port);

  HttpReply get(const std::string& target, const Headers& extra = {});
  // application/x-www-form-urlencoded POST of `fields`.
  HttpReply post_form(const std::string& target, const std::map<std::string, std::string>& fields,
                      const Headers& extra = {});
  // Signs in with `token`; the reply to the sign-in POST (303 on success).
  HttpReply sign_in(const std::string& token);
  // The CSRF field of a page this session fetched (GET `page` first).
  std::string csrf_from(const std::string& page);

  std::map<std::string, std::string>& cookies() { return cookies_; }

 private:
  HttpReply remember(HttpReply reply);
  Headers with_cookies(Headers extra) const;

  HttpClient client_;
  std::map<std::string, std::string> cookies_;
};

}  // namespace pbfleet::testing
