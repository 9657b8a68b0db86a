#include "server/api/reading_stream.hpp"

#include <array>
#include <charconv>
#include <cmath>
#include <cstdint>
#include <string>

#include "server/api/reading_codec.hpp"

namespace pbfleet::api {

namespace wire = models::wire;

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
    if (kNames[i].size() == key.size() && kNames[i] == key) return static_cast<Field>(i);
  return std::nullopt;
}

// No key of a reading is longer: a longer key is not one of them.
constexpr std::size_t kLongestName = [] {
  std::size_t most = 0;
  for (const auto name : kNames) most = name.size() > most ? name.size() : most;
  return most;
}();

constexpr std::uint32_t bit(Field f) { return 1u << static_cast<unsigned>(f); }

int hex_digit(char c) {
  if (c >= '0' && c <= '9') return c - '0';
  if (c >= 'a' && c <= 'f') return c - 'a' + 10;
  if (c >= 'A' && c <= 'F') return c - 'A' + 10;
  return -1;
}

void put_utf8(std::string& out, std::uint32_t cp) {
  if (cp < 0x80) {
    out += static_cast<char>(cp);
  } else if (cp < 0x800) {
    out += static_cast<char>(0xC0 | (cp >> 6));
    out += static_cast<char>(0x80 | (cp & 0x3F));
  } else if (cp < 0x10000) {
    out += static_cast<char>(0xE0 | (cp >> 12));
    out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (cp & 0x3F));
  } else {
    out += static_cast<char>(0xF0 | (cp >> 18));
    out += static_cast<char>(0x80 | ((cp >> 12) & 0x3F));
    out += static_cast<char>(0x80 | ((cp >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (cp & 0x3F));
  }
}

// One pass over the body. Every read_* returns false the moment the text
// is not of the plain shape (or not JSON at all); nothing is worded here,
// since the tree reader reads such a body again and words its problems.
class Scanner {
 public:
  explicit Scanner(std::string_view body) : p_(body.data()), end_(body.data() + body.size()) {}

  bool read_body(StreamedReadings& out) {
    skip_space();
    if (p_ == end_) return false;
    if (*p_ == '[') {
      ++p_;
      out.batch = true;
      skip_space();
      if (p_ != end_ && *p_ == ']') {
        ++p_;
      } else {
        for (bool closed = false; !closed;) {
          skip_space();
          if (!read_reading(out.readings.emplace_back()) || !after_item(']', closed)) return false;
        }
      }
    } else {
      out.batch = false;
      if (!read_reading(out.readings.emplace_back())) return false;
    }
    skip_space();
    return p_ == end_;
  }

 private:
  void skip_space() {
    while (p_ != end_ && (*p_ == ' ' || *p_ == '\n' || *p_ == '\r' || *p_ == '\t')) ++p_;
  }

  // After an item of an array or object: a comma (true), the closing
  // bracket (true, `closed` set) or anything else (false).
  bool after_item(char close, bool& closed) {
    skip_space();
    if (p_ == end_) return false;
    const char c = *p_++;
    closed = c == close;
    return closed || c == ',';
  }

  bool literal(std::string_view word) {
    if (static_cast<std::size_t>(end_ - p_) < word.size() ||
        std::string_view(p_, word.size()) != word)
      return false;
    p_ += word.size();
    return true;
  }

  // A reading object: known keys at most once, each value of its kind.
  bool read_reading(wire::ReadingInput& r) {
    if (p_ == end_ || *p_ != '{') return false;
    ++p_;
    std::uint32_t seen = 0;  // keys met in this object
    std::uint32_t have = 0;  // fields given a value (not null)
    skip_space();
    if (p_ != end_ && *p_ == '}') {
      ++p_;
    } else {
      for (;;) {
        skip_space();
        if (!read_string(key_, kLongestName)) return false;
        const auto f = field_named(key_);
        if (!f || (seen & bit(*f))) return false;  // unknown or repeated
        seen |= bit(*f);
        skip_space();
        if (p_ == end_ || *p_++ != ':') return false;
        skip_space();
        if (p_ == end_) return false;
        if (*p_ == 'n') {
          if (!literal("null")) return false;  // null counts as absent
        } else {
          if (!read_value(*f, r)) return false;
          have |= bit(*f);
        }
        bool closed = false;
        if (!after_item('}', closed)) return false;
        if (closed) break;
      }
    }
    if (!(have & bit(Field::taken_at)) || r.serial.empty()) return false;
    if ((have & bit(Field::electrolyte_temp_c)) && (have & bit(Field::electrolyte_temp_f)))
      return false;
    return !((have & bit(Field::ambient_temp_c)) && (have & bit(Field::ambient_temp_f)));
  }

  bool read_value(Field f, wire::ReadingInput& r) {
    switch (f) {
      case Field::reading_id: return read_string(r.reading_id, kReadingTextCap);
      case Field::serial: return read_string(r.serial, kReadingTextCap) && !r.serial.empty();
      case Field::logged_by: return read_string(r.logged_by, kReadingTextCap);
      case Field::source: return read_string(r.source, kReadingTextCap);
      case Field::note: return read_string(r.note, kReadingTextCap);
      case Field::taken_at: {
        if (!read_string(key_, kTimestampTextCap) || key_.empty()) return false;
        auto t = wire::parse_timestamp(key_, "taken_at");
        if (!t) return false;
        r.taken_at = *t;
        return true;
      }
      case Field::after_charge: return read_bool(r.after_charge);
      case Field::water_added: return read_bool(r.water_added);
      case Field::cell_sg: return read_cells(r);
      default: break;
    }
    double v = 0;
    if (!read_number(v)) return false;
    switch (f) {
      case Field::ocv_v: r.ocv = models::Volts{v}; break;
      case Field::electrolyte_temp_c: r.electrolyte = entered_temperature(v, wire::TempUnit::c); break;
      case Field::electrolyte_temp_f: r.electrolyte = entered_temperature(v, wire::TempUnit::f); break;
      case Field::ambient_temp_c: r.ambient = entered_temperature(v, wire::TempUnit::c); break;
      case Field::ambient_temp_f: r.ambient = entered_temperature(v, wire::TempUnit::f); break;
      case Field::rest_h: r.rest = models::Hours{v}; break;
      case Field::load_test_a: r.load_test_current = models::Amperes{v}; break;
      case Field::load_test_end_v: r.load_test_end = models::Volts{v}; break;
      default: return false;
    }
    return true;
  }

  template <class Flag>
  bool read_bool(Flag& into) {
    if (literal("true")) {
      into = true;
      return true;
    }
    if (literal("false")) {
      into = false;
      return true;
    }
    return false;
  }

  bool read_cells(wire::ReadingInput& r) {
    if (*p_ != '[') return false;
    ++p_;
    skip_space();
    if (p_ != end_ && *p_ == ']') {
      ++p_;
      return true;
    }
    for (bool closed = false; !closed;) {
      skip_space();
      double v = 0;
      if (!read_number(v)) return false;
      r.cell_sg.push_back(models::SpecificGravity{v});
      if (!after_item(']', closed)) return false;
    }
    return true;
  }

  // Past a run of decimal digits; false when there was none.
  bool skip_digits() {
    const char* start = p_;
    while (p_ != end_ && *p_ >= '0' && *p_ <= '9') ++p_;
    return p_ != start;
  }

  // A JSON number (RFC 8259 section 6), finite, to the nearest double.
  bool read_number(double& out) {
    const char* start = p_;
    if (p_ != end_ && *p_ == '-') ++p_;
    if (p_ == end_) return false;
    if (*p_ == '0') {
      ++p_;  // no digits may follow a leading zero
    } else if (!skip_digits()) {
      return false;
    }
    bool integer = true;
    if (p_ != end_ && *p_ == '.') {
      integer = false;
      ++p_;
      if (!skip_digits()) return false;
    }
    if (p_ != end_ && (*p_ == 'e' || *p_ == 'E')) {
      integer = false;
      ++p_;
      if (p_ != end_ && (*p_ == '+' || *p_ == '-')) ++p_;
      if (!skip_digits()) return false;
    }
    const auto [at, ec] = std::from_chars(start, p_, out);
    if (ec != std::errc{} || at != p_ || !std::isfinite(out)) return false;
    if (integer) out += 0.0;  // "-0" is the integer 0, as the tree reads it
    return true;
  }

  // A JSON string into `into` (UTF-8, escapes decoded), at most cap bytes.
  bool read_string(std::string& into, std::size_t cap) {
    if (p_ == end_ || *p_ != '"') return false;
    ++p_;
    into.clear();
    for (;;) {
      const char* run = p_;
      while (p_ != end_ && static_cast<unsigned char>(*p_) >= 0x20 &&
             static_cast<unsigned char>(*p_) < 0x80 && *p_ != '"' && *p_ != '\\')
        ++p_;
      into.append(run, p_);
      if (p_ == end_) return false;
      const auto c = static_cast<unsigned char>(*p_);
      if (c == '"') {
        ++p_;
        return into.size() <= cap;
      }
      if (c < 0x20) return false;  // a control character must be escaped
      if (c == '\\') {
        if (!read_escape(into)) return false;
      } else if (!read_utf8(into)) {
        return false;
      }
      if (into.size() > cap) return false;
    }
  }

  bool read_escape(std::string& into) {
    ++p_;  // the backslash
    if (p_ == end_) return false;
    switch (*p_++) {
      case '"': into += '"'; return true;
      case '\\': into += '\\'; return true;
      case '/': into += '/'; return true;
      case 'b': into += '\b'; return true;
      case 'f': into += '\f'; return true;
      case 'n': into += '\n'; return true;
      case 'r': into += '\r'; return true;
      case 't': into += '\t'; return true;
      case 'u': break;
      default: return false;
    }
    std::uint32_t cp = 0;
    if (!read_hex4(cp)) return false;
    if (cp >= 0xDC00 && cp <= 0xDFFF) return false;  // a low surrogate alone
    if (cp >= 0xD800 && cp <= 0xDBFF) {
      std::uint32_t low = 0;
      if (!literal("\\u") || !read_hex4(low) || low < 0xDC00 || low > 0xDFFF) return false;
      cp = 0x10000 + ((cp - 0xD800) << 10) + (low - 0xDC00);
    }
    put_utf8(into, cp);
    return true;
  }

  bool read_hex4(std::uint32_t& cp) {
    if (end_ - p_ < 4) return false;
    for (int i = 0; i < 4; ++i) {
      const int d = hex_digit(*p_++);
      if (d < 0) return false;
      cp = cp * 16 + static_cast<std::uint32_t>(d);
    }
    return true;
  }

  // One well-formed UTF-8 sequence of two to four bytes (RFC 3629 section 4).
  bool read_utf8(std::string& into) {
    const auto lead = static_cast<unsigned char>(*p_);
    int follow = 0;
    unsigned char lo = 0x80, hi = 0xBF;  // the range of the second byte
    if (lead >= 0xC2 && lead <= 0xDF) {
      follow = 1;
    } else if (lead >= 0xE0 && lead <= 0xEF) {
      follow = 2;
      if (lead == 0xE0) lo = 0xA0;
      if (lead == 0xED) hi = 0x9F;
    } else if (lead >= 0xF0 && lead <= 0xF4) {
      follow = 3;
      if (lead == 0xF0) lo = 0x90;
      if (lead == 0xF4) hi = 0x8F;
    } else {
      return false;
    }
    if (end_ - p_ <= follow) return false;
    for (int i = 1; i <= follow; ++i) {
      const auto c = static_cast<unsigned char>(p_[i]);
      if (c < (i == 1 ? lo : 0x80) || c > (i == 1 ? hi : 0xBF)) return false;
    }
    into.append(p_, p_ + follow + 1);
    p_ += follow + 1;
    return true;
  }

  const char* p_;
  const char* end_;
  std::string key_;  // scratch for keys and timestamps
};

}  // namespace

std::optional<StreamedReadings> stream_readings(std::string_view body) {
  StreamedReadings out;
  if (!Scanner(body).read_body(out)) return std::nullopt;
  return out;
}

}  // namespace pbfleet::api
