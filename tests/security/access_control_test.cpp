// RELIABILITY-TESTS row 11: every route x {no token, bad token, revoked
// token, expired token, crew, technician, manager, admin} answers as the
// documented matrix says. The matrix is the `x-roles` of each operation in the OpenAPI
// document the daemon serves, so a new route joins the test by itself and
// the document cannot drift from the code.
//
// Expected per cell: a public route (x-roles []) answers 200 to anyone;
// otherwise no, bad or revoked token -> 401 unauthorized; a role outside
// x-roles -> 403 forbidden; a listed role -> the handler ran (2xx, or 4xx
// other than 401/403/429 for deliberately minimal bodies), never 5xx.
// The expired token is an admin token made through the API with a
// one-day lifetime, then moved into the past in the database file (the
// daemon reads the wall clock, so time cannot be made to pass otherwise).
//
// Bad tokens are throttled per client address (20 per minute), so each
// route's bad, revoked and expired cells come from their own loopback address.
#include <doctest/doctest.h>

#include <random>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

using nlohmann::json;

const std::vector<std::string> kIdentities{"none",       "bad",     "revoked", "expired",
                                           "crew",       "technician", "manager", "admin"};

bool refused_identity(const std::string& who) {
  return who == "none" || who == "bad" || who == "revoked" || who == "expired";
}

struct Sample {
  std::string path;
  std::string body;        // empty for GET/DELETE
  bool minimal = false;    // body is a bare placeholder: 400/422 is fine
};

std::string random_hex(std::size_t bytes) {
  std::random_device rd;
  std::string out;
  const char* digits = "0123456789abcdef";
  for (std::size_t i = 0; i < bytes * 2; ++i) out += digits[rd() % 16];
  return out;
}

// A request exercising `method pattern` on the seeded fleet. Each call makes
// fresh names so creations never collide.
class Requests {
 public:
  explicit Requests(LiveFleet& fleet) : fleet_(fleet) {}

  Sample sample(const std::string& method, const std::string& pattern) {
    const std::string n = std::to_string(++counter_);
    const std::string north = std::to_string(fleet_.depot_id("North Yard"));
    const std::string truck = std::to_string(fleet_.vehicle_id("TR-101"));
    Sample s;
    s.path = pattern;
    replace(s.path, "{serial}", pattern.ends_with("/retire") ? "NY-0004" : "NY-0002");
    if (pattern.starts_with("/v1/depots")) replace(s.path, "{id}", north);
    if (pattern.starts_with("/v1/vehicles")) replace(s.path, "{id}", truck);
    if (pattern.starts_with("/v1/tokens")) replace(s.path, "{id}", std::to_string(fleet_.make_token("crew").first));
    if (method == "GET" || method == "DELETE") return s;
    json body;
    if (pattern == "/v1/depots") body = {{"name", "Depot " + n}, {"design_low_c", -20}};
    else if (pattern == "/v1/depots/{id}") body = {{"design_low_c", -26}};
    else if (pattern == "/v1/vehicles") body = {{"code", "TR-9" + n}, {"depot_id", fleet_.depot_id("North Yard")}, {"engine", "diesel"}};
    else if (pattern == "/v1/vehicles/{id}") body = {{"displacement_l", 8.1}};
    else if (pattern == "/v1/batteries") body = {{"serial", "MX-" + n}, {"chemistry", "efb"}, {"nominal_v", 12}, {"rated_cca_a", 680}};
    else if (pattern == "/v1/batteries/{serial}") body = {{"rated_cca_a", 790}};
    else if (pattern == "/v1/batteries/{serial}/fit") body = {{"vehicle_id", fleet_.vehicle_id("TR-101")}};
    else if (pattern == "/v1/batteries/{serial}/retire") body = {{"reason", "access test"}};
    else if (pattern == "/v1/readings") body = good_reading("NY-0002", "acl-" + n, std::stoi(n));
    else if (pattern == "/v1/tokens") body = {{"name", "acl " + n}, {"role", "crew"}};
    else if (pattern == "/v1/admin/backup") body = {{"path", "acl-" + n + ".db"}};
    else {
      body = json::object();
      s.minimal = true;
    }
    s.body = body.dump();
    return s;
  }

