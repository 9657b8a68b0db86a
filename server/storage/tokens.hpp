// API token material: generation, hashing and comparison.
//
// Tokens are 256 random bits (OpenSSL RAND_bytes) shown once as 64 hex
// digits; the store keeps only their SHA-256. Comparison is constant time
// (CRYPTO_memcmp) so response timing does not leak how much of a hash matched.
#pragma once

#include <string>
#include <string_view>

#include "server/storage/domain.hpp"

namespace pbfleet::storage {

inline constexpr std::size_t kTokenBytes = 32;  // 256 bits

// A fresh raw token: 64 lower-case hex digits. Throws std::runtime_error if
// the system random source fails (never returns a weak token).
std::string new_raw_token();
// The id given to a reading the client sent without one: "srv-" and 96
// random bits in hex. Throws std::runtime_error like new_raw_token.
std::string new_reading_id();
// SHA-256 of the raw token text.
TokenHash hash_token(std::string_view raw);
// Constant-time equality of two hashes.
bool same_token_hash(const TokenHash& a, const TokenHash& b);

}  // namespace pbfleet::storage
