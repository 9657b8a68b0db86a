// Security probes of the web dashboard against a real pbfleetd: cookie
// flags, session fixation, CSRF (session forms and the sign-in form),
// sign-out and revocation ending sessions on the server, roles and depot
// scope exactly as on the API, the Content-Security-Policy and the other
// headers on every kind of answer, and the sign-in throttle.
#include <doctest/doctest.h>

#include <regex>

#include "tests/support/live_fleet.hpp"
#include "tests/support/web_session.hpp"

namespace pbfleet::testing {
namespace {

std::uint16_t port_of(LiveFleet& fleet) { return fleet.server().port(); }

// A complete reading form for a 6-cell battery.
std::map<std::string, std::string> reading_form(const std::string& serial, const std::string& id,
                                                const std::string& csrf) {
  std::map<std::string, std::string> f{{"serial", serial},      {"reading_id", id},
                                       {"taken_at", "2026-01-05T07:00:00Z"},
                                       {"ocv_v", "12.62"},      {"rest_h", "10"},
                                       {"temp", "5"},           {"temp_unit", "C"}};
  for (int i = 1; i <= 6; ++i) f["cell_sg_" + std::to_string(i)] = "1.265";
  if (!csrf.empty()) f["csrf"] = csrf;
  return f;
}

int stored(LiveFleet& fleet, const std::string& reading_id) {
  const auto listed = fleet.client("admin").get("/v1/readings?limit=1000").json();
  int n = 0;
  for (const auto& item : listed["items"]) n += item["reading_id"] == reading_id;
  return n;
}

}  // namespace

TEST_CASE("signing in sets an HttpOnly SameSite=Strict session cookie and the token appears in no answer") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  const auto reply = web.sign_in(fleet.token("manager"));
  REQUIRE(reply.status == 303);
  const auto cookies = set_cookies(reply);
  const auto session = std::find_if(cookies.begin(), cookies.end(),
                                    [](const SetCookie& c) { return c.name == "pbfleet_session"; });
  REQUIRE(session != cookies.end());
  CHECK(session->value.size() == 64);
  CHECK(session->value != fleet.token("manager"));
  CHECK(session->attributes.count("httponly") == 1);
  CHECK(session->attributes.at("samesite") == "Strict");
  CHECK(session->attributes.at("path") == "/");
  CHECK(session->attributes.count("secure") == 0);  // plain HTTP here; secure_cookies=true adds it
  for (const std::string page : {"/ui/winter", "/ui/batteries", "/ui/trends", "/ui/overdue"}) {
    const auto r = web.get(page);
    CAPTURE(page);
    CHECK(r.status == 200);
    CHECK(r.body.find(fleet.token("manager")) == std::string::npos);
  }
}

TEST_CASE("the Secure flag is set when pbfleetd is told a TLS proxy fronts it") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {"--secure-cookies", "true"}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  const auto form = web.get("/ui/sign-in");
  for (const auto& c : set_cookies(form)) CHECK(c.attributes.count("secure") == 1);
  const auto reply = web.sign_in(fleet.token("manager"));
  REQUIRE(reply.status == 303);
  for (const auto& c : set_cookies(reply)) CHECK(c.attributes.count("secure") == 1);
}

TEST_CASE("a session id planted before sign-in is never accepted nor kept (no fixation)") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  const std::string planted(64, 'a');
  web.cookies()["pbfleet_session"] = planted;
  const auto before = web.get("/ui/winter");
  CHECK(before.status == 303);
  CHECK(before.header("location").starts_with("/ui/sign-in"));
  REQUIRE(web.sign_in(fleet.token("manager")).status == 303);
  CHECK(web.cookies().at("pbfleet_session") != planted);
  CHECK(web.get("/ui/winter").status == 200);
  // The planted id is still nobody's session.
  WebSession attacker(port_of(fleet));
  attacker.cookies()["pbfleet_session"] = planted;
  CHECK(attacker.get("/ui/winter").status == 303);
}

