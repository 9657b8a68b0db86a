// The dashboard's pages against a real pbfleetd: the winter page shows the
// numbers of GET /v1/reports/winter, the battery page draws one chart point
// per reading with the flagged ones marked, the reading form shows field
// errors and stores nothing on a refusal, a good reading lands in the
// history, and the embedded assets are served with types and ETags.
#include <doctest/doctest.h>

#include <cmath>
#include <cstdio>
#include <regex>

#include "tests/support/live_fleet.hpp"
#include "tests/support/web_session.hpp"

namespace pbfleet::testing {
namespace {

int count(const std::string& text, const std::regex& pattern) {
  return static_cast<int>(std::distance(std::sregex_iterator(text.begin(), text.end(), pattern), std::sregex_iterator()));
}

// The text of element `id` up to its closing tag `close`.
std::string element(const std::string& html, const std::string& id, const std::string& close) {
  const auto at = html.find("id=\"" + id + "\"");
  if (at == std::string::npos) return {};
  return html.substr(at, html.find(close, at) - at);
}

// The text of the first cell of class `cls` in a table row ("" when none).
std::string cell_text(const std::string& row, const std::string& cls) {
  const auto at = row.find("class=\"" + cls + "\"");
  if (at == std::string::npos) return {};
  const auto open = row.find('>', at) + 1;
  return row.substr(open, row.find('<', open) - open);
}

std::string rounded(double v, int decimals) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  std::string s = buf;
  if (s.starts_with("-") && s.find_first_not_of("-0.") == std::string::npos) s.erase(0, 1);
  return s;
}

// A fleet with a few weeks of readings, some flagged (unsettled OCV).
void seed_readings(LiveFleet& fleet) {
  auto crew = fleet.client("crew");
  nlohmann::json batch = nlohmann::json::array();
  int n = 0;
  for (const auto& depot : {"North Yard", "Harbour"})
    for (const auto& serial : fleet.serials(depot))
      for (int week = 0; week < 6; ++week) {
        auto r = good_reading(serial, serial + "-w" + std::to_string(week), week * 7 * 24 * 60);
        r["ocv_v"] = 12.62 - 0.04 * week;
        if (week % 3 == 1) r["rest_h"] = 0.5;
        if (++n % 2) r["cell_sg"] = {1.265, 1.260, 1.200, 1.265, 1.262, 1.264};
        batch.push_back(r);
      }
  REQUIRE(crew.post("/v1/readings", batch).status == 201);
}

}  // namespace

TEST_CASE("the winter page shows the report's counts, order and numbers, at the depot's low and at another") {
  LiveFleet fleet({.batteries_per_depot = 3, .extra_args = {}, .log_level = "warn", .database = {}});
  seed_readings(fleet);
  WebSession web(fleet.server().port());
  REQUIRE(web.sign_in(fleet.token("manager")).status == 303);
  auto api = fleet.client("manager");
  for (const std::string query : {"", "?low_c=-40"}) {
    CAPTURE(query);
    const auto report = api.get("/v1/reports/winter" + query).json();
    const auto page = web.get("/ui/winter" + query);
    REQUIRE(page.status == 200);
    const std::string summary = element(page.body, "depot-summary", "</table>");
    for (const auto& d : report["depots"]) {
      const std::string row_start = "data-depot-id=\"" + std::to_string(d["depot_id"].get<long>()) + "\"";
      const auto at = summary.find(row_start);
      REQUIRE(at != std::string::npos);
      const std::string row = summary.substr(at, summary.find("</tr>", at) - at);
      for (const std::string level : {"act_now", "watch", "no_data", "ok"})
        CHECK(cell_text(row, "num " + level) == std::to_string(d[level].get<int>()));
      CHECK(cell_text(row, "num low") == rounded(d["low_c"].get<double>(), 1));
    }
    const std::string list = element(page.body, "risk-list", "</table>");
    std::vector<std::string> serials;
    const std::regex serial_attr("data-serial=\"([^\"]+)\"");
    for (auto it = std::sregex_iterator(list.begin(), list.end(), serial_attr); it != std::sregex_iterator(); ++it)
      serials.push_back((*it)[1]);
    REQUIRE(serials.size() == report["batteries"].size());
    for (std::size_t i = 0; i < serials.size(); ++i) {
      const auto& b = report["batteries"][i];
      CHECK(serials[i] == b["serial"]);
      const auto at = list.find("data-serial=\"" + serials[i] + "\"");
      const std::string row = list.substr(at, list.find("</tr>", at) - at);
      if (b["projected_soc_percent"].is_number())
        CHECK(cell_text(row, "num soc") == rounded(b["projected_soc_percent"].get<double>(), 0));
      CHECK(row.find("data-level=\"" + b["level"].get<std::string>() + "\"") != std::string::npos);
    }
  }
  // The level filter keeps only that level.
  const auto watch = web.get("/ui/winter?level=watch");
  CHECK(count(watch.body, std::regex("data-level=\"(act_now|no_data|ok)\"")) == 0);
  const auto bad = web.get("/ui/winter?low_c=bitter");
  CHECK(bad.status == 200);
  CHECK(bad.body.find("role=\"alert\"") != std::string::npos);
}

