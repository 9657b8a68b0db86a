#include "server/storage/domain.hpp"

#include <array>
#include <utility>

#include "server/storage/store.hpp"

namespace pbfleet::storage {
namespace {

template <class Enum, std::size_t N>
std::optional<Enum> find_name(const std::array<std::pair<Enum, std::string_view>, N>& names,
                              std::string_view text) {
  for (const auto& [value, name] : names) {
    if (name == text) return value;
  }
  return std::nullopt;
}

template <class Enum, std::size_t N>
std::string_view name_of(const std::array<std::pair<Enum, std::string_view>, N>& names,
                         Enum value) {
  for (const auto& [v, name] : names) {
    if (v == value) return name;
  }
  return "?";
}

constexpr std::array<std::pair<Engine, std::string_view>, 2> kEngines{
    {{Engine::gasoline, "gasoline"}, {Engine::diesel, "diesel"}}};
constexpr std::array<std::pair<BatteryStatus, std::string_view>, 2> kStatuses{
    {{BatteryStatus::in_service, "in_service"}, {BatteryStatus::retired, "retired"}}};
constexpr std::array<std::pair<Role, std::string_view>, 4> kRoles{{{Role::crew, "crew"},
                                                                   {Role::technician, "technician"},
                                                                   {Role::manager, "manager"},
                                                                   {Role::admin, "admin"}}};
constexpr std::array<std::pair<EventKind, std::string_view>, 2> kEventKinds{
    {{EventKind::fitted, "fitted"}, {EventKind::retired, "retired"}}};
constexpr std::array<std::pair<StoreErrc, std::string_view>, 7> kErrcs{
    {{StoreErrc::not_found, "not_found"},
     {StoreErrc::conflict, "conflict"},
     {StoreErrc::constraint, "constraint"},
     {StoreErrc::invalid, "invalid"},
     {StoreErrc::unavailable, "unavailable"},
     {StoreErrc::disk_full, "disk_full"},
     {StoreErrc::internal, "internal"}}};

}  // namespace

std::string_view to_string(Engine engine) { return name_of(kEngines, engine); }
std::string_view to_string(BatteryStatus status) { return name_of(kStatuses, status); }
std::string_view to_string(Role role) { return name_of(kRoles, role); }
std::string_view to_string(EventKind kind) { return name_of(kEventKinds, kind); }
std::string_view to_string(StoreErrc code) { return name_of(kErrcs, code); }
std::optional<Engine> parse_engine(std::string_view text) { return find_name(kEngines, text); }
std::optional<BatteryStatus> parse_battery_status(std::string_view text) {
  return find_name(kStatuses, text);
}
std::optional<Role> parse_role(std::string_view text) { return find_name(kRoles, text); }

}  // namespace pbfleet::storage
