// `pbfleet connect`: store the server address and token in the config file
// (mode 0600) so later commands need no flags; `--show` says what is in
// force and where it comes from, never the token itself.
#include <ostream>

#include <fmt/format.h>

#include "cli/commands/prompt.hpp"
#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

struct ConnectFlags {
  bool token_stdin = false;
  bool show = false;
  bool check = false;
};

int show_settings(Context& ctx) {
  auto path = config::config_path(ctx.io());
  auto s = ctx.settings();
  if (!s) return ctx.fail(kExitFailure, describe(s.error()));
  ctx.out() << fmt::format("config file  {}\n", path ? path->string() : "(none: HOME is not set)");
  ctx.out() << fmt::format("server       {}  (from {})\n", s->server_url, s->server_from);
  ctx.out() << fmt::format("token        {}\n", s->token.empty() ? "not set" : "set (from " + s->token_from + ")");
  return kExitOk;
}

// The token to store: --token-file (global), else one line on stdin.
models::Result<std::optional<std::string>> new_token(const ConnectFlags& f, Context& ctx) {
  if (!ctx.global().token_file.empty()) {
    auto t = config::read_token_file(ctx.global().token_file);
    if (!t) return t.error();
    return std::optional<std::string>(*t);
  }
  if (!f.token_stdin) return std::optional<std::string>();
  auto line = ask(ctx, ctx.io().in_tty ? "Token: " : "", /*hidden=*/true);
  if (!line || line->empty()) return models::Error{"--token-stdin", "no token on stdin", "one line holding the token"};
  return std::optional<std::string>(*line);
}

int check_server(Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->get("/readyz");
  if (!reply.ok) return ctx.fail(reply);
  ctx.err() << "server is ready\n";
  return kExitOk;
}

int run_connect(const ConnectFlags& f, Context& ctx) {
  if (f.show) return show_settings(ctx);
  auto path = config::config_path(ctx.io());
  if (!path) return ctx.fail(kExitFailure, describe(path.error()));
  auto layer = config::load_config(*path);
  if (!layer) return ctx.fail(kExitFailure, describe(layer.error()));
  auto token = new_token(f, ctx);
  if (!token) return ctx.fail(kExitUsage, describe(token.error()));
  if (ctx.global().server.empty() && !token.value()) {
    if (f.check) return check_server(ctx);
    return ctx.fail(kExitUsage, "nothing to store: give --server, --token-file or --token-stdin");
  }
  if (!ctx.global().server.empty()) {
    auto url = client::parse_url(ctx.global().server);
    if (!url) return ctx.fail(kExitUsage, describe(url.error()));
    layer.value().server_url = ctx.global().server;
  }
  if (token.value()) layer.value().token = *token.value();
  auto saved = config::store_config(*path, *layer);
  if (!saved) return ctx.fail(kExitFailure, describe(saved.error()));
  ctx.err() << "saved to " << path->string() << " (readable by you only)\n";
  return f.check ? check_server(ctx) : kExitOk;
}

}  // namespace

void install_connect(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<ConnectFlags>();
  cmd.add_flag("--token-stdin", f->token_stdin, "Read the token from stdin (asked for, unechoed, on a terminal)");
  cmd.add_flag("--show", f->show, "Show the settings in force and where they come from (never the token)");
  cmd.add_flag("--check", f->check, "Ask the server whether it is ready");
  cmd.footer(example("pbfleet connect --server http://depot-pc:8470 --token-stdin < token.txt\n"
                     "pbfleet connect --show"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_connect(*f, ctx); });
}

}  // namespace pbfleet::cli