TEST_CASE("the battery page draws one point per reading, marks the flagged ones and names their flags") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  seed_readings(fleet);
  const std::string serial = fleet.serials("North Yard")[0];
  const auto history = fleet.client("technician").get("/v1/batteries/" + serial + "/history").json();
  int with_soc = 0, flagged = 0;
  for (const auto& r : history["readings"]) {
    with_soc += r["derived"]["soc_percent"].is_number();
    flagged += !r["derived"]["flags"].empty();
  }
  REQUIRE(with_soc == 6);
  REQUIRE(flagged > 0);
  REQUIRE(flagged < 6);
  WebSession web(fleet.server().port());
  REQUIRE(web.sign_in(fleet.token("technician")).status == 303);
  const auto page = web.get("/ui/batteries/" + serial);
  REQUIRE(page.status == 200);
  const std::string chart = element(page.body, "soc-chart", "</svg>");
  CHECK(count(chart, std::regex("class=\"pt( flagged)?\"")) == with_soc);
  CHECK(count(chart, std::regex("class=\"pt flagged\"")) == flagged);
  CHECK(chart.find("class=\"band\"") != std::string::npos);
  CHECK(chart.find("ocv_unsettled") != std::string::npos);  // named on hover (<title>)
  CHECK(count(element(page.body, "flagged-list", "</ul>"), std::regex("<li>")) == flagged);
  CHECK(count(element(page.body, "readings-table", "</table>"), std::regex("data-reading-id=")) == 6);
  CHECK(page.body.find("weak") != std::string::npos);  // cell 3 of the latest cells reads low
}

TEST_CASE("a refused reading shows each field's error beside it and stores nothing, a good one lands in the history") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  const std::string serial = fleet.serials("North Yard")[0];
  WebSession web(fleet.server().port());
  REQUIRE(web.sign_in(fleet.token("crew")).status == 303);
  const auto form = web.get("/ui/readings/new?serial=" + serial);
  REQUIRE(form.status == 200);
  CHECK(count(form.body, std::regex("name=\"cell_sg_[0-9]+\"")) == 6);
  std::map<std::string, std::string> fields{{"csrf", input_value(form.body, "csrf").value()},
                                            {"serial", serial},
                                            {"reading_id", input_value(form.body, "reading_id").value()},
                                            {"taken_at", "2026-01-05T07:00:00Z"},
                                            {"ocv_v", "12.6x"},
                                            {"rest_h", "12"},
                                            {"temp", "5"},
                                            {"temp_unit", "C"}};
  for (int i = 1; i <= 6; ++i) fields["cell_sg_" + std::to_string(i)] = "1.265";
  fields["cell_sg_3"] = "2.5";
  const auto refused = web.post_form("/ui/readings", fields);
  CHECK(refused.status == 422);
  CHECK(refused.body.find("id=\"cell_sg_3-error\"") != std::string::npos);
  CHECK(refused.body.find("id=\"ocv_v-error\"") != std::string::npos);
  CHECK(refused.body.find("id=\"cell_sg_2-error\"") == std::string::npos);
  CHECK(refused.body.find("1.400") != std::string::npos);  // the allowed range is named
  CHECK(input_value(refused.body, "cell_sg_3") == "2.5");   // what was typed is kept
  auto api = fleet.client("admin");
  const auto none = api.get("/v1/readings?serial=" + serial).json();
  CHECK(none["items"].empty());

  fields["ocv_v"] = "12.41";
  fields["cell_sg_3"] = "1.262";
  fields["temp"] = "23";
  fields["temp_unit"] = "F";
  const auto saved = web.post_form("/ui/readings", fields);
  CHECK(saved.status == 201);
  CHECK(saved.body.find("id=\"derived-soc\"") != std::string::npos);
  const auto listed = api.get("/v1/readings?serial=" + serial).json();
  const auto& items = listed["items"];
  REQUIRE(items.size() == 1);
  CHECK(items[0]["reading_id"] == fields["reading_id"]);
  CHECK(items[0]["electrolyte_temp_unit"] == "F");
  CHECK(items[0]["source"] == "dashboard");
  // Sending the same form again is a replay, not a second reading.
  CHECK(web.post_form("/ui/readings", fields).status == 200);
  const auto again = api.get("/v1/readings?serial=" + serial).json();
  CHECK(again["items"].size() == 1);
  const auto page = web.get("/ui/batteries/" + serial);
  CHECK(page.body.find("data-reading-id=\"" + fields["reading_id"] + "\"") != std::string::npos);
}

TEST_CASE("assets are embedded with their content types, ETags and caching") {
  LiveFleet fleet({.batteries_per_depot = 1, .extra_args = {}, .log_level = "warn", .database = {}});
  HttpClient client(fleet.server().port());
  const auto css = client.get("/assets/dashboard.css");
  CHECK(css.status == 200);
  CHECK(css.header("content-type") == "text/css; charset=utf-8");
  CHECK(css.header("cache-control") == "no-cache");
  const std::string etag = css.header("etag");
  REQUIRE(etag.size() > 2);
  CHECK(client.send("GET", "/assets/dashboard.css", {}, "text/plain", {{"If-None-Match", etag}}).status == 304);
  std::string version = etag.substr(1, etag.size() - 2);
  CHECK(client.get("/assets/dashboard.css?v=" + version).header("cache-control").find("immutable") != std::string::npos);
  CHECK(client.get("/assets/dashboard.js").header("content-type") == "text/javascript; charset=utf-8");
  CHECK(client.get("/assets/icon.svg").header("content-type") == "image/svg+xml");
  CHECK(client.get("/assets/nothing.js").status == 404);
}

}  // namespace pbfleet::testing
