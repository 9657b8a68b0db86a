// `pbfleet token add|list|revoke` (admin): access tokens for crews,
// technicians and managers. A new token is shown once; --save-to writes it
// to a file only its owner can read instead. --expires-in gives it a
// lifetime in days (the server refuses it from then on).
#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>

#include <optional>
#include <ostream>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

constexpr mode_t kSecretFileMode = 0600;
// The lifetimes the server accepts (expires_in_days in server/api/CONTRACT.md).
constexpr int kMinLifetimeDays = 1;
constexpr int kMaxLifetimeDays = 3650;

struct TokenAddFlags {
  std::string name;
  std::string role;
  std::optional<long> depot_id;
  std::optional<int> expires_in_days;
  std::string save_to;
};

// The file --save-to names, created (mode 0600, never over an existing
// file) before the server is asked for a token, so a path that cannot be
// written costs no token. Removed again unless a token was written to it.
class SecretFile {
 public:
  explicit SecretFile(std::string path)
      : path_(std::move(path)),
        fd_(::open(path_.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, kSecretFileMode)),
        error_(fd_ < 0 ? std::strerror(errno) : "") {}
  ~SecretFile() {
    if (fd_ < 0) return;
    ::close(fd_);
    if (!kept_) ::unlink(path_.c_str());
  }
  SecretFile(const SecretFile&) = delete;
  SecretFile& operator=(const SecretFile&) = delete;

  [[nodiscard]] bool is_open() const { return fd_ >= 0; }
  [[nodiscard]] const std::string& error() const { return error_; }
  // Writes the token and keeps the file; false when the write failed.
  bool keep(const std::string& token) {
    const auto line = token + "\n";
    const bool written = ::write(fd_, line.data(), line.size()) == static_cast<ssize_t>(line.size());
    const bool closed = ::close(fd_) == 0;
    fd_ = -1;
    kept_ = written && closed;
    if (!kept_) ::unlink(path_.c_str());
    return kept_;
  }

 private:
  std::string path_;
  int fd_;
  std::string error_;
  bool kept_ = false;
};

int run_add(const TokenAddFlags& f, Context& ctx) {
  std::optional<SecretFile> file;
  if (!f.save_to.empty()) {
    file.emplace(f.save_to);
    if (!file->is_open())
      return ctx.fail(kExitFailure, "--save-to " + f.save_to + ": " + file->error() +
                                        " (it must be a new file); no token was created");
  }
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  client::Json body{{"name", f.name}, {"role", f.role}, {"depot_id", nullptr}};
  if (f.depot_id) body["depot_id"] = *f.depot_id;
  if (f.expires_in_days) body["expires_in_days"] = *f.expires_in_days;
  auto reply = api->post("/v1/tokens", body);
  if (!reply.ok) return ctx.fail(reply);
  auto token = reply.json.value("token", std::string());
  auto id = reply.json.contains("id") ? reply.json["id"].dump() : "?";
  if (file) {
    if (!file->keep(token)) {
      return ctx.fail(kExitFailure, "token " + id + " was created but could not be written to " + f.save_to +
                                        "; revoke it with `pbfleet token revoke " + id + "`");
    }
    ctx.err() << "token " << id << " saved to " << f.save_to << " (readable by you only)\n";
    return kExitOk;
  }
  ctx.out() << token << '\n';
  ctx.err() << "token " << id << " for " << f.role;
  if (auto until = reply.json.find("expires_at"); until != reply.json.end() && until->is_string())
    ctx.err() << " (expires " << until->get<std::string>() << ")";
  ctx.err() << ": shown once, store it now\n";
  return kExitOk;
}

int run_list(const OutputFlags& output, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto list = fetch_all(*api, "/v1/tokens", {});
  if (list.failure) return ctx.fail(*list.failure);
  print_list(ctx, list.items, output.mode(), {"id", "name", "role", "depot_id", "created_at", "expires_at", "revoked_at"});
  return kExitOk;
}

int run_revoke(long id, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->remove("/v1/tokens/" + std::to_string(id));
  if (!reply.ok) return ctx.fail(reply);
  ctx.err() << "token " << id << " revoked\n";
  return kExitOk;
}

}  // namespace

void install_token(CLI::App& cmd, Context& ctx) {
  cmd.require_subcommand(1);
  cmd.footer(example("pbfleet token add \"Harbour crew\" --role crew --depot 2 --save-to harbour.token"));

  auto a = std::make_shared<TokenAddFlags>();
  auto* add = cmd.add_subcommand("add", "Create a token (shown once)");
  add->add_option("name", a->name, "Who or what the token is for")->required();
  add->add_option("--role", a->role, "crew, technician, manager or admin")
      ->required()->check(CLI::IsMember({"crew", "technician", "manager", "admin"}));
  add->add_option("--depot", a->depot_id, "Limit the token to one depot (id)")->type_name("ID");
  add->add_option("--expires-in", a->expires_in_days, "Days until the token stops working (default: until revoked)")
      ->type_name("DAYS")->check(CLI::Range(kMinLifetimeDays, kMaxLifetimeDays));
  add->add_option("--save-to", a->save_to, "Write the token to this new file (mode 0600) instead of stdout")
      ->type_name("FILE");
  add->footer(example("pbfleet token add \"Valley manager\" --role manager --expires-in 90"));
  add->callback([a, &ctx] { ctx.exit_code = run_add(*a, ctx); });

  auto l = std::make_shared<OutputFlags>();
  auto* list = cmd.add_subcommand("list", "List tokens (never their secrets)");
  add_output_flags(*list, *l, true);
  list->footer(example("pbfleet token list"));
  list->callback([l, &ctx] { ctx.exit_code = run_list(*l, ctx); });

  auto id = std::make_shared<long>(0);
  auto* revoke = cmd.add_subcommand("revoke", "Revoke a token at once");
  revoke->add_option("id", *id, "Token id (from `pbfleet token list`)")->required();
  revoke->footer(example("pbfleet token revoke 4"));
  revoke->callback([id, &ctx] { ctx.exit_code = run_revoke(*id, ctx); });
}

}  // namespace pbfleet::cli
