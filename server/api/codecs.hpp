// JSON codecs for the fleet's objects (depots, vehicles, batteries, events,
// tokens, pages) and the mapping of store errors to problems.
//
// Decoders apply the fields present onto `into`, so one function serves
// create (required fields enforced) and PATCH (only what was sent).
#pragma once

#include <nlohmann/json.hpp>

#include "server/api/json_fields.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

nlohmann::json to_json(const storage::Depot& depot);
nlohmann::json to_json(const storage::Vehicle& vehicle);
nlohmann::json to_json(const storage::Battery& battery);
nlohmann::json to_json(const storage::BatteryEvent& event);
nlohmann::json to_json(const storage::ApiToken& token);  // never the hash

template <class T>
nlohmann::json page_json(const storage::Page<T>& page) {
  nlohmann::json items = nlohmann::json::array();
  for (const auto& item : page.items) items.push_back(to_json(item));
  return {{"items", std::move(items)},
          {"next_cursor", page.next_cursor.empty() ? nlohmann::json(nullptr)
                                                   : nlohmann::json(page.next_cursor)}};
}

// `creating` enforces required fields; otherwise only sent fields change.
void read_depot(FieldReader& in, storage::Depot& into, bool creating);
void read_vehicle(FieldReader& in, storage::Vehicle& into, bool creating);
void read_battery(FieldReader& in, storage::Battery& into, bool creating);

// The problem for a store error (404, 409, 422, 400, 503, 507, 500).
http::Response store_problem(const storage::StoreError& error);

// Page request from ?limit=&cursor=; a problem in `issues` when malformed.
storage::PageRequest page_request(const std::string* limit, const std::string* cursor,
                                  Issues& issues);

}  // namespace pbfleet::api
