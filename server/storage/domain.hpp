// Domain types the store speaks: what the fleet's system of record holds.
//
// Plain values, no SQL and no JSON. Raw readings only: derived values
// (corrected SG, state of charge, flags) are computed by models/ from these
// and never stored as if entered by hand.
#pragma once

#include <array>
#include <chrono>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "models/battery.hpp"
#include "models/units.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::storage {

// The number inside an optional quantity (Volts, Hours, ...), for a column.
template <class Q>
std::optional<double> raw(const std::optional<Q>& q) {
  return q ? std::optional<double>(q->value) : std::nullopt;
}

// Row identity assigned by the store; never reused.
using Id = std::int64_t;

enum class Engine { gasoline, diesel };
enum class BatteryStatus { in_service, retired };
// Token roles, least to most powerful (see server/api/CONTRACT.md).
enum class Role { crew, technician, manager, admin };
// What happened to a battery besides its readings.
enum class EventKind { fitted, retired };

// Lower-case wire names and their parsers (nullopt for anything else).
std::string_view to_string(Engine engine);
std::string_view to_string(BatteryStatus status);
std::string_view to_string(Role role);
std::string_view to_string(EventKind kind);
std::optional<Engine> parse_engine(std::string_view text);
std::optional<BatteryStatus> parse_battery_status(std::string_view text);
std::optional<Role> parse_role(std::string_view text);

struct Depot {
  Id id = 0;
  std::string name;                   // unique, e.g. "North Yard"
  std::string time_zone;              // IANA name, e.g. "Europe/Oslo"; for display only
  models::Celsius design_low_c{0.0};  // design winter low the depot plans for
};

struct Vehicle {
  Id id = 0;
  std::string code;  // unique fleet code, e.g. "TR-104"
  Id depot_id = 0;
  Engine engine = Engine::diesel;
  std::optional<double> displacement_l;           // litres
  std::optional<models::Amperes> required_cca_a;  // cranking current the engine needs
};

struct Battery {
  Id id = 0;
  std::string serial;  // unique
  models::Chemistry chemistry = models::Chemistry::flooded;
  models::Volts nominal_v{12.0};
  int cells = 6;
  models::Amperes rated_cca_a{0.0};                       // SAE J537 rating
  std::optional<double> reserve_capacity_min;             // minutes at 25 A
  std::optional<double> capacity_ah;                      // 20 h rate
  std::optional<models::SpecificGravity> full_charge_sg;  // corrected, the maker's value
  std::chrono::sys_days installed_on{};
  std::optional<Id> vehicle_id;  // fitted to
  BatteryStatus status = BatteryStatus::in_service;
  std::optional<std::chrono::sys_seconds> retired_at;
  std::string retire_reason;
  // Read-only: the depot of the vehicle it is fitted to (filled by the
  // store, ignored on create and update). Used for depot-scoped tokens.
  std::optional<Id> depot_id;
};

// A reading as stored: the crew's raw input plus what the store assigned.
// `reading_id` is never empty here (the store assigns one when the client
// gave none); `serial` is the battery's serial.
struct StoredReading : models::wire::ReadingInput {
  Id id = 0;
  Id battery_id = 0;
  std::chrono::sys_seconds received_at{};  // when the store committed it (UTC)
};

// The measured part of a stored reading: what the analytics read. Fleet
// reports load only this (no ids, no texts), so millions of readings cost
// no string allocations. Temperature in Celsius whatever unit was entered.
struct ReadingMeasurement {
  std::chrono::sys_seconds taken_at{};  // UTC
  std::optional<models::Volts> ocv;
  std::vector<models::SpecificGravity> cell_sg;  // raw hydrometer, cell 1 first
  std::optional<models::Celsius> electrolyte;
  std::optional<models::Hours> rest;
  std::optional<models::Amperes> load_test_current;
  std::optional<models::Volts> load_test_end;
  bool after_charge = false;
  bool water_added = false;
};

// A battery event for its history (readings are listed separately).
struct BatteryEvent {
  Id id = 0;
  Id battery_id = 0;
  std::chrono::sys_seconds at{};
  EventKind kind = EventKind::fitted;
  std::optional<Id> vehicle_id;  // fitted: the vehicle; retired: the last one
  std::string detail;            // retire reason, or empty
};

// SHA-256 of a raw API token. The store never sees the raw token.
struct TokenHash {
  std::array<unsigned char, 32> bytes{};
  bool operator==(const TokenHash&) const = default;
};

struct ApiToken {
  Id id = 0;
  std::string name;
  Role role = Role::crew;
  std::optional<Id> depot_id;  // scope: only this depot's objects; nullopt = all
  std::chrono::sys_seconds created_at{};
  std::optional<std::chrono::sys_seconds> revoked_at;
  // Refused from this instant on; nullopt = valid until revoked.
  std::optional<std::chrono::sys_seconds> expires_at;
  TokenHash hash;  // filled on read; compare with tokens.hpp same_token_hash
};

// A dashboard sign-in session. The store keeps only the SHA-256 of the
// cookie value; `token` is the API token it was opened with, as stored now
// (revoked_at and expires_at end the session too).
struct WebSession {
  Id id = 0;
  std::string csrf;  // per-session CSRF secret (hex), put into every form
  std::chrono::sys_seconds created_at{};
  std::chrono::sys_seconds expires_at{};
  ApiToken token;
};

// True when the token has an expiry and `now` has reached it.
[[nodiscard]] inline bool expired(const ApiToken& token, std::chrono::sys_seconds now) {
  return token.expires_at && now >= *token.expires_at;
}

}  // namespace pbfleet::storage
