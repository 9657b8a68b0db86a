// validate_reading: every problem with one reading, each naming its field and
// the allowed range. Field names follow the convention in reading.hpp.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <string_view>

#include "models/wire/reading.hpp"
#include "models/wire/text.hpp"

namespace pbfleet::models::wire {
namespace {

using std::chrono::sys_seconds;

// "%.Nf" of a limit, for the `allowed` text.
std::string fixed(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

std::string range_text(double lo, double hi, int decimals, std::string_view unit) {
  std::string s = fixed(lo, decimals) + " to " + fixed(hi, decimals);
  if (!unit.empty()) s.append(" ").append(unit);
  return s;
}

// Collects errors for one reading; each check is one small member.
class Checker {
 public:
  Checker(const ReadingInput& r, sys_seconds now, int cells) : r_(r), now_(now), cells_(cells) {}

  FieldErrors run() {
    check_reading_id();
    check_serial();
    check_taken_at();
    check_measurements_present();
    check_cell_sg();
    check_ocv();
    check_temperature(r_.electrolyte, "electrolyte_temp");
    check_temperature(r_.ambient, "ambient_temp");
    check_rest();
    check_load_test();
    check_text(r_.logged_by, "logged_by", false);
    check_text(r_.source, "source", false);
    check_text(r_.note, "note", true);
    return std::move(errors_);
  }

 private:
  void add(std::string field, std::string detail, std::string allowed) {
    errors_.push_back(FieldError{std::move(field), std::move(detail), std::move(allowed)});
  }

  // Whether v lies within [lo, hi]; NaN and infinities do not.
  static bool within(double v, double lo, double hi) {
    return std::isfinite(v) && v >= lo && v <= hi;
  }

  // A number outside its range. The texts are built only here, on failure:
  // a valid reading (nearly all of them) costs no string formatting.
  void out_of_range(double v, const std::string& field, std::string allowed) {
    add(field, field + " " + text::format_shortest(v) + " is outside the allowed range",
        std::move(allowed));
  }

  double max_voltage() const {
    return cells_ > 0 ? kMaxOcvPerCellV * cells_ : kMaxOcvUnknownCellsV;
  }

  std::string voltage_allowed() const {
    std::string s = range_text(0.0, max_voltage(), 2, "V");
    if (cells_ > 0) return s + " (" + fixed(kMaxOcvPerCellV, 2) + " V per cell)";
    return s + " (cell count unknown)";
  }

  void check_reading_id() {
    const std::string_view id = r_.reading_id;
    if (id.empty()) return;  // optional: the server assigns one
    constexpr const char* allowed = "empty, or 1 to 64 characters of A-Z a-z 0-9 . _ : -";
    if (id.size() > kMaxIdLength) return add("reading_id", "reading_id is too long", allowed);
    for (const char c : id) {
      const bool ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') ||
                      c == '.' || c == '_' || c == ':' || c == '-';
      if (!ok) return add("reading_id", "reading_id holds a character that is not allowed", allowed);
    }
  }

  void check_serial() {
    const std::string_view s = r_.serial;
    constexpr const char* allowed =
        "1 to 64 characters; no control characters, '/', '\\', '..' or leading/trailing spaces";
    const auto length = text::utf8_length(s);
    if (s.empty()) return add("serial", "serial is required", allowed);
    if (!length) return add("serial", "serial is not valid UTF-8", allowed);
    if (*length > kMaxIdLength) return add("serial", "serial is too long", allowed);
    if (text::has_control(s, false) || s.find_first_of("/\\") != std::string_view::npos ||
        s.find("..") != std::string_view::npos || text::trim(s).size() != s.size()) {
      add("serial", "serial holds a character or sequence that is not allowed", allowed);
    }
  }

  void check_taken_at() {
    const sys_seconds earliest{kEarliestReading};
    const sys_seconds latest = now_ + kMaxFutureSkew;
    if (r_.taken_at >= earliest && r_.taken_at <= latest) return;
    const std::string allowed = format_timestamp(earliest) + " to " + format_timestamp(latest) +
                                " (at most 24 h ahead of the server clock)";
    const char* why = r_.taken_at < earliest ? " is too far in the past" : " is in the future";
    add("taken_at", "taken_at " + format_timestamp(r_.taken_at) + why, allowed);
  }

  void check_measurements_present() {
    if (r_.ocv || !r_.cell_sg.empty()) return;
    add("ocv_v", "a reading needs ocv_v, cell_sg or both", "ocv_v and/or cell_sg");
  }

  void check_cell_sg() {
    const auto n = r_.cell_sg.size();
    if (n == 0) return;
    if ((cells_ > 0 && n != static_cast<std::size_t>(cells_)) || n > std::size_t{kMaxCells}) {
      add("cell_sg", "cell_sg has " + std::to_string(n) + " values",
          cells_ > 0 ? std::to_string(cells_) + " values, one per cell"
                     : "1 to " + std::to_string(kMaxCells) + " values, one per cell");
    }
    // Values past kMaxCells are already wrong by count; checking them one by
    // one would only let a huge list make a huge error list.
    for (std::size_t i = 0; i < std::min(n, std::size_t{kMaxCells}); ++i) {
      const double sg = r_.cell_sg[i].value;
      if (!within(sg, kMinSg, kMaxSg))
        out_of_range(sg, "cell_sg/" + std::to_string(i), range_text(kMinSg, kMaxSg, 3, ""));
    }
    if (!r_.electrolyte) {
      add("electrolyte_temp_c", "electrolyte temperature is required with cell_sg",
          range_text(kMinTempC, kMaxTempC, 0, "C"));
    }
  }

  void check_ocv() {
    if (r_.ocv && !within(r_.ocv->value, 0.0, max_voltage()))
      out_of_range(r_.ocv->value, "ocv_v", voltage_allowed());
  }

  void check_temperature(const std::optional<EnteredTemperature>& t, const std::string& base) {
    if (!t) return;
    if (within(t->value.value, kMinTempC, kMaxTempC)) return;
    if (t->unit == TempUnit::f) {
      const std::string allowed =
          range_text(fahrenheit_from_celsius(Celsius{kMinTempC}),
                     fahrenheit_from_celsius(Celsius{kMaxTempC}), 0, "F") +
          " (" + range_text(kMinTempC, kMaxTempC, 0, "C") + ")";
      const double f = fahrenheit_from_celsius(t->value);
      return add(base + "_f", base + "_f " + text::format_shortest(f) +
                                  " F is outside the allowed range", allowed);
    }
    out_of_range(t->value.value, base + "_c", range_text(kMinTempC, kMaxTempC, 0, "C"));
  }

  void check_rest() {
    if (r_.rest && !within(r_.rest->value, 0.0, kMaxRestH))
      out_of_range(r_.rest->value, "rest_h", range_text(0, kMaxRestH, 0, "h"));
  }

  void check_load_test() {
    const auto& amps = r_.load_test_current;
    const auto& end = r_.load_test_end;
    if (amps && !within(amps->value, 0.0, kMaxLoadTestA))
      out_of_range(amps->value, "load_test_a", range_text(0, kMaxLoadTestA, 0, "A"));
    if (end && !within(end->value, 0.0, max_voltage()))
      out_of_range(end->value, "load_test_end_v", voltage_allowed());
    if (amps && !end) {
      add("load_test_end_v", "a load test needs its end voltage", "given together with load_test_a");
    }
    if (end && !amps) {
      add("load_test_a", "a load test needs its current", "given together with load_test_end_v");
    }
  }

  void check_text(std::string_view s, std::string_view field_name, bool multiline) {
    if (s.empty()) return;
    const std::string field(field_name);
    const auto allowed = [&] {
      return "at most " + std::to_string(kMaxTextLength) + " characters of UTF-8 text" +
             (multiline ? "" : " without control characters");
    };
    const auto length = text::utf8_length(s);
    if (!length) return add(field, field + " is not valid UTF-8", allowed());
    if (*length > kMaxTextLength) {
      return add(field, field + " has " + std::to_string(*length) + " characters", allowed());
    }
    if (text::has_control(s, multiline)) add(field, field + " holds control characters", allowed());
  }

  const ReadingInput& r_;
  sys_seconds now_;
  int cells_;
  FieldErrors errors_;
};

}  // namespace

FieldErrors validate_reading(const ReadingInput& reading, sys_seconds now, int cells) {
  return Checker(reading, now, cells).run();
}

}  // namespace pbfleet::models::wire
