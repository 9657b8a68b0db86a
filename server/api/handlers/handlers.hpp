// Every handler of the API, one file per resource. The route table
// (routes.cpp) maps methods and paths to these.
#pragma once

#include "server/api/context.hpp"

namespace pbfleet::api::handlers {

// health.cpp: no token needed
http::Response healthz(const Call& call);
http::Response readyz(const Call& call);
http::Response metrics(const Call& call);
http::Response openapi(const Call& call);

// depots.cpp
http::Response list_depots(const Call& call);
http::Response create_depot(const Call& call);
http::Response get_depot(const Call& call);
http::Response patch_depot(const Call& call);

// vehicles.cpp
http::Response list_vehicles(const Call& call);
http::Response create_vehicle(const Call& call);
http::Response get_vehicle(const Call& call);
http::Response patch_vehicle(const Call& call);

// batteries.cpp
http::Response list_batteries(const Call& call);
http::Response create_battery(const Call& call);
http::Response get_battery(const Call& call);
http::Response patch_battery(const Call& call);
http::Response fit_battery(const Call& call);
http::Response retire_battery(const Call& call);

// readings.cpp: answered after the group commit
void post_readings(const Call& call, http::Reply reply);
http::Response list_readings(const Call& call);

// history.cpp
http::Response battery_history(const Call& call);

// estimate.cpp
http::Response estimate(const Call& call);

// reports.cpp
http::Response winter_report(const Call& call);
http::Response sulfation_report(const Call& call);
http::Response replacement_report(const Call& call);
http::Response overdue_report(const Call& call);

// tokens.cpp
http::Response list_tokens(const Call& call);
http::Response create_token(const Call& call);
http::Response revoke_token(const Call& call);

// admin.cpp
http::Response backup(const Call& call);
http::Response durability(const Call& call);

}  // namespace pbfleet::api::handlers
