// Token commands run on the server host, outside HTTP: creating the first
// admin token and writing it to a private file.
//
// Bootstrap, safest first:
//  - `pbfleetd token create --role admin --data DIR` prints a new token on
//    the last line of stdout (for an operator at the host);
//  - `pbfleetd --init-admin-token FILE ...` at start: when the database has
//    no token yet, creates an admin token named "bootstrap" and writes it to
//    FILE, created with mode 0600 and refused if FILE exists. Nothing
//    happens once any token exists, so a restart never mints another.
// A raw token never goes to the log, the environment or the command line.
#pragma once

#include <chrono>
#include <filesystem>
#include <optional>
#include <string>

#include "models/result.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

struct NewToken {
  storage::ApiToken token;
  std::string raw;  // shown once
};

// Creates a token and returns it with its raw text. `lifetime` (nullopt:
// until revoked) must be kMinTokenLifetimeDays..kMaxTokenLifetimeDays
// (auth.hpp); otherwise an error naming expires-in and the range.
models::Result<NewToken> mint_token(storage::Store& store, const std::string& name,
                                    storage::Role role, std::optional<storage::Id> depot_id,
                                    std::optional<std::chrono::days> lifetime = std::nullopt);

// When the store holds no token: mints an admin token and writes it (plus a
// newline) to `file` with mode 0600. Returns true when written, false when
// tokens already existed. Error when the file exists or cannot be written.
models::Result<bool> init_admin_token(storage::Store& store, const std::filesystem::path& file);

}  // namespace pbfleet::api
