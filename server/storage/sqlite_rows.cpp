#include "server/storage/sqlite_rows.hpp"

#include <algorithm>
#include <charconv>
#include <cstring>

#include "server/storage/digest.hpp"

namespace pbfleet::storage::sqlite {
namespace {

using models::wire::EnteredTemperature;
using models::wire::TempUnit;

std::optional<EnteredTemperature> read_temperature(const Statement& s, int value, int unit) {
  if (s.is_null(value)) return std::nullopt;
  return EnteredTemperature{models::Celsius{s.real_at(value)},
                            s.text_at(unit) == "F" ? TempUnit::f : TempUnit::c};
}

template <class Quantity>
std::optional<Quantity> read_quantity(const Statement& s, int column) {
  if (s.is_null(column)) return std::nullopt;
  return Quantity{s.real_at(column)};
}

// The shortest round-trip decimal of a double, in a buffer on the stack
// (this runs for every number of every reading stored).
class Shortest {
 public:
  explicit Shortest(double value) : end_(std::to_chars(chars_, chars_ + sizeof chars_, value).ptr) {}
  [[nodiscard]] std::string_view view() const { return {chars_, static_cast<std::size_t>(end_ - chars_)}; }

 private:
  char chars_[32];
  char* end_;
};

// Canonical form for hashing: each part length-prefixed, so no choice of
// text can make two different readings serialise alike.
class Canonical {
 public:
  Canonical() { out_.reserve(256); }
  void add(std::string_view part) { add(part, {}); }
  template <class Q>
  void add(const std::optional<Q>& q) {
    q ? add(Shortest(q->value).view()) : add(std::string_view("-"));
  }
  void add(const std::optional<EnteredTemperature>& t) {
    t ? add(Shortest(t->value.value).view(), t->unit == TempUnit::f ? "F" : "C")
      : add(std::string_view("-"));
  }
  const std::string& text() const { return out_; }

 private:
  // One part written as "<length>:<part><suffix>", the length counting both.
  void add(std::string_view part, std::string_view suffix) {
    char length[24];
    const auto end = std::to_chars(length, length + sizeof length, part.size() + suffix.size()).ptr;
    out_.append(length, end);
    out_ += ':';
    out_.append(part);
    out_.append(suffix);
  }

  std::string out_;
};

constexpr std::string_view kCursorPrefix = "after:";

}  // namespace

Depot read_depot(const Statement& s) {
  return Depot{s.int_at(0), s.text_at(1), s.text_at(2), models::Celsius{s.real_at(3)}};
}

Vehicle read_vehicle(const Statement& s) {
  Vehicle v;
  v.id = s.int_at(0);
  v.code = s.text_at(1);
  v.depot_id = s.int_at(2);
  v.engine = parse_engine(s.text_at(3)).value_or(Engine::diesel);
  v.displacement_l = s.opt_real_at(4);
  v.required_cca_a = read_quantity<models::Amperes>(s, 5);
  return v;
}

Battery read_battery(const Statement& s) {
  Battery b;
  b.id = s.int_at(0);
  b.serial = s.text_at(1);
  b.chemistry = models::parse_chemistry(s.text_at(2)).value_or(models::Chemistry::flooded);
  b.nominal_v = models::Volts{s.real_at(3)};
  b.cells = static_cast<int>(s.int_at(4));
  b.rated_cca_a = models::Amperes{s.real_at(5)};
  b.reserve_capacity_min = s.opt_real_at(6);
  b.capacity_ah = s.opt_real_at(7);
  b.full_charge_sg = read_quantity<models::SpecificGravity>(s, 8);
  b.installed_on = days_from_db(s.int_at(9));
  b.vehicle_id = s.opt_int_at(10);
  b.status = parse_battery_status(s.text_at(11)).value_or(BatteryStatus::in_service);
  if (auto at = s.opt_int_at(12)) b.retired_at = seconds_from_db(*at);
  b.retire_reason = s.text_at(13);
  b.depot_id = s.opt_int_at(14);
  return b;
}

StoredReading read_reading(const Statement& s) {
  StoredReading r;
  r.id = s.int_at(0);
  r.reading_id = s.text_at(1);
  r.battery_id = s.int_at(2);
  r.serial = s.text_at(3);
  r.taken_at = seconds_from_db(s.int_at(4));
  r.received_at = seconds_from_db(s.int_at(5));
  r.ocv = read_quantity<models::Volts>(s, 6);
  r.cell_sg = decode_cell_sg(s.text_at(7));
  r.electrolyte = read_temperature(s, 8, 9);
  r.ambient = read_temperature(s, 10, 11);
  r.rest = read_quantity<models::Hours>(s, 12);
  r.load_test_current = read_quantity<models::Amperes>(s, 13);
  r.load_test_end = read_quantity<models::Volts>(s, 14);
  r.logged_by = s.text_at(15);
  r.source = s.text_at(16);
  r.note = s.text_at(17);
  r.after_charge = s.int_at(18) != 0;
  r.water_added = s.int_at(19) != 0;
  return r;
}

void read_measurement(const Statement& s, ReadingMeasurement& m) {
  m.taken_at = seconds_from_db(s.int_at(0));
  m.ocv = read_quantity<models::Volts>(s, 1);
  decode_cell_sg_into(s.text_view_at(2), m.cell_sg);
  m.electrolyte = read_quantity<models::Celsius>(s, 3);
  m.rest = read_quantity<models::Hours>(s, 4);
  m.load_test_current = read_quantity<models::Amperes>(s, 5);
  m.load_test_end = read_quantity<models::Volts>(s, 6);
  m.after_charge = s.int_at(7) != 0;
  m.water_added = s.int_at(8) != 0;
}

ApiToken read_token(const Statement& s, int first) {
  const int c = first;
  ApiToken t;
  t.id = s.int_at(c);
  t.name = s.text_at(c + 1);
  t.role = parse_role(s.text_at(c + 2)).value_or(Role::crew);
  t.depot_id = s.opt_int_at(c + 3);
  t.created_at = seconds_from_db(s.int_at(c + 4));
  if (auto at = s.opt_int_at(c + 5)) t.revoked_at = seconds_from_db(*at);
  const auto hash = s.blob_at(c + 6);
  if (hash.size() == t.hash.bytes.size())
    std::memcpy(t.hash.bytes.data(), hash.data(), hash.size());
  if (auto at = s.opt_int_at(c + 7)) t.expires_at = seconds_from_db(*at);
  return t;
}

std::string encode_cell_sg(const std::vector<models::SpecificGravity>& cells) {
  std::string out;
  out.reserve(cells.size() * 7);  // "1.265;" and the like
  for (const auto& sg : cells) {
    if (!out.empty()) out += ';';
    out.append(Shortest(sg.value).view());
  }
  return out;
}

std::vector<models::SpecificGravity> decode_cell_sg(std::string_view text) {
  std::vector<models::SpecificGravity> cells;
  decode_cell_sg_into(text, cells);
  return cells;
}

void decode_cell_sg_into(std::string_view text, std::vector<models::SpecificGravity>& cells) {
  cells.clear();
  while (!text.empty()) {
    const auto end = text.find(';');
    const std::string_view part = text.substr(0, end);
    double value = 0;
    const auto result = std::from_chars(part.data(), part.data() + part.size(), value);
    if (result.ec != std::errc()) fail(StoreErrc::internal, "stored cell_sg is damaged");
    cells.push_back(models::SpecificGravity{value});
    if (end == std::string_view::npos) break;
    text.remove_prefix(end + 1);
  }
}

}  // namespace pbfleet::storage::sqlite

