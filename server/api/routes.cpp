// The whole API on one screen. Roles per route (the route x role matrix
// documented in CONTRACT.md and openapi.json):
//   crew        log readings, register batteries, read
//   technician  log readings, fit batteries, read
//   manager     read, reports, create/update depots, vehicles, batteries
//   admin       everything, including tokens, retiring and backups
#include "server/api/handlers/handlers.hpp"
#include "server/api/router.hpp"

namespace pbfleet::api {

namespace h = handlers;

namespace {

constexpr RoleSet kReaders = kAnyRole;
constexpr RoleSet kLoggers = kCrew | kTechnician | kAdmin;
constexpr RoleSet kRegistrars = kCrew | kManager | kAdmin;
constexpr RoleSet kFitters = kTechnician | kManager | kAdmin;
constexpr RoleSet kPlanners = kManager | kAdmin;
// Reports answer JSON, or CSV for Accept: text/csv.
constexpr std::string_view kJsonOrCsv = "application/json,text/csv";

constexpr Route kRoutes[] = {
    {"GET", "/healthz", kPublic, &h::healthz},
    {"GET", "/readyz", kPublic, &h::readyz},
    {"GET", "/metrics", kPublic, &h::metrics, nullptr, "text/plain"},
    {"GET", "/openapi.json", kPublic, &h::openapi},

    {"GET", "/v1/depots", kReaders, &h::list_depots},
    {"POST", "/v1/depots", kPlanners, &h::create_depot},
    {"GET", "/v1/depots/{id}", kReaders, &h::get_depot},
    {"PATCH", "/v1/depots/{id}", kPlanners, &h::patch_depot},

    {"GET", "/v1/vehicles", kReaders, &h::list_vehicles},
    {"POST", "/v1/vehicles", kPlanners, &h::create_vehicle},
    {"GET", "/v1/vehicles/{id}", kReaders, &h::get_vehicle},
    {"PATCH", "/v1/vehicles/{id}", kPlanners, &h::patch_vehicle},

    {"GET", "/v1/batteries", kReaders, &h::list_batteries},
    {"POST", "/v1/batteries", kRegistrars, &h::create_battery},
    {"GET", "/v1/batteries/{serial}", kReaders, &h::get_battery},
    {"PATCH", "/v1/batteries/{serial}", kPlanners, &h::patch_battery},
    {"POST", "/v1/batteries/{serial}/fit", kFitters, &h::fit_battery},
    {"POST", "/v1/batteries/{serial}/retire", kAdmin, &h::retire_battery},
    {"GET", "/v1/batteries/{serial}/history", kReaders, &h::battery_history},

    {"POST", "/v1/readings", kLoggers, nullptr, &h::post_readings},
    {"GET", "/v1/readings", kReaders, &h::list_readings},

    {"POST", "/v1/estimate", kReaders, &h::estimate},

    {"GET", "/v1/reports/winter", kPlanners, &h::winter_report, nullptr, kJsonOrCsv},
    {"GET", "/v1/reports/sulfation", kPlanners, &h::sulfation_report, nullptr, kJsonOrCsv},
    {"GET", "/v1/reports/replacements", kPlanners, &h::replacement_report, nullptr, kJsonOrCsv},
    {"GET", "/v1/reports/overdue", kReaders, &h::overdue_report, nullptr, kJsonOrCsv},

    {"GET", "/v1/tokens", kAdmin, &h::list_tokens},
    {"POST", "/v1/tokens", kAdmin, &h::create_token},
    {"DELETE", "/v1/tokens/{id}", kAdmin, &h::revoke_token},

    {"POST", "/v1/admin/backup", kAdmin, &h::backup},
    {"GET", "/v1/admin/durability", kAdmin, &h::durability},
};

}  // namespace

std::span<const Route> routes() { return kRoutes; }

}  // namespace pbfleet::api
