#include "tests/api/fixture.hpp"

#include <atomic>
#include <stdexcept>
#include <unistd.h>

#include "models/wire/reading.hpp"
#include "server/api/bootstrap.hpp"
#include "server/api/problem.hpp"
#include "server/storage/sqlite_store.hpp"

namespace pbfleet::api::testing {

using nlohmann::json;

namespace {

std::filesystem::path fresh_dir() {
  static std::atomic<int> counter{0};
  auto dir = std::filesystem::temp_directory_path() /
             ("pbfleet-api-test-" + std::to_string(::getpid()) + "-" + std::to_string(counter++));
  std::filesystem::remove_all(dir);
  std::filesystem::create_directories(dir);
  return dir;
}

json created(const http::Response& r) {
  if (r.status != 201) throw std::runtime_error("seed failed: " + r.body);
  return json::parse(r.body);
}

}  // namespace

std::chrono::sys_seconds test_now() {
  using namespace std::chrono;
  return sys_days{year{2026} / January / 10} + hours{12};
}

ApiFixture::ApiFixture() : dir_(fresh_dir()) {
  clock_.at = test_now();
  auto store = storage::open_sqlite_store({.file = dir_ / "pbfleet.db"});
  if (!store) throw std::runtime_error("cannot open store: " + store.error().detail);
  store_ = std::move(store.value());
  ApiOptions options;
  options.backup_dir = dir_ / "backups";
  api_ = std::make_unique<Api>(*store_, clock_, options);
  seed();
}

ApiFixture::~ApiFixture() {
  api_.reset();
  store_.reset();
  std::error_code ec;
  std::filesystem::remove_all(dir_, ec);
}

void ApiFixture::seed() {
  for (auto role : {storage::Role::crew, storage::Role::technician, storage::Role::manager,
                    storage::Role::admin}) {
    const std::string name(storage::to_string(role));
    auto minted = mint_token(*store_, name, role, std::nullopt);
    if (!minted) throw std::runtime_error("token: " + minted.error().detail);
    tokens_[name] = minted->raw;
    token_ids_[name] = minted->token.id;
  }
  const std::vector<std::tuple<std::string, std::string, std::vector<std::string>>> fleet{
      {"North Yard", "TR-104", {"NY-0001", "NY-0002"}}, {"Harbour", "TR-201", {"HB-0001"}}};
  for (const auto& [depot, code, serials] : fleet) {
    depots_[depot] = created(post("/v1/depots", {{"name", depot}, {"time_zone", "Europe/Oslo"},
                                                 {"design_low_c", -25}}))
                         .at("id");
    vehicles_[code] = created(post("/v1/vehicles", {{"code", code}, {"depot_id", depots_[depot]},
                                                    {"engine", "diesel"}, {"displacement_l", 7.7}}))
                          .at("id");
    for (const auto& serial : serials)
      created(post("/v1/batteries",
                   {{"serial", serial}, {"chemistry", "flooded"}, {"nominal_v", 12},
                    {"rated_cca_a", 800}, {"full_charge_sg", 1.265},
                    {"installed_on", "2025-10-02"}, {"vehicle_id", vehicles_[code]}}));
  }
  auto scoped = mint_token(*store_, "crew harbour", storage::Role::crew, depots_["Harbour"]);
  tokens_["crew_harbour"] = scoped->raw;
  token_ids_["crew_harbour"] = scoped->token.id;
  auto manager = mint_token(*store_, "manager harbour", storage::Role::manager, depots_["Harbour"]);
  tokens_["manager_harbour"] = manager->raw;
  token_ids_["manager_harbour"] = manager->token.id;
}

http::Response ApiFixture::call(const std::string& method, const std::string& target,
                                const std::string& who, const std::string& body,
                                const std::string& content_type) {
  http::Request r;
  r.method = method;
  r.target = target;
  r.body = body;
  r.peer = "127.0.0.1:40000";
  if (!body.empty()) r.headers["content-type"] = content_type;
  if (!who.empty()) r.headers["authorization"] = "Bearer " + tokens_.at(who);
  return api_->handle(std::move(r));
}

json body_of(const http::Response& response) {
  return json::parse(response.body, nullptr, false);
}

json good_reading(const std::string& serial, const std::string& reading_id, int minutes_ago) {
  json r{{"serial", serial},
         {"taken_at", models::wire::format_timestamp(test_now() - std::chrono::minutes(minutes_ago))},
         {"ocv_v", 12.62},
         {"cell_sg", {1.265, 1.260, 1.265, 1.255, 1.265, 1.260}},
         {"electrolyte_temp_c", 5.0},
         {"rest_h", 12}};
  if (!reading_id.empty()) r["reading_id"] = reading_id;
  return r;
}

std::string slug_of(const http::Response& response) {
  if (response.content_type != "application/problem+json") return {};
  auto body = body_of(response);
  const std::string type = body.value("type", "");
  const std::string base(kProblemTypeBase);
  return type.rfind(base, 0) == 0 ? type.substr(base.size()) : std::string{};
}

std::vector<std::string> error_fields(const http::Response& response) {
  std::vector<std::string> fields;
  auto body = body_of(response);
  if (body.contains("errors"))
    for (const auto& e : body["errors"]) fields.push_back(e.value("field", ""));
  return fields;
}

}  // namespace pbfleet::api::testing
