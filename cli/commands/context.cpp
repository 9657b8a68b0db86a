#include "cli/commands/context.hpp"

#include <ostream>

namespace pbfleet::cli {
namespace {

constexpr int kStatusUnauthorized = 401;
constexpr int kStatusForbidden = 403;

format::ColorMode color_mode(const GlobalOptions& g) {
  return format::parse_color_mode(g.color).value_or(format::ColorMode::automatic);
}

}  // namespace

std::string describe(const models::Error& e) {
  std::string s = e.field.empty() ? e.detail : e.field + ": " + e.detail;
  if (!e.allowed.empty()) s += " (allowed: " + e.allowed + ")";
  return s;
}

format::Style Context::out_style() const {
  return {format::want_color(color_mode(global_), io_.out_tty, io_), format::want_unicode(global_.ascii, io_)};
}

format::Style Context::err_style() const {
  return {format::want_color(color_mode(global_), io_.err_tty, io_), format::want_unicode(global_.ascii, io_)};
}

std::chrono::sys_seconds Context::now() const {
  if (seams_.clock) return seams_.clock();
  return std::chrono::time_point_cast<std::chrono::seconds>(std::chrono::system_clock::now());
}

models::Result<config::Settings> Context::settings() const {
  config::Layer file;
  auto path = config::config_path(io_);
  if (path) {
    auto loaded = config::load_config(*path);
    if (!loaded) return loaded.error();
    file = *loaded;
  }
  config::Layer flags;
  if (!global_.server.empty()) flags.server_url = global_.server;
  if (!global_.token_file.empty()) {
    auto token = config::read_token_file(global_.token_file);
    if (!token) return token.error();
    flags.token = *token;
  }
  return config::resolve(file, config::environment_layer(io_), flags);
}

models::Result<client::Api> Context::api() const {
  auto s = settings();
  if (!s) return s.error();
  if (seams_.transport) return client::Api(*seams_.transport, s->token);
  auto url = client::parse_url(s->server_url);
  if (!url) return url.error();
  return client::Api(client::http_transport(*url), s->token);
}

int Context::fail(int code, std::string_view message) {
  err() << format::paint(err_style(), format::Tone::bad, "error:") << ' ' << message << '\n';
  return code;
}

void Context::warn(std::string_view message) {
  err() << format::paint(err_style(), format::Tone::warn, "warning:") << ' ' << message << '\n';
}

int Context::fail(const client::Reply& reply, int row_offset) {
  if (!reply.problem) {
    auto why = reply.transport_error.empty() ? std::string("no answer from the server") : reply.transport_error;
    return fail(kExitFailure, why);
  }
  err() << client::render_problem(*reply.problem, row_offset);
  if (reply.problem->status == kStatusUnauthorized) {
    err() << "hint: check the token (PBFLEET_TOKEN, --token-file, or `pbfleet connect`)\n";
  } else if (reply.problem->status == kStatusForbidden) {
    err() << "hint: this token's role may not do that; ask an admin\n";
  }
  return client::is_data_rejection(*reply.problem) ? kExitRejected : kExitFailure;
}

}  // namespace pbfleet::cli
