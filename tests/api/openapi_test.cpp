// The OpenAPI document is served, documents every route with its roles,
// and the main routes' responses fit its schemas (required fields, types,
// status codes).
#include "server/api/openapi.hpp"

#include <doctest/doctest.h>

#include <set>

#include "server/api/router.hpp"
#include "tests/api/fixture.hpp"

namespace pbfleet::api {

using nlohmann::json;
using testing::ApiFixture;
using testing::body_of;
using testing::good_reading;

namespace {

const json& document() {
  static const json doc = json::parse(openapi_document());
  return doc;
}

const json& resolve(const json& schema) {
  if (schema.contains("$ref")) {
    const std::string ref = schema["$ref"];  // "#/components/schemas/Name"
    return document()["components"]["schemas"][ref.substr(ref.rfind('/') + 1)];
  }
  return schema;
}

bool type_fits(const json& value, const std::string& type) {
  if (type == "object") return value.is_object();
  if (type == "array") return value.is_array();
  if (type == "string") return value.is_string();
  if (type == "number") return value.is_number();
  if (type == "integer") return value.is_number_integer();
  if (type == "boolean") return value.is_boolean();
  if (type == "null") return value.is_null();
  return false;
}

// Checks `value` against the subset of JSON Schema the document uses:
// type (or a list of types), required, properties, items, enum, oneOf.
// Returns the first mismatch as "pointer: reason", or "".
std::string schema_mismatch(const json& value, const json& schema_in, const std::string& at) {
  const json& schema = resolve(schema_in);
  if (schema.contains("oneOf")) {
    for (const auto& s : schema["oneOf"])
      if (schema_mismatch(value, s, at).empty()) return {};
    return at + ": fits no oneOf branch";
  }
  if (schema.contains("enum")) {
    for (const auto& e : schema["enum"])
      if (e == value) return {};
    return at + ": " + value.dump() + " not in enum";
  }
  if (schema.contains("type")) {
    std::vector<std::string> types;
    if (schema["type"].is_array()) {
      for (const auto& t : schema["type"]) types.push_back(t);
    } else {
      types.push_back(schema["type"]);
    }
    bool ok = false;
    for (const auto& t : types) ok = ok || type_fits(value, t);
    if (!ok) return at + ": " + value.dump().substr(0, 60) + " is not " + schema["type"].dump();
  }
  if (value.is_object()) {
    for (const auto& name : schema.value("required", json::array()))
      if (!value.contains(name.get<std::string>())) return at + ": missing required " + name.dump();
    const json properties = schema.value("properties", json::object());
    for (const auto& [name, sub] : properties.items())
      if (value.contains(name))
        if (auto m = schema_mismatch(value[name], sub, at + "/" + name); !m.empty()) return m;
  }
  if (value.is_array() && schema.contains("items"))
    for (std::size_t i = 0; i < value.size(); ++i)
      if (auto m = schema_mismatch(value[i], schema["items"], at + "/" + std::to_string(i)); !m.empty())
        return m;
  return {};
}

// The documented schema of a response, or nullptr when the status is not documented.
const json* response_schema(const std::string& path, const std::string& method, int status,
                            const std::string& media) {
  const json* at = &document();
  for (const std::string& key : {std::string("paths"), path, method, std::string("responses"),
                                 std::to_string(status), std::string("content"), media,
                                 std::string("schema")}) {
    if (!at->is_object() || !at->contains(key)) return nullptr;
    at = &(*at)[key];
  }
  return at;
}

void check_fits(const http::Response& r, const std::string& path, const std::string& method) {
  INFO(method << " " << path << " -> " << r.status << " " << r.body.substr(0, 300));
  const std::string media =
      r.content_type == "application/problem+json" ? "application/problem+json" : "application/json";
  const json* schema = response_schema(path, method, r.status, media);
  REQUIRE(schema != nullptr);
  CHECK(schema_mismatch(body_of(r), *schema, "") == "");
}

std::string lower(std::string_view s) {
  std::string out(s);
  for (char& c : out) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return out;
}

}  // namespace

TEST_CASE("the document is OpenAPI 3.1 and served at /openapi.json without a token") {
  CHECK(document()["openapi"] == "3.1.0");
  ApiFixture f;
  auto r = f.get("/openapi.json", "");
  CHECK(r.status == 200);
  CHECK(body_of(r) == document());
}

TEST_CASE("every route is documented with exactly the roles the route table allows") {
  const std::vector<std::pair<RoleSet, std::string>> names{
      {kCrew, "crew"}, {kTechnician, "technician"}, {kManager, "manager"}, {kAdmin, "admin"}};
  std::size_t documented = 0;
  for (const auto& route : routes()) {
    INFO(route.method << " " << route.pattern);
    REQUIRE(document()["paths"].contains(std::string(route.pattern)));
    const auto& path = document()["paths"][std::string(route.pattern)];
    REQUIRE(path.contains(lower(route.method)));
    std::set<std::string> roles, expected;
    for (const auto& r : path[lower(route.method)]["x-roles"]) roles.insert(r.get<std::string>());
    for (const auto& [bit, name] : names)
      if (route.roles & bit) expected.insert(name);
    CHECK(roles == expected);
    ++documented;
  }
  std::size_t operations = 0;
  for (const auto& [p, item] : document()["paths"].items()) operations += item.size();
  CHECK(operations == documented);  // nothing documented that does not exist
}

TEST_CASE("responses of the main routes fit the documented schemas") {
  ApiFixture f;
  check_fits(f.get("/healthz", ""), "/healthz", "get");
  check_fits(f.get("/v1/depots"), "/v1/depots", "get");
  check_fits(f.post("/v1/depots", {{"name", "Ridge Pass"}, {"design_low_c", -32}}), "/v1/depots", "post");
  check_fits(f.post("/v1/depots", {{"name", "Valley"}}), "/v1/depots", "post");  // 422
  check_fits(f.get("/v1/vehicles"), "/v1/vehicles", "get");
  check_fits(f.get("/v1/batteries"), "/v1/batteries", "get");
  check_fits(f.get("/v1/batteries/NY-0001"), "/v1/batteries/{serial}", "get");
  check_fits(f.get("/v1/batteries/NOPE"), "/v1/batteries/{serial}", "get");  // 404
  check_fits(f.post("/v1/readings", good_reading("NY-0001", "o-1"), "crew"), "/v1/readings", "post");
  check_fits(f.post("/v1/readings", good_reading("NY-0001", "o-1"), "crew"), "/v1/readings", "post");  // 200
  check_fits(f.get("/v1/readings?serial=NY-0001"), "/v1/readings", "get");
  check_fits(f.get("/v1/batteries/NY-0001/history"), "/v1/batteries/{serial}/history", "get");
  check_fits(f.post("/v1/estimate", {{"cell_sg", {1.225}}, {"electrolyte_temp_c", 5}}),
             "/v1/estimate", "post");
  check_fits(f.get("/v1/reports/winter", "manager"), "/v1/reports/winter", "get");
  check_fits(f.get("/v1/reports/sulfation", "manager"), "/v1/reports/sulfation", "get");
  check_fits(f.get("/v1/reports/replacements", "manager"), "/v1/reports/replacements", "get");
  check_fits(f.get("/v1/reports/overdue", "crew"), "/v1/reports/overdue", "get");
  check_fits(f.get("/v1/reports/winter", "crew"), "/v1/reports/winter", "get");  // 403
  check_fits(f.get("/v1/tokens"), "/v1/tokens", "get");
  check_fits(f.get("/v1/tokens", ""), "/v1/tokens", "get");  // 401
  check_fits(f.get("/v1/admin/durability"), "/v1/admin/durability", "get");
}

TEST_CASE("the schema check itself notices a missing required field and a wrong type") {
  const json& depot = document()["components"]["schemas"]["Depot"];
  CHECK(schema_mismatch({{"id", 1}, {"name", "x"}, {"time_zone", "UTC"}, {"design_low_c", -5}}, depot, "") == "");
  CHECK(schema_mismatch({{"id", 1}, {"name", "x"}, {"time_zone", "UTC"}}, depot, "") != "");
  CHECK(schema_mismatch({{"id", "1"}, {"name", "x"}, {"time_zone", "UTC"}, {"design_low_c", -5}}, depot, "") != "");
}

}  // namespace pbfleet::api
