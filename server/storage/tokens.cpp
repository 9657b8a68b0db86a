#include "server/storage/tokens.hpp"

#include <openssl/crypto.h>
#include <openssl/evp.h>
#include <openssl/rand.h>

#include <array>
#include <stdexcept>

namespace pbfleet::storage {

std::string new_raw_token() {
  std::array<unsigned char, kTokenBytes> bytes{};
  if (RAND_bytes(bytes.data(), static_cast<int>(bytes.size())) != 1) {
    throw std::runtime_error("the system random source failed; no token was made");
  }
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out;
  out.reserve(bytes.size() * 2);
  for (unsigned char b : bytes) {
    out += kHex[b >> 4];
    out += kHex[b & 0xf];
  }
  return out;
}

TokenHash hash_token(std::string_view raw) {
  TokenHash hash;
  unsigned int size = 0;
  if (EVP_Digest(raw.data(), raw.size(), hash.bytes.data(), &size, EVP_sha256(), nullptr) != 1 ||
      size != hash.bytes.size()) {
    throw std::runtime_error("SHA-256 failed");
  }
  return hash;
}

bool same_token_hash(const TokenHash& a, const TokenHash& b) {
  return CRYPTO_memcmp(a.bytes.data(), b.bytes.data(), a.bytes.size()) == 0;
}

}  // namespace pbfleet::storage
