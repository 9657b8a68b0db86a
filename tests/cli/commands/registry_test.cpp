// depot, vehicle, battery and token commands: the requests they make and
// what they print.
#include <doctest/doctest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>

#include "cli/commands/context.hpp"
#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;
using client::HttpRequest;
using client::Json;

namespace {

testing::FakeServer echo_server() {
  return testing::FakeServer([](const HttpRequest& r) {
    Json body = r.body.empty() ? Json::object() : Json::parse(r.body);
    body["id"] = 7;
    return testing::json_response(r.method == "POST" ? 201 : 200, body.dump());
  });
}

using testing::seams;

}  // namespace

TEST_CASE("depot add sends the design low in Celsius, whatever unit was typed") {
  auto server = echo_server();
  testing::Terminal term;
  REQUIRE(term.run({"depot", "add", "Ridge Pass", "--time-zone", "Europe/Oslo", "--design-low", "-22F"}, seams(server)) == 0);
  auto sent = Json::parse(server.requests.at(0).body);
  CHECK(sent["name"] == "Ridge Pass");
  CHECK(sent["design_low_c"].get<double>() == doctest::Approx(-30.0));  // -22 F = -30 C
  CHECK(term.out.str().find("ID") != std::string::npos);
}

TEST_CASE("vehicle add with an engine, battery add with ratings: only given fields are sent") {
  auto server = echo_server();
  testing::Terminal term;
  REQUIRE(term.run({"vehicle", "add", "TR-104", "--depot", "1", "--engine", "diesel", "--displacement-l", "7.7"}, seams(server)) == 0);
  auto v = Json::parse(server.requests.at(0).body);
  CHECK(v == Json::parse(R"({"code":"TR-104","depot_id":1,"engine":"diesel","displacement_l":7.7})"));
  REQUIRE(term.run({"battery", "add", "NB-2023-0001", "--rated-cca", "800", "--vehicle", "7"}, seams(server)) == 0);
  auto b = Json::parse(server.requests.at(1).body);
  CHECK(b["chemistry"] == "flooded");
  CHECK(b["rated_cca_a"] == 800.0);
  CHECK(b["vehicle_id"] == 7);
  CHECK_FALSE(b.contains("capacity_ah"));
}

TEST_CASE("battery fit and retire post to the battery's own routes") {
  auto server = echo_server();
  testing::Terminal term;
  REQUIRE(term.run({"battery", "fit", "NB-1", "--vehicle", "3"}, seams(server)) == 0);
  REQUIRE(term.run({"battery", "retire", "NB-1", "--reason", "cell 4 shorted"}, seams(server)) == 0);
  CHECK(server.requests.at(0).target == "/v1/batteries/NB-1/fit");
  CHECK(Json::parse(server.requests.at(0).body)["vehicle_id"] == 3);
  CHECK(server.requests.at(1).target == "/v1/batteries/NB-1/retire");
  CHECK(Json::parse(server.requests.at(1).body)["reason"] == "cell 4 shorted");
}

TEST_CASE("lists follow next_cursor to the end and print one table") {
  testing::FakeServer server([](const HttpRequest& r) {
    if (r.target.find("cursor=") == std::string::npos) {
      return testing::json_response(200, R"({"items":[{"serial":"A","chemistry":"agm"}],"next_cursor":"c2"})");
    }
    return testing::json_response(200, R"({"items":[{"serial":"B","chemistry":"efb"}],"next_cursor":null})");
  });
  testing::Terminal term;
  REQUIRE(term.run({"battery", "list", "--status", "in_service"}, seams(server)) == 0);
  REQUIRE(server.requests.size() == 2);
  CHECK(server.requests[0].target == "/v1/batteries?status=in_service&limit=1000");
  CHECK(server.requests[1].target == "/v1/batteries?status=in_service&limit=1000&cursor=c2");
  auto out = term.out.str();
  CHECK(out.find("A       agm") != std::string::npos);
  CHECK(out.find("B       efb") != std::string::npos);
}

