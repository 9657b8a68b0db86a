#include "server/api/reading_stream.hpp"

#include <array>
#include <cmath>
#include <cstdint>
#include <nlohmann/json.hpp>
#include <string>

#include "server/api/reading_codec.hpp"

namespace pbfleet::api {

namespace wire = models::wire;
using nlohmann::json;

namespace {


enum class Field : std::uint8_t {
  reading_id, serial, taken_at, ocv_v, cell_sg, electrolyte_temp_c, electrolyte_temp_f,
  ambient_temp_c, ambient_temp_f, rest_h, load_test_a, load_test_end_v, logged_by, source, note,
  after_charge, water_added, count
};

constexpr std::array<std::string_view, static_cast<std::size_t>(Field::count)> kNames{
    "reading_id",     "serial",       "taken_at",        "ocv_v",     "cell_sg",
    "electrolyte_temp_c", "electrolyte_temp_f", "ambient_temp_c", "ambient_temp_f", "rest_h",
    "load_test_a",    "load_test_end_v", "logged_by",    "source",    "note",
    "after_charge",   "water_added"};

std::optional<Field> field_named(std::string_view key) {
  for (std::size_t i = 0; i < kNames.size(); ++i)
    if (kNames[i] == key) return static_cast<Field>(i);
  return std::nullopt;
}

constexpr std::uint32_t bit(Field f) { return 1u << static_cast<unsigned>(f); }

// SAX events -> readings. Returning false stops the parse: the body is
// not of the plain shape, and the tree reader takes over.
class ReadingSax {
 public:
  using number_integer_t = json::number_integer_t;
  using number_unsigned_t = json::number_unsigned_t;
  using number_float_t = json::number_float_t;
  using string_t = json::string_t;
  using binary_t = json::binary_t;

  StreamedReadings out;

  bool null() {
    if (in_cells_ || !in_object_) return false;
    return true;  // absent, as FieldReader treats null
  }
  bool boolean(bool v) {
    if (in_cells_ || !in_object_) return false;
    if (field_ == Field::after_charge) r_.after_charge = v;
    else if (field_ == Field::water_added) r_.water_added = v;
    else return false;
    return true;
  }
  bool number_integer(number_integer_t v) { return number(static_cast<double>(v)); }
  bool number_unsigned(number_unsigned_t v) { return number(static_cast<double>(v)); }
  bool number_float(number_float_t v, const string_t&) { return number(v); }
  bool string(string_t& v) {
    if (in_cells_ || !in_object_) return false;
    switch (field_) {
      case Field::reading_id: return text(v, r_.reading_id);
      case Field::serial: return !v.empty() && text(v, r_.serial);
      case Field::logged_by: return text(v, r_.logged_by);
      case Field::source: return text(v, r_.source);
      case Field::note: return text(v, r_.note);
      case Field::taken_at: {
        if (v.empty() || v.size() > kTimestampTextCap) return false;
        auto t = wire::parse_timestamp(v, "taken_at");
        if (!t) return false;
        r_.taken_at = *t;
        have_ |= bit(Field::taken_at);
        return true;
      }
      default: return false;
    }
  }
  bool binary(binary_t&) { return false; }
  bool start_object(std::size_t) {
    if (in_object_) return false;  // no nested objects in a reading
    if (depth_ == 0) {
      out.batch = false;
    } else if (!(depth_ == 1 && out.batch)) {
      return false;
    }
    ++depth_;
    in_object_ = true;
    r_ = {};
    seen_ = have_ = 0;
    return true;
  }
  bool key(string_t& k) {
    const auto f = field_named(k);
    if (!f || (seen_ & bit(*f))) return false;  // unknown or repeated
    seen_ |= bit(*f);
    field_ = *f;
    return true;
  }
  bool end_object() {
    in_object_ = false;
    --depth_;
    if (!(have_ & bit(Field::taken_at)) || r_.serial.empty()) return false;
    if ((have_ & bit(Field::electrolyte_temp_c)) && (have_ & bit(Field::electrolyte_temp_f)))
      return false;
    if ((have_ & bit(Field::ambient_temp_c)) && (have_ & bit(Field::ambient_temp_f))) return false;
    out.readings.push_back(std::move(r_));
    return true;
  }
  bool start_array(std::size_t size) {
    if (depth_ == 0 && !in_object_) {
      out.batch = true;
      if (size != static_cast<std::size_t>(-1)) out.readings.reserve(size);
      ++depth_;
      return true;
    }
    if (!in_object_ || in_cells_ || field_ != Field::cell_sg) return false;
    in_cells_ = true;
    return true;
  }
  bool end_array() {
    if (in_cells_) {
      in_cells_ = false;
      return true;
    }
    --depth_;
    return true;
  }
  bool parse_error(std::size_t, const std::string&, const nlohmann::detail::exception&) {
    return false;
  }

 private:
  bool text(string_t& v, std::string& into) {
    if (v.size() > kReadingTextCap) return false;
    into = std::move(v);
    return true;
  }

  bool number(double v) {
    if (!std::isfinite(v)) return false;
    if (in_cells_) {
      r_.cell_sg.push_back(models::SpecificGravity{v});
      return true;
    }
    if (!in_object_) return false;
    switch (field_) {
      case Field::ocv_v: r_.ocv = models::Volts{v}; break;
      case Field::electrolyte_temp_c: r_.electrolyte = entered_temperature(v, wire::TempUnit::c); break;
      case Field::electrolyte_temp_f: r_.electrolyte = entered_temperature(v, wire::TempUnit::f); break;
      case Field::ambient_temp_c: r_.ambient = entered_temperature(v, wire::TempUnit::c); break;
      case Field::ambient_temp_f: r_.ambient = entered_temperature(v, wire::TempUnit::f); break;
      case Field::rest_h: r_.rest = models::Hours{v}; break;
      case Field::load_test_a: r_.load_test_current = models::Amperes{v}; break;
      case Field::load_test_end_v: r_.load_test_end = models::Volts{v}; break;
      default: return false;
    }
    have_ |= bit(field_);
    return true;
  }

  wire::ReadingInput r_;
  Field field_ = Field::count;
  std::uint32_t seen_ = 0;  // keys met in this object
  std::uint32_t have_ = 0;  // fields given a value (not null)
  int depth_ = 0;           // 1 inside the batch array or the single object, 2 in a batch item
  bool in_object_ = false;
  bool in_cells_ = false;
};

}  // namespace

std::optional<StreamedReadings> stream_readings(std::string_view body) {
  ReadingSax sax;
  if (!json::sax_parse(body, &sax)) return std::nullopt;
  return std::move(sax.out);
}

}  // namespace pbfleet::api
