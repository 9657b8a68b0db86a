// Helpers shared by the fuzz targets: an invariant check that stops the run
// (libFuzzer and the corpus replay both treat abort as a finding) and checks
// that every error a parser returns is fit to show and to put in JSON.
#pragma once

#include <cstdio>
#include <cstdlib>
#include <string_view>

#include "models/result.hpp"
#include "models/wire/text.hpp"

#define FUZZ_CHECK(cond)                                                        \
  do {                                                                          \
    if (!(cond)) {                                                              \
      std::fprintf(stderr, "%s:%d: invariant failed: %s\n", __FILE__, __LINE__, #cond); \
      std::abort();                                                             \
    }                                                                           \
  } while (0)

namespace pbfleet::fuzz {

// Error texts end up in JSON problem responses: they must be valid UTF-8.
inline bool printable_utf8(std::string_view s) {
  return models::wire::text::utf8_length(s).has_value();
}

// A parse error names a field (unless `field_may_be_empty`), explains itself
// and states what is allowed, all in valid UTF-8.
inline void check_error(const models::Error& e, bool field_may_be_empty) {
  FUZZ_CHECK(field_may_be_empty || !e.field.empty());
  FUZZ_CHECK(!e.detail.empty());
  FUZZ_CHECK(!e.allowed.empty());
  FUZZ_CHECK(printable_utf8(e.field) && printable_utf8(e.detail) && printable_utf8(e.allowed));
}

inline void check_error(const models::FieldError& e, bool field_may_be_empty) {
  check_error(models::Error{e.field, e.detail, e.allowed}, field_may_be_empty);
}

}  // namespace pbfleet::fuzz
