#include "cli/client/reading_json.hpp"

#include <cmath>

namespace pbfleet::cli::client {
namespace {

using models::wire::EnteredTemperature;
using models::wire::TempUnit;

// Fahrenheit goes back out as the number the crew typed; a round trip
// through Celsius leaves float noise in the last digits, so round to 1e-6.
double tidy(double value) { return std::round(value * 1e6) / 1e6; }

void put_temperature(Json& j, const std::string& stem, const std::optional<EnteredTemperature>& t) {
  if (!t) return;
  if (t->unit == TempUnit::f) {
    j[stem + "_f"] = tidy(models::fahrenheit_from_celsius(t->value));
  } else {
    j[stem + "_c"] = tidy(t->value.value);
  }
}

void put_text(Json& j, const char* key, const std::string& text) {
  if (!text.empty()) j[key] = text;
}

}  // namespace

Json reading_to_json(const models::wire::ReadingInput& r) {
  Json j = Json::object();
  put_text(j, "reading_id", r.reading_id);
  j["serial"] = r.serial;
  j["taken_at"] = models::wire::format_timestamp(r.taken_at);
  if (r.ocv) j["ocv_v"] = r.ocv->value;
  if (!r.cell_sg.empty()) {
    Json cells = Json::array();
    for (const auto& sg : r.cell_sg) cells.push_back(sg.value);
    j["cell_sg"] = std::move(cells);
  }
  put_temperature(j, "electrolyte_temp", r.electrolyte);
  put_temperature(j, "ambient_temp", r.ambient);
  if (r.rest) j["rest_h"] = r.rest->value;
  if (r.load_test_current) j["load_test_a"] = r.load_test_current->value;
  if (r.load_test_end) j["load_test_end_v"] = r.load_test_end->value;
  put_text(j, "logged_by", r.logged_by);
  put_text(j, "source", r.source);
  put_text(j, "note", r.note);
  if (r.after_charge) j["after_charge"] = true;
  if (r.water_added) j["water_added"] = true;
  return j;
}

}  // namespace pbfleet::cli::client
