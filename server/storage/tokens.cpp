#include "server/storage/tokens.hpp"

#include <openssl/crypto.h>
#include <openssl/rand.h>

#include <array>
#include <stdexcept>

#include "server/storage/digest.hpp"

namespace pbfleet::storage {

namespace {

// `count` random bytes from the system source as lower-case hex.
std::string random_hex(std::size_t count) {
  std::array<unsigned char, kTokenBytes> bytes{};
  if (count > bytes.size() || RAND_bytes(bytes.data(), static_cast<int>(count)) != 1) {
    throw std::runtime_error("the system random source failed; no token or id was made");
  }
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out;
  out.reserve(count * 2);
  for (std::size_t i = 0; i < count; ++i) {
    out += kHex[bytes[i] >> 4];
    out += kHex[bytes[i] & 0xf];
  }
  return out;
}

}  // namespace

std::string new_raw_token() { return random_hex(kTokenBytes); }

std::string new_reading_id() { return "srv-" + random_hex(12); }

TokenHash hash_token(std::string_view raw) { return TokenHash{sha256(raw)}; }

bool same_token_hash(const TokenHash& a, const TokenHash& b) {
  return CRYPTO_memcmp(a.bytes.data(), b.bytes.data(), a.bytes.size()) == 0;
}

}  // namespace pbfleet::storage
