#include "server/storage/tokens.hpp"  // self-containment check: first include

#include <doctest/doctest.h>

#include <set>

namespace pbfleet::storage {
namespace {

std::string hex(const TokenHash& h) {
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out;
  for (unsigned char b : h.bytes) {
    out += kHex[b >> 4];
    out += kHex[b & 0xf];
  }
  return out;
}

}  // namespace

TEST_CASE("token hash is SHA-256 of the token text") {
  // FIPS 180-2, Appendix B.1: SHA-256("abc").
  CHECK(hex(hash_token("abc")) ==
        "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  // FIPS 180-2, Appendix B.2: the 448-bit two-block message.
  CHECK(hex(hash_token("abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq")) ==
        "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
}

TEST_CASE("new tokens carry 256 bits as 64 hex digits and do not repeat") {
  std::set<std::string> seen;
  for (int i = 0; i < 200; ++i) {
    const std::string token = new_raw_token();
    CHECK(token.size() == 64);
    CHECK(token.find_first_not_of("0123456789abcdef") == std::string::npos);
    seen.insert(token);
  }
  CHECK(seen.size() == 200);
}

TEST_CASE("hash comparison tells equal from different hashes") {
  const TokenHash a = hash_token("first");
  TokenHash b = a;
  CHECK(same_token_hash(a, b));
  b.bytes[31] ^= 1;
  CHECK_FALSE(same_token_hash(a, b));
  CHECK_FALSE(same_token_hash(a, hash_token("second")));
}

}  // namespace pbfleet::storage
