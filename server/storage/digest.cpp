#include "server/storage/digest.hpp"

#include <openssl/evp.h>

#include <stdexcept>

namespace pbfleet::storage {

namespace {

// Fetched on first use and kept for the life of the process.
const EVP_MD* sha256_algorithm() {
  static EVP_MD* const algorithm = EVP_MD_fetch(nullptr, "SHA256", nullptr);
  if (algorithm == nullptr) throw std::runtime_error("SHA-256 is not available from OpenSSL");
  return algorithm;
}

}  // namespace

Sha256 sha256(std::string_view bytes) {
  Sha256 out{};
  unsigned int size = 0;
  if (EVP_Digest(bytes.data(), bytes.size(), out.data(), &size, sha256_algorithm(), nullptr) != 1 ||
      size != out.size()) {
    throw std::runtime_error("SHA-256 failed");
  }
  return out;
}

}  // namespace pbfleet::storage
