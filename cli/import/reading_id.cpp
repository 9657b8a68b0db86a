#include "cli/import/reading_id.hpp"

#include <openssl/sha.h>

#include <fmt/format.h>

namespace pbfleet::cli::import {
namespace {

using models::wire::EnteredTemperature;
using models::wire::TempUnit;

// Fixed precision well below any instrument's resolution (SG is read to
// 0.001, OCV to 0.01 V), so equal readings give equal text.
template <class T>
std::string number(const std::optional<T>& q) {
  return q ? fmt::format("{:.6f}", q->value) : "";
}

std::string temperature(const std::optional<EnteredTemperature>& t) {
  if (!t) return "";
  return fmt::format("{:.6f}{}", t->value.value, t->unit == TempUnit::f ? "F" : "C");
}

// "<length>:<text>\n": unambiguous whatever the text holds.
std::string text(const std::string& s) { return fmt::format("{}:{}\n", s.size(), s); }

}  // namespace

std::string canonical_text(const models::wire::ReadingInput& r) {
  std::string cells;
  for (const auto& sg : r.cell_sg) cells += fmt::format("{}{:.6f}", cells.empty() ? "" : ";", sg.value);
  // One line per field in a fixed order; free text carries its length
  // first, so a line break inside a note cannot make two readings collide.
  return fmt::format("pbfleet-reading-v1\n{}{}\n{}\n{}\n{}\n{}\n{}\n{}\n{}\n{:d}\n{:d}\n{}{}{}",
                     text(r.serial), r.taken_at.time_since_epoch().count(), number(r.ocv), cells,
                     temperature(r.electrolyte), temperature(r.ambient), number(r.rest),
                     number(r.load_test_current), number(r.load_test_end), r.after_charge, r.water_added,
                     text(r.logged_by), text(r.source), text(r.note));
}

std::string sha256_hex(std::string_view bytes) {
  unsigned char digest[SHA256_DIGEST_LENGTH];
  SHA256(reinterpret_cast<const unsigned char*>(bytes.data()), bytes.size(), digest);
  std::string hex;
  for (unsigned char byte : digest) hex += fmt::format("{:02x}", byte);
  return hex;
}

std::string derive_reading_id(const models::wire::ReadingInput& reading) {
  return std::string(kDerivedIdPrefix) + sha256_hex(canonical_text(reading)).substr(0, kDerivedIdHexChars);
}

}  // namespace pbfleet::cli::import