TEST_CASE("a form without the session's CSRF code, with a wrong one, or from another origin stores nothing") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  const std::string serial = fleet.serials("North Yard")[0];
  WebSession web(port_of(fleet));
  REQUIRE(web.sign_in(fleet.token("crew")).status == 303);
  const std::string csrf = web.csrf_from("/ui/readings/new?serial=" + serial);
  REQUIRE(csrf.size() == 64);

  CHECK(web.post_form("/ui/readings", reading_form(serial, "csrf-none", "")).status == 403);
  CHECK(web.post_form("/ui/readings", reading_form(serial, "csrf-wrong", std::string(64, '0'))).status == 403);
  CHECK(web.post_form("/ui/readings", reading_form(serial, "csrf-origin", csrf),
                      {{"Origin", "http://evil.invalid"}}).status == 403);
  CHECK(stored(fleet, "csrf-none") + stored(fleet, "csrf-wrong") + stored(fleet, "csrf-origin") == 0);

  // Another signed-in browser's code does not fit this session either.
  WebSession other(port_of(fleet));
  REQUIRE(other.sign_in(fleet.token("crew")).status == 303);
  const std::string other_csrf = other.csrf_from("/ui/readings/new?serial=" + serial);
  CHECK(other_csrf != csrf);
  CHECK(web.post_form("/ui/readings", reading_form(serial, "csrf-other", other_csrf)).status == 403);
  CHECK(stored(fleet, "csrf-other") == 0);

  const auto good = web.post_form("/ui/readings", reading_form(serial, "csrf-good", csrf));
  CHECK(good.status == 201);
  CHECK(stored(fleet, "csrf-good") == 1);
  // Sign-out is a state change too.
  CHECK(web.post_form("/ui/sign-out", {}).status == 403);
  CHECK(web.get("/ui/batteries").status == 200);
}

TEST_CASE("the sign-in form needs its own nonce cookie (login CSRF) and refuses bad tokens") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  const auto forged = web.post_form("/ui/sign-in", {{"token", fleet.token("manager")}, {"nonce", std::string(64, 'b')}});
  CHECK(forged.status == 403);
  CHECK(web.cookies().count("pbfleet_session") == 0);
  const auto wrong = web.sign_in(std::string(64, 'f'));
  CHECK(wrong.status == 401);
  CHECK(wrong.body.find("unknown token") != std::string::npos);
  CHECK(web.cookies().count("pbfleet_session") == 0);
}

TEST_CASE("sign-out ends the session on the server, and revoking the token ends its sessions") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  REQUIRE(web.sign_in(fleet.token("manager")).status == 303);
  const std::string kept = web.cookies().at("pbfleet_session");
  const std::string csrf = web.csrf_from("/ui/winter");
  const auto out = web.post_form("/ui/sign-out", {{"csrf", csrf}});
  CHECK(out.status == 303);
  CHECK(web.cookies().count("pbfleet_session") == 0);
  // The browser forgot the cookie; a copy of it is refused too.
  web.cookies()["pbfleet_session"] = kept;
  CHECK(web.get("/ui/winter").status == 303);

  auto [id, raw] = fleet.make_token("manager");
  WebSession revoked(port_of(fleet));
  REQUIRE(revoked.sign_in(raw).status == 303);
  REQUIRE(revoked.get("/ui/winter").status == 200);
  REQUIRE(fleet.client("admin").send("DELETE", "/v1/tokens/" + std::to_string(id)).status == 200);
  const auto after = revoked.get("/ui/winter");
  CHECK(after.status == 303);
  CHECK(after.header("location").starts_with("/ui/sign-in"));
}

TEST_CASE("dashboard roles and depot scope are the API's") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession crew(port_of(fleet));
  REQUIRE(crew.sign_in(fleet.token("crew")).status == 303);
  CHECK(crew.get("/ui/winter").status == 403);  // GET /v1/reports/winter is the planners'
  CHECK(crew.get("/ui/trends").status == 403);
  CHECK(crew.get("/ui/overdue").status == 200);
  CHECK(crew.get("/ui/readings/new").status == 200);
  const auto nav = crew.get("/ui/batteries");
  CHECK(nav.body.find("href=\"/ui/winter\"") == std::string::npos);  // no link to a refused page

  WebSession manager(port_of(fleet));
  REQUIRE(manager.sign_in(fleet.token("manager")).status == 303);
  const std::string serial = fleet.serials("Harbour")[0];
  CHECK(manager.get("/ui/readings/new?serial=" + serial).status == 403);  // managers do not log readings
  CHECK(manager.get("/ui/batteries/" + serial).status == 200);

  WebSession scoped(port_of(fleet));
  REQUIRE(scoped.sign_in(fleet.token("technician_north")).status == 303);
  const auto outside = scoped.get("/ui/batteries/" + serial);
  const auto missing = scoped.get("/ui/batteries/NO-SUCH-1");
  CHECK(outside.status == 404);
  CHECK(missing.status == 404);
  CHECK(scoped.get("/ui/batteries/" + fleet.serials("North Yard")[0]).status == 200);
  const auto list = scoped.get("/ui/batteries");
  CHECK(list.body.find(serial) == std::string::npos);
}

