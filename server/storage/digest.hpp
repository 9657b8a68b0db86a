// SHA-256 of a byte string, for token hashes and reading fingerprints.
//
// OpenSSL 3's EVP_sha256() shortcut looks the algorithm up in the provider
// tables on every digest; fingerprinting a reading is short enough that the
// look-up was a quarter of its cost. This fetches the algorithm once per
// process and reuses it.
#pragma once

#include <array>
#include <string_view>

namespace pbfleet::storage {

using Sha256 = std::array<unsigned char, 32>;

// Throws std::runtime_error when OpenSSL fails (no SHA-256 provider).
Sha256 sha256(std::string_view bytes);

}  // namespace pbfleet::storage