 private:
  static void replace(std::string& s, const std::string& from, const std::string& to) {
    if (auto at = s.find(from); at != std::string::npos) s.replace(at, from.size(), to);
  }
  LiveFleet& fleet_;
  int counter_ = 0;
};

}  // namespace

TEST_CASE("every route answers every identity as the documented role matrix says") {
  LiveFleet fleet({.batteries_per_depot = 4, .extra_args = {}, .log_level = "warn", .database = {}});
  auto [revoked_id, revoked] = fleet.make_token("admin");
  REQUIRE(fleet.client("admin").send("DELETE", "/v1/tokens/" + std::to_string(revoked_id)).status == 200);
  const std::string bad = random_hex(32);
  auto expired_id = 0LL;
  std::string expired;
  {
    HttpClient admin = fleet.client("admin");
    auto made = admin.post("/v1/tokens", {{"name", "expired admin"}, {"role", "admin"}, {"expires_in_days", 1}});
    REQUIRE(made.status == 201);
    expired_id = made.json()["id"].get<long long>();
    expired = made.json()["token"].get<std::string>();
    SqliteProbe db(fleet.db());
    db.column("UPDATE api_tokens SET created_at = created_at - 3 * 86400,"
              " expires_at = created_at - 2 * 86400 WHERE id = " + std::to_string(expired_id));
    REQUIRE(db.integer("SELECT count(*) FROM api_tokens WHERE expires_at < unixepoch() AND id = " +
                       std::to_string(expired_id)) == 1);
  }

  const json doc = fleet.client("").get("/openapi.json").json();
  REQUIRE(doc.contains("paths"));
  Requests requests(fleet);
  int cells = 0, routes = 0;
  for (const auto& [pattern, operations] : doc["paths"].items()) {
    for (const auto& [verb, operation] : operations.items()) {
      if (!operation.is_object() || !operation.contains("x-roles")) continue;
      std::string method = verb;
      for (auto& ch : method) ch = static_cast<char>(std::toupper(static_cast<unsigned char>(ch)));
      const auto& roles = operation["x-roles"];
      const bool is_public = roles.empty();
      ++routes;
      // Each route's bad-token cells come from their own address.
      const std::string source = "127.0.0." + std::to_string(10 + routes);
      for (const auto& who : kIdentities) {
        CAPTURE(method);
        CAPTURE(pattern);
        CAPTURE(who);
        HttpClient client = fleet.client("");
        if (who == "bad" || who == "revoked" || who == "expired") {
          client.set_source_address(source);
          client.set_token(who == "bad" ? bad : who == "revoked" ? revoked : expired);
        } else if (who != "none") {
          client.set_token(fleet.token(who));
        }
        const Sample s = requests.sample(method, pattern);
        auto reply = client.send(method, s.path, s.body);
        ++cells;
        const bool listed = std::find(roles.begin(), roles.end(), who) != roles.end();
        if (is_public) {
          CHECK_MESSAGE(reply.status == 200, reply.body);
        } else if (refused_identity(who)) {
          CHECK(problem_mismatch(reply, 401, "unauthorized") == "");
          if (who == "expired") CHECK(reply.json()["detail"].get<std::string>().find("expired") != std::string::npos);
          if (who != "none") CHECK(reply.body.find(who == "bad" ? bad : who == "revoked" ? revoked : expired) == std::string::npos);
        } else if (!listed) {
          CHECK(problem_mismatch(reply, 403, "forbidden") == "");
        } else if (s.minimal) {
          CHECK_MESSAGE((reply.status < 300 || reply.status == 400 || reply.status == 422), reply.body);
        } else {
          CHECK_MESSAGE((reply.status >= 200 && reply.status < 300), reply.body);
        }
      }
    }
  }
  MESSAGE(routes << " routes x " << kIdentities.size() << " identities = " << cells << " cells");
  CHECK(routes >= 31);
  CHECK(cells == routes * static_cast<int>(kIdentities.size()));
}

}  // namespace pbfleet::testing