TEST_CASE("battery list --json is one array of every item") {
  testing::FakeServer server([](const HttpRequest&) {
    return testing::json_response(200, R"({"items":[{"serial":"A"},{"serial":"B"}],"next_cursor":null})");
  });
  testing::Terminal term;
  REQUIRE(term.run({"battery", "list", "--json"}, seams(server)) == 0);
  CHECK(Json::parse(term.out.str()).size() == 2);
}

TEST_CASE("a new token is printed once on stdout, with its note on stderr") {
  testing::FakeServer server([](const HttpRequest&) { return testing::json_response(201, R"({"id":4,"token":"tok-abc"})"); });
  testing::Terminal term;
  REQUIRE(term.run({"token", "add", "Harbour crew", "--role", "crew", "--depot", "2"}, seams(server)) == 0);
  CHECK(Json::parse(server.requests.at(0).body) == Json::parse(R"({"name":"Harbour crew","role":"crew","depot_id":2})"));
  CHECK(term.out.str() == "tok-abc\n");
  CHECK(term.err.str().find("shown once") != std::string::npos);
  CHECK(term.run({"token", "add", "x", "--role", "wizard"}, seams(server)) == kExitUsage);
}

TEST_CASE("token add --save-to writes a new 0600 file, and asks for no token when it cannot") {
  testing::FakeServer server([](const HttpRequest&) {
    return testing::json_response(201, R"({"id":7,"token":"tok-saved"})");
  });
  const auto dir = std::filesystem::temp_directory_path() /
                   ("pbfleet-save-to-" + std::to_string(::getpid()));
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  const auto file = dir / "crew.token";
  testing::Terminal term;
  REQUIRE(term.run({"token", "add", "Quay crew", "--role", "crew", "--save-to", file.string()}, seams(server)) == 0);
  std::ifstream in(file);
  std::string saved;
  std::getline(in, saved);
  CHECK(saved == "tok-saved");
  CHECK((std::filesystem::status(file).permissions() & std::filesystem::perms::all) ==
        (std::filesystem::perms::owner_read | std::filesystem::perms::owner_write));
  CHECK(term.out.str().find("tok-saved") == std::string::npos);  // not on the screen
  // The file exists now: refused before the server is asked, so no token
  // is left behind to revoke.
  testing::Terminal again;
  CHECK(again.run({"token", "add", "Quay crew", "--role", "crew", "--save-to", file.string()}, seams(server)) != 0);
  CHECK(again.err.str().find("no token was created") != std::string::npos);
  CHECK(server.requests.size() == 1);
  // A refused request leaves no empty file behind.
  testing::FakeServer refusing([](const HttpRequest&) {
    return testing::json_response(403, R"({"title":"forbidden","status":403})");
  });
  const auto other = dir / "other.token";
  testing::Terminal refused;
  CHECK(refused.run({"token", "add", "x", "--role", "crew", "--save-to", other.string()}, seams(refusing)) != 0);
  CHECK_FALSE(std::filesystem::exists(other));
  std::filesystem::remove_all(dir);
}

TEST_CASE("token add --expires-in sends expires_in_days and refuses a lifetime outside 1..3650") {
  testing::FakeServer server([](const HttpRequest&) {
    return testing::json_response(201, R"({"id":5,"token":"tok-x","expires_at":"2026-04-10T12:00:00Z"})");
  });
  testing::Terminal term;
  REQUIRE(term.run({"token", "add", "Valley crew", "--role", "crew", "--expires-in", "90"}, seams(server)) == 0);
  CHECK(Json::parse(server.requests.at(0).body)["expires_in_days"] == 90);
  CHECK(term.err.str().find("expires 2026-04-10T12:00:00Z") != std::string::npos);
  CHECK(term.run({"token", "add", "x", "--role", "crew", "--expires-in", "0"}, seams(server)) == kExitUsage);
  CHECK(term.run({"token", "add", "x", "--role", "crew", "--expires-in", "3651"}, seams(server)) == kExitUsage);
  CHECK(server.requests.size() == 1);
}
