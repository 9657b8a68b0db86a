// /v1/admin (admin): online backup and the durability settings in force.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::api::handlers {

namespace {

// A backup file name: letters, digits, '.', '_', '-'; no path.
bool plain_file_name(const std::string& name) {
  if (name.empty() || name.size() > 100 || name.front() == '.') return false;
  for (char c : name) {
    const bool ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') ||
                    c == '.' || c == '_' || c == '-';
    if (!ok) return false;
  }
  return true;
}

std::string default_name(std::chrono::sys_seconds now) {
  std::string stamp = models::wire::format_timestamp(now);  // 2026-11-30T07:15:00Z
  std::erase(stamp, ':');
  std::erase(stamp, '-');
  return "pbfleet-" + stamp + ".db";
}

}  // namespace

http::Response backup(const Call& call) {
  std::string name;
  if (!call.request.body.empty()) {
    auto request = decode_object<std::string>(call, {}, [](FieldReader& in, std::string& n) {
      if (auto v = in.text("path", false, 100)) {
        n = *v;
        if (!plain_file_name(n))
          in.invalid("path", "must be a plain file name inside the backup folder",
                     "1 to 100 characters of A-Z a-z 0-9 . _ - (not starting with '.')");
      }
      in.finish();
    });
    if (auto* refused = std::get_if<http::Response>(&request)) return std::move(*refused);
    name = std::get<std::string>(request);
  }
  if (name.empty()) name = default_name(call.ctx.clock.now());
  if (call.ctx.options.backup_dir.empty())
    return problem(ProblemKind::storage_unavailable, "no backup folder configured");
  std::error_code ec;
  std::filesystem::create_directories(call.ctx.options.backup_dir, ec);
  auto report = call.ctx.store.backup_to(call.ctx.options.backup_dir / name);
  if (!report) return store_problem(report.error());
  return json_response(201, {{"path", report->path.string()},
                             {"bytes", report->bytes},
                             {"integrity", report->integrity}});
}

http::Response durability(const Call& call) {
  auto d = call.ctx.store.durability();
  if (!d) return store_problem(d.error());
  nlohmann::json body{{"backend", d->backend},
                      {"journal_mode", d->journal_mode},
                      {"synchronous", d->synchronous},
                      {"foreign_keys", d->foreign_keys},
                      {"busy_timeout_ms", d->busy_timeout_ms},
                      {"schema_version", d->schema_version}};
  // PostgreSQL: the commit setting every connection runs with, and the server's fsync.
  if (!d->synchronous_commit.empty()) body["synchronous_commit"] = d->synchronous_commit;
  if (d->fsync) body["fsync"] = *d->fsync;
  return json_response(200, body);
}

}  // namespace pbfleet::api::handlers
