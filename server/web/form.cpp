#include "server/web/form.hpp"

#include "server/api/request_util.hpp"

namespace pbfleet::web {

std::map<std::string, std::string> parse_form(std::string_view body, bool* ok) {
  std::map<std::string, std::string> out;
  bool good = true;
  while (!body.empty()) {
    const auto amp = body.find('&');
    const std::string_view pair = body.substr(0, amp);
    body = amp == std::string_view::npos ? std::string_view{} : body.substr(amp + 1);
    if (pair.empty()) continue;
    const auto eq = pair.find('=');
    bool key_ok = true, value_ok = true;
    std::string key = api::percent_decode(pair.substr(0, eq), &key_ok, true);
    std::string value = eq == std::string_view::npos
                            ? std::string{}
                            : api::percent_decode(pair.substr(eq + 1), &value_ok, true);
    good = good && key_ok && value_ok;
    out[std::move(key)] = std::move(value);
  }
  if (ok) *ok = good;
  return out;
}

std::string cookie_value(std::string_view header, std::string_view name) {
  while (!header.empty()) {
    const auto semi = header.find(';');
    std::string_view item = header.substr(0, semi);
    header = semi == std::string_view::npos ? std::string_view{} : header.substr(semi + 1);
    while (!item.empty() && item.front() == ' ') item.remove_prefix(1);
    const auto eq = item.find('=');
    if (eq == std::string_view::npos) continue;
    if (item.substr(0, eq) == name) return std::string(item.substr(eq + 1));
  }
  return {};
}

}  // namespace pbfleet::web
