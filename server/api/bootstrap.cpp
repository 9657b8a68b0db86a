#include "server/api/bootstrap.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <chrono>
#include <cstring>

#include "server/api/auth.hpp"
#include "server/storage/tokens.hpp"

namespace pbfleet::api {

namespace {

// Writes `text` to a new file readable by its owner only.
models::Result<bool> write_private_file(const std::filesystem::path& file, const std::string& text) {
  const int fd = ::open(file.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0600);
  if (fd < 0)
    return models::Error{"init-admin-token", file.string() + ": " + std::strerror(errno),
                         "a path that does not exist yet, in a writable folder"};
  const bool ok = ::write(fd, text.data(), text.size()) == static_cast<ssize_t>(text.size()) &&
                  ::fsync(fd) == 0;
  ::close(fd);
  if (!ok) return models::Error{"init-admin-token", "cannot write " + file.string(), ""};
  return true;
}

}  // namespace

models::Result<NewToken> mint_token(storage::Store& store, const std::string& name,
                                    storage::Role role, std::optional<storage::Id> depot_id,
                                    std::optional<std::chrono::days> lifetime) {
  if (lifetime && (lifetime->count() < kMinTokenLifetimeDays ||
                   lifetime->count() > kMaxTokenLifetimeDays)) {
    return models::Error{"expires-in", "out of range: " + std::to_string(lifetime->count()),
                         std::to_string(kMinTokenLifetimeDays) + " to " +
                             std::to_string(kMaxTokenLifetimeDays) + " days"};
  }
  std::string raw = storage::new_raw_token();
  const auto now = std::chrono::floor<std::chrono::seconds>(std::chrono::system_clock::now());
  std::optional<std::chrono::sys_seconds> expires_at;
  if (lifetime) expires_at = now + *lifetime;
  auto created = store.create_token(name, role, depot_id, storage::hash_token(raw), now, expires_at);
  if (!created) return models::Error{created.error().field, created.error().detail, ""};
  return NewToken{created.value(), std::move(raw)};
}

models::Result<bool> init_admin_token(storage::Store& store, const std::filesystem::path& file) {
  auto existing = store.list_tokens(storage::PageRequest{1, {}});
  if (!existing) return models::Error{"tokens", existing.error().detail, ""};
  if (!existing->items.empty()) return false;
  auto minted = mint_token(store, "bootstrap", storage::Role::admin, std::nullopt);
  if (!minted) return minted.error();
  auto written = write_private_file(file, minted->raw + "\n");
  if (!written) {
    // Do not leave an admin token nobody can read.
    const auto now = std::chrono::floor<std::chrono::seconds>(std::chrono::system_clock::now());
    (void)store.revoke_token(minted->token.id, now);
    return written.error();
  }
  return true;
}

}  // namespace pbfleet::api
