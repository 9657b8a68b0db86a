// The wall clock, injected so tests can fix "now".
#pragma once

#include <chrono>

namespace pbfleet::api {

struct Clock {
  virtual ~Clock() = default;
  [[nodiscard]] virtual std::chrono::sys_seconds now() const = 0;
};

struct SystemClock final : Clock {
  [[nodiscard]] std::chrono::sys_seconds now() const override {
    return std::chrono::floor<std::chrono::seconds>(std::chrono::system_clock::now());
  }
};

}  // namespace pbfleet::api