TEST_CASE("every dashboard answer carries a strict CSP and the other security headers, and pages hold no inline script or style") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  std::vector<HttpReply> replies{web.get("/"), web.get("/ui/sign-in"), web.get("/ui/no-such-page"),
                                 web.get("/assets/dashboard.css")};
  REQUIRE(web.sign_in(fleet.token("admin")).status == 303);
  const std::vector<std::string> pages{"/ui/winter",       "/ui/batteries",
                                       "/ui/trends",       "/ui/overdue",
                                       "/ui/readings/new", "/ui/batteries/" + fleet.serials("North Yard")[0]};
  for (const auto& page : pages)
    replies.push_back(web.get(page));
  const std::regex inline_script(R"(<script(?![^>]*\bsrc=)[^>]*>)");
  const std::regex handler_attr(R"(\son[a-z]+\s*=)", std::regex::icase);
  for (const auto& r : replies) {
    const auto csp = r.header("content-security-policy");
    CHECK(csp.find("default-src 'none'") != std::string::npos);
    CHECK(csp.find("script-src 'self'") != std::string::npos);
    CHECK(csp.find("frame-ancestors 'none'") != std::string::npos);
    CHECK(csp.find("unsafe-inline") == std::string::npos);
    CHECK(csp.find("http") == std::string::npos);  // no third-party origin
    CHECK(r.header("x-content-type-options") == "nosniff");
    CHECK(r.header("referrer-policy") == "same-origin");
    if (r.header("content-type").starts_with("text/html")) {
      CHECK_FALSE(std::regex_search(r.body, inline_script));
      CHECK_FALSE(std::regex_search(r.body, handler_attr));
      CHECK(r.body.find(" style=") == std::string::npos);
    }
  }
  // The API keeps Bearer tokens and is not opened by a session cookie.
  CHECK(web.get("/v1/reports/winter").status == 401);
}

TEST_CASE("bad tokens at the sign-in page are throttled per address like Bearer tokens") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  WebSession web(port_of(fleet));
  int refused = 0, throttled = 0;
  for (int i = 0; i < 25; ++i) {
    const auto r = web.sign_in(std::string(63, 'e') + static_cast<char>('a' + i % 6));
    refused += r.status == 401;
    throttled += r.status == 429;
  }
  CHECK(refused == 20);
  CHECK(throttled == 5);
}

}  // namespace pbfleet::testing

namespace pbfleet::testing {

TEST_CASE("text from the database is escaped on every page it appears on") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  auto admin = fleet.client("admin");
  const std::string hostile = "Q<b onmouseover=alert(1)>x";  // serials may not hold '/'
  const auto made = admin.post("/v1/batteries", {{"serial", hostile}, {"chemistry", "flooded"}, {"nominal_v", 12},
                                                 {"cells", 6}, {"rated_cca_a", 700}, {"installed_on", "2025-10-01"},
                                                 {"vehicle_id", fleet.vehicle_id("TR-101")}});
  REQUIRE(made.status == 201);
  auto reading = good_reading(hostile, "esc-1", 1);
  reading["note"] = "<img src=x onerror=alert(1)>";
  REQUIRE(admin.post("/v1/readings", reading).status == 201);
  WebSession web(fleet.server().port());
  REQUIRE(web.sign_in(fleet.token("admin")).status == 303);
  const std::string encoded = "Q%3Cb%20onmouseover%3Dalert(1)%3Ex";
  const std::vector<std::string> pages{"/ui/winter", "/ui/batteries", "/ui/batteries/" + encoded, "/ui/overdue"};
  for (const auto& page : pages) {
    CAPTURE(page);
    const auto r = web.get(page);
    CHECK(r.status == 200);
    CHECK(r.body.find("<b onmouseover") == std::string::npos);
    CHECK(r.body.find("<img src=x") == std::string::npos);
    CHECK(r.body.find("Q&lt;b onmouseover=alert(1)&gt;x") != std::string::npos);
  }
  CHECK(web.get("/ui/batteries/" + encoded).body.find("&lt;img src=x onerror=alert(1)&gt;") != std::string::npos);
}

}  // namespace pbfleet::testing
