#include "server/storage/pg_rows.hpp"

namespace pbfleet::storage::pg {
namespace {

using models::wire::EnteredTemperature;
using models::wire::TempUnit;

std::optional<EnteredTemperature> read_temperature(const pqxx::row& r, int value, int unit) {
  if (r[value].is_null()) return std::nullopt;
  return EnteredTemperature{models::Celsius{r[value].as<double>()},
                            text_view(r[unit]) == "F" ? TempUnit::f : TempUnit::c};
}

template <class Quantity>
std::optional<Quantity> read_quantity(const pqxx::field& f) {
  if (f.is_null()) return std::nullopt;
  return Quantity{f.as<double>()};
}

}  // namespace

Depot read_depot(const pqxx::row& r) {
  return Depot{r[0].as<Id>(), text(r[1]), text(r[2]), models::Celsius{r[3].as<double>()}};
}

Vehicle read_vehicle(const pqxx::row& r) {
  Vehicle v;
  v.id = r[0].as<Id>();
  v.code = text(r[1]);
  v.depot_id = r[2].as<Id>();
  v.engine = parse_engine(text_view(r[3])).value_or(Engine::diesel);
  v.displacement_l = opt_double(r[4]);
  v.required_cca_a = read_quantity<models::Amperes>(r[5]);
  return v;
}

Battery read_battery(const pqxx::row& r) {
  Battery b;
  b.id = r[0].as<Id>();
  b.serial = text(r[1]);
  b.chemistry = models::parse_chemistry(text_view(r[2])).value_or(models::Chemistry::flooded);
  b.nominal_v = models::Volts{r[3].as<double>()};
  b.cells = r[4].as<int>();
  b.rated_cca_a = models::Amperes{r[5].as<double>()};
  b.reserve_capacity_min = opt_double(r[6]);
  b.capacity_ah = opt_double(r[7]);
  b.full_charge_sg = read_quantity<models::SpecificGravity>(r[8]);
  b.installed_on = days_from_db(r[9].as<std::int64_t>());
  b.vehicle_id = opt_int(r[10]);
  b.status = parse_battery_status(text_view(r[11])).value_or(BatteryStatus::in_service);
  if (auto at = opt_int(r[12])) b.retired_at = seconds_from_db(*at);
  b.retire_reason = text(r[13]);
  b.depot_id = opt_int(r[14]);
  return b;
}

StoredReading read_reading(const pqxx::row& r) {
  StoredReading s;
  s.id = r[0].as<Id>();
  s.reading_id = text(r[1]);
  s.battery_id = r[2].as<Id>();
  s.serial = text(r[3]);
  s.taken_at = seconds_from_db(r[4].as<std::int64_t>());
  s.received_at = seconds_from_db(r[5].as<std::int64_t>());
  s.ocv = read_quantity<models::Volts>(r[6]);
  decode_cell_sg_into(text_view(r[7]), s.cell_sg);
  s.electrolyte = read_temperature(r, 8, 9);
  s.ambient = read_temperature(r, 10, 11);
  s.rest = read_quantity<models::Hours>(r[12]);
  s.load_test_current = read_quantity<models::Amperes>(r[13]);
  s.load_test_end = read_quantity<models::Volts>(r[14]);
  s.logged_by = text(r[15]);
  s.source = text(r[16]);
  s.note = text(r[17]);
  s.after_charge = boolean(r[18]);
  s.water_added = boolean(r[19]);
  return s;
}

void read_measurement(const pqxx::row& r, ReadingMeasurement& m) {
  m.taken_at = seconds_from_db(r[0].as<std::int64_t>());
  m.ocv = read_quantity<models::Volts>(r[1]);
  decode_cell_sg_into(text_view(r[2]), m.cell_sg);
  m.electrolyte = read_quantity<models::Celsius>(r[3]);
  m.rest = read_quantity<models::Hours>(r[4]);
  m.load_test_current = read_quantity<models::Amperes>(r[5]);
  m.load_test_end = read_quantity<models::Volts>(r[6]);
  m.after_charge = boolean(r[7]);
  m.water_added = boolean(r[8]);
}

ApiToken read_token(const pqxx::row& r, int first) {
  const int c = first;
  ApiToken t;
  t.id = r[c].as<Id>();
  t.name = text(r[c + 1]);
  t.role = parse_role(text_view(r[c + 2])).value_or(Role::crew);
  t.depot_id = opt_int(r[c + 3]);
  t.created_at = seconds_from_db(r[c + 4].as<std::int64_t>());
  if (auto at = opt_int(r[c + 5])) t.revoked_at = seconds_from_db(*at);
  bytea_into(r[c + 6], t.hash.bytes.data(), t.hash.bytes.size());
  if (auto at = opt_int(r[c + 7])) t.expires_at = seconds_from_db(*at);
  return t;
}

}  // namespace pbfleet::storage::pg
