// Client reading ids derived from a reading's content, so that importing
// the same file twice (or retrying after a dropped connection) replays the
// same ids and the server stores each reading once.
#pragma once

#include <string>
#include <string_view>

#include "models/wire/reading.hpp"

namespace pbfleet::cli::import {

// Length of the derived id: a 3-character prefix and 128 bits of SHA-256 in
// hex. 2^-64 collision odds at 2^32 readings (birthday bound), well within
// the server's 64-character limit (models/wire/reading.hpp kMaxIdLength).
inline constexpr std::size_t kDerivedIdHexChars = 32;
inline constexpr std::string_view kDerivedIdPrefix = "rd-";

// The canonical text of a reading that the id hashes: every field in a fixed
// order and format, independent of CSV column order, quoting or spacing.
// Ignores reading_id itself.
std::string canonical_text(const models::wire::ReadingInput& reading);

// SHA-256 (FIPS 180-4) of `bytes`, as 64 lower-case hex digits.
std::string sha256_hex(std::string_view bytes);

// "rd-" + the first 32 hex digits of SHA-256(canonical_text(reading)).
std::string derive_reading_id(const models::wire::ReadingInput& reading);

}  // namespace pbfleet::cli::import
