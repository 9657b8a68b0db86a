// Errors as values at module boundaries.
//
// Result<T> holds either a value or an Error naming what was wrong, the
// allowed range and what was given. It is a small stand-in for
// std::expected (C++23), kept so the models also build with clang 14 for
// the fuzzing and sanitizer builds.
#pragma once

#include <cassert>
#include <string>
#include <utility>
#include <variant>
#include <vector>

namespace pbfleet::models {

// One thing wrong with one input field. `field` is the wire name
// (e.g. "cell_sg/3", "ocv_v"; convention in models/wire/reading.hpp),
// `detail` a sentence for a person, `allowed` the accepted range or form
// ("1.000 to 1.400").
struct FieldError {
  std::string field;
  std::string detail;
  std::string allowed;
};

using FieldErrors = std::vector<FieldError>;

// A failed computation: usually an input outside what a model covers.
struct Error {
  std::string field;    // which input, wire-style name; may be empty
  std::string detail;   // human sentence
  std::string allowed;  // accepted range, e.g. "1.050 to 1.330"
};

template <class T>
class Result {
 public:
  Result(T value) : v_(std::move(value)) {}            // NOLINT: implicit by design
  Result(Error error) : v_(std::move(error)) {}        // NOLINT: implicit by design

  [[nodiscard]] bool ok() const { return v_.index() == 0; }
  explicit operator bool() const { return ok(); }

  // REQUIRES: ok()
  const T& value() const& { assert(ok()); return std::get<0>(v_); }
  T& value() & { assert(ok()); return std::get<0>(v_); }
  T&& value() && { assert(ok()); return std::get<0>(std::move(v_)); }
  const T& operator*() const& { return value(); }
  const T* operator->() const { return &value(); }

  // REQUIRES: !ok()
  const Error& error() const { assert(!ok()); return std::get<1>(v_); }

  // The value, or `fallback` when this holds an error.
  T value_or(T fallback) const { return ok() ? std::get<0>(v_) : fallback; }

 private:
  std::variant<T, Error> v_;
};

}  // namespace pbfleet::models
