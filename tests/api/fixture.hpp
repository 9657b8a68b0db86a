// In-process API fixture: a real SQLite store in a temporary folder, a
// fixed clock, the Api dispatching requests directly (no sockets), one
// token per role, and a small fleet of the demo company:
// depot "North Yard" (-25 C) with vehicle TR-104 (diesel 7.7 l) and the
// 12 V flooded batteries NY-0001 and NY-0002 fitted to it; depot "Harbour"
// with vehicle TR-201 and battery HB-0001.
#pragma once

#include <chrono>
#include <filesystem>
#include <map>
#include <memory>
#include <string>

#include <nlohmann/json.hpp>

#include "server/api/api.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api::testing {

struct FixedClock final : Clock {
  std::chrono::sys_seconds at;
  [[nodiscard]] std::chrono::sys_seconds now() const override { return at; }
};

// 2026-01-10T12:00:00Z: "now" in every API test.
std::chrono::sys_seconds test_now();

class ApiFixture {
 public:
  ApiFixture();
  ~ApiFixture();

  // One request through Api::handle. `who` names a token ("admin", "crew",
  // "technician", "manager", "crew_harbour", "manager_harbour") or is empty for none.
  http::Response call(const std::string& method, const std::string& target,
                      const std::string& who = "admin", const std::string& body = {},
                      const std::string& content_type = "application/json");
  http::Response post(const std::string& target, const nlohmann::json& body,
                      const std::string& who = "admin") {
    return call("POST", target, who, body.dump());
  }
  http::Response get(const std::string& target, const std::string& who = "admin") {
    return call("GET", target, who);
  }

  storage::Store& store() { return *store_; }
  // The fixed clock the Api reads; tests move it to let time pass.
  FixedClock& clock() { return clock_; }
  Api& api() { return *api_; }
  const std::string& token(const std::string& who) const { return tokens_.at(who); }
  storage::Id token_id(const std::string& who) const { return token_ids_.at(who); }
  storage::Id depot_id(const std::string& name) const { return depots_.at(name); }
  storage::Id vehicle_id(const std::string& code) const { return vehicles_.at(code); }

 private:
  void seed();

  std::filesystem::path dir_;
  FixedClock clock_;
  std::unique_ptr<storage::Store> store_;
  std::unique_ptr<Api> api_;
  std::map<std::string, std::string> tokens_;
  std::map<std::string, storage::Id> token_ids_;
  std::map<std::string, storage::Id> depots_;
  std::map<std::string, storage::Id> vehicles_;
};

// The body as JSON (null when it does not parse).
nlohmann::json body_of(const http::Response& response);
// A valid reading of a 6-cell battery taken `minutes_ago` before test_now().
nlohmann::json good_reading(const std::string& serial, const std::string& reading_id,
                            int minutes_ago = 60);
// The `type` slug of a problem response ("" when not a problem).
std::string slug_of(const http::Response& response);
// The `field` values of a problem's errors[].
std::vector<std::string> error_fields(const http::Response& response);

}  // namespace pbfleet::api::testing