namespace pbfleet::storage {

ContentHash content_hash(const models::wire::ReadingInput& r) {
  return content_hash(r, sqlite::encode_cell_sg(r.cell_sg));
}

ContentHash content_hash(const models::wire::ReadingInput& r, std::string_view cell_sg_text) {
  using sqlite::Canonical;
  Canonical c;
  c.add(r.serial);
  char taken_at[24];
  c.add(std::string_view(taken_at, std::to_chars(taken_at, taken_at + sizeof taken_at,
                                                  r.taken_at.time_since_epoch().count()).ptr));
  c.add(r.ocv);
  c.add(cell_sg_text);
  c.add(r.electrolyte);
  c.add(r.ambient);
  c.add(r.rest);
  c.add(r.load_test_current);
  c.add(r.load_test_end);
  c.add(r.logged_by);
  c.add(r.source);
  c.add(r.note);
  c.add(std::string_view(r.after_charge ? "1" : "0"));
  c.add(std::string_view(r.water_added ? "1" : "0"));
  const Sha256 digest = sha256(c.text());
  ContentHash out{};
  std::memcpy(out.data(), digest.data(), out.size());
  return out;
}

}  // namespace pbfleet::storage

namespace pbfleet::storage::sqlite {

std::string encode_cursor(Id last_id) {
  static constexpr char kHex[] = "0123456789abcdef";
  const std::string plain = std::string(kCursorPrefix) + std::to_string(last_id);
  std::string out;
  for (unsigned char ch : plain) {
    out += kHex[ch >> 4];
    out += kHex[ch & 0xf];
  }
  return out;
}

Id decode_cursor(std::string_view cursor) {
  auto nibble = [](char ch) -> int {
    if (ch >= '0' && ch <= '9') return ch - '0';
    if (ch >= 'a' && ch <= 'f') return ch - 'a' + 10;
    return -1;
  };
  std::string plain;
  for (std::size_t i = 0; i + 1 < cursor.size(); i += 2) {
    const int hi = nibble(cursor[i]);
    const int lo = nibble(cursor[i + 1]);
    if (hi < 0 || lo < 0) break;
    plain += static_cast<char>(hi * 16 + lo);
  }
  Id id = -1;
  const std::string_view digits = std::string_view(plain).substr(
      plain.rfind(kCursorPrefix, 0) == 0 ? kCursorPrefix.size() : plain.size());
  const auto result = std::from_chars(digits.data(), digits.data() + digits.size(), id);
  const bool whole = result.ec == std::errc() && result.ptr == digits.data() + digits.size();
  if (cursor.size() != plain.size() * 2 || digits.empty() || !whole || id < 0) {
    fail(StoreErrc::invalid, "cursor is not one this service issued", "cursor");
  }
  return id;
}

Id page_after(const PageRequest& page) {
  return page.cursor.empty() ? 0 : decode_cursor(page.cursor);
}

std::int64_t page_limit(const PageRequest& page) {
  return static_cast<std::int64_t>(std::clamp<std::size_t>(page.limit, 1, kMaxPageLimit));
}

}  // namespace pbfleet::storage::sqlite
