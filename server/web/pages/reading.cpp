// GET /ui/readings/new and POST /ui/readings: the crew logs one reading.
//
// The form has one SG field per cell of the battery, the electrolyte
// temperature with its unit, and the hours at rest. On submit the reading
// goes through the same checks as POST /v1/readings (check_batch: battery,
// scope, validate_reading with the cell count) and the same group-commit
// writer; a refusal shows each field's error beside it and stores nothing.
// A hidden reading_id makes a resubmitted form a replay, not a duplicate.
#include <charconv>
#include <future>

#include "models/analytics/derive.hpp"
#include "models/analytics/safety.hpp"
#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/reading_intake.hpp"
#include "server/storage/tokens.hpp"
#include "server/web/html.hpp"
#include "server/web/pages/pages.hpp"
#include "server/web/pages/words.hpp"

namespace pbfleet::web::pages {
namespace wire = models::wire;
namespace {

using Errors = std::map<std::string, std::string>;  // form field -> sentence

// The form field a wire field is entered in.
std::string form_field(const std::string& wire_field) {
  if (wire_field.starts_with("cell_sg/")) {
    int index = 0;
    std::from_chars(wire_field.data() + 8, wire_field.data() + wire_field.size(), index);
    return "cell_sg_" + std::to_string(index + 1);
  }
  if (wire_field.starts_with("electrolyte_temp")) return "temp";
  return wire_field;
}

std::optional<double> read_number(const PageCall& call, const std::string& name, std::string_view allowed,
                                  Errors& errors) {
  std::string text = call.field(name);
  while (!text.empty() && text.back() == ' ') text.pop_back();
  while (!text.empty() && text.front() == ' ') text.erase(0, 1);
  if (text.empty()) return std::nullopt;
  std::replace(text.begin(), text.end(), ',', '.');
  double v = 0;
  const auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), v);
  if (ec != std::errc{} || end != text.data() + text.size()) {
    errors[name] = "not a number (accepted: " + std::string(allowed) + ")";
    return std::nullopt;
  }
  return v;
}

struct Form {
  storage::Battery battery;
  Errors errors;
  std::string summary;  // sentence above the form, when refused
};

std::string input(const PageCall& call, const Errors& errors, const std::string& name, std::string_view label,
                  std::string_view attrs, std::string_view help, const std::string& fallback = {}) {
  const auto err = errors.find(name);
  const std::string value = call.form.count(name) ? call.field(name) : fallback;
  std::string out = "<div class=\"field" + std::string(err != errors.end() ? " invalid" : "") + "\"><label for=\"" +
                    name + "\">" + std::string(label) + "</label><input id=\"" + name + "\" name=\"" + name +
                    "\" " + std::string(attrs) + " value=\"" + escape(value) + "\" aria-describedby=\"" + name +
                    "-help" + (err != errors.end() ? " " + name + "-error" : "") + "\"" +
                    (err != errors.end() ? " aria-invalid=\"true\"" : "") + "><span class=\"help\" id=\"" + name +
                    "-help\">" + std::string(help) + "</span>";
  if (err != errors.end()) out += "<span class=\"field-error\" id=\"" + name + "-error\">" + escape(err->second) + "</span>";
  return out + "</div>";
}

http::Response form_page(const PageCall& call, const Form& f, int status) {
  const auto& b = f.battery;
  const Errors& e = f.errors;
  std::string main;
  Html h(main);
  if (!f.summary.empty()) {
    h << "<p class=\"error\" role=\"alert\" id=\"form-error\">";
    h.text(f.summary) << "</p>";
  }
  h << "<form class=\"reading\" method=\"post\" action=\"/ui/readings\" novalidate>" << csrf_field(call)
    << "<input type=\"hidden\" name=\"serial\" value=\"";
  h.text(b.serial) << "\"><input type=\"hidden\" name=\"reading_id\" value=\"";
  h.text(call.form.count("reading_id") ? call.field("reading_id") : "web-" + storage::new_raw_token().substr(0, 24))
      << "\"><p>Battery <a href=\"/ui/batteries/" << url_encode(b.serial) << "\">";
  h.text(b.serial) << "</a>: " << models::to_string(b.chemistry) << ", " << std::to_string(b.cells) << " cells.</p>";
  h << input(call, e, "taken_at", "Taken at (UTC)", "autocomplete=\"off\"", "RFC 3339, e.g. 2026-12-03T07:40:00Z",
             wire::format_timestamp(call.ctx.clock.now()));
  h << input(call, e, "ocv_v", "Open-circuit voltage, V", "inputmode=\"decimal\"",
             "0 to " + number(2.5 * b.cells, 1) + " V; leave empty if not measured");
  h << input(call, e, "rest_h", "Hours at rest", "inputmode=\"decimal\"", "0 to 8784 h since the last charge or drive");
  h << "<fieldset><legend>Hydrometer SG per cell (raw, as read)</legend>";
  for (int i = 1; i <= b.cells; ++i)
    h << input(call, e, "cell_sg_" + std::to_string(i), "Cell " + std::to_string(i), "inputmode=\"decimal\" size=\"6\"",
               "1.000 to 1.400");
  const bool fahrenheit = call.field("temp_unit") == "F";
  h << "</fieldset>"
    << input(call, e, "temp", "Electrolyte temperature", "inputmode=\"decimal\" size=\"6\"",
             "-60 to 80 °C (-76 to 176 °F); needed with SG")
    << "<div class=\"field\"><label for=\"temp_unit\">Unit</label><select id=\"temp_unit\" name=\"temp_unit\">"
    << "<option value=\"C\"" << (fahrenheit ? "" : " selected") << ">°C</option><option value=\"F\""
    << (fahrenheit ? " selected" : "") << ">°F</option></select></div>"
    << "<div class=\"field check\"><input type=\"checkbox\" id=\"after_charge\" name=\"after_charge\" value=\"1\""
    << (call.field("after_charge").empty() ? "" : " checked")
    << "><label for=\"after_charge\">Charged since the last reading</label></div>"
    << "<div class=\"field check\"><input type=\"checkbox\" id=\"water_added\" name=\"water_added\" value=\"1\""
    << (call.field("water_added").empty() ? "" : " checked")
    << "><label for=\"water_added\">Water added today</label></div>"
    << input(call, e, "note", "Note", "maxlength=\"200\"", "optional, up to 200 characters")
    << "<button type=\"submit\">Save reading</button></form>";
  return html_response(document(call, "Log a reading", main), status);
}

// The reading the form describes; unparseable numbers go to `errors`.
wire::ReadingInput reading_of(const PageCall& call, const storage::Battery& b, Errors& errors) {
  wire::ReadingInput r;
  r.serial = b.serial;
  r.reading_id = call.field("reading_id");
  r.source = "dashboard";
  r.logged_by = call.viewer->caller.token_name;
  r.note = call.field("note");
  auto taken = wire::parse_timestamp(call.field("taken_at"), "taken_at");
  if (taken) {
    r.taken_at = *taken;
  } else {
    errors["taken_at"] = taken.error().detail + " (accepted: " + taken.error().allowed + ")";
  }
  if (auto v = read_number(call, "ocv_v", "volts, e.g. 12.64", errors)) r.ocv = models::Volts{*v};
  if (auto v = read_number(call, "rest_h", "hours, e.g. 8", errors)) r.rest = models::Hours{*v};
  bool any_cell = false, missing_cell = false;
  for (int i = 1; i <= b.cells; ++i) {
    const std::string name = "cell_sg_" + std::to_string(i);
    auto v = read_number(call, name, "e.g. 1.265", errors);
    if (v) {
      any_cell = true;
      r.cell_sg.push_back(models::SpecificGravity{*v});
    } else if (!errors.count(name)) {
      missing_cell = true;
    }
  }
  if (any_cell && missing_cell) {
    for (int i = 1; i <= b.cells; ++i)
      if (call.field("cell_sg_" + std::to_string(i)).empty())
        errors["cell_sg_" + std::to_string(i)] = "missing: give every cell, or none";
  }
  if (!any_cell) r.cell_sg.clear();
  if (auto t = read_number(call, "temp", "degrees, e.g. -5", errors)) {
    const bool f = call.field("temp_unit") == "F";
    auto parsed = wire::parse_temperature(number(*t, 2, "0") + (f ? "F" : "C"), f ? "electrolyte_temp_f" : "electrolyte_temp_c");
    if (parsed) r.electrolyte = *parsed;
    else errors["temp"] = parsed.error().detail;
  }
  r.after_charge = !call.field("after_charge").empty();
  r.water_added = !call.field("water_added").empty();
  return r;
}

std::string advice(const analytics::DerivedReading& d, std::vector<std::string_view>& cautions) {
  std::string out;
  auto say = [&](std::string_view text) { out += "<li>" + escape(text) + "</li>"; };
  using analytics::Flag;
  if (d.flags.has(Flag::low_soc)) {
    say("Recharge it fully, then take a settled reading.");
    cautions.push_back(analytics::kChargeCaution);
  }
  if (d.flags.has(Flag::ocv_unsettled)) say("Let it rest at least 4 h (24 h is better) and read the OCV again.");
  if (d.flags.has(Flag::surface_charge_suspected)) say("Surface charge: do not trust this OCV; read it again after rest.");
  if (d.flags.has(Flag::cell_spread) && d.weak_cell)
    say("Cell " + std::to_string(*d.weak_cell) + " reads low: check it again after a full charge.");
  if (d.flags.has(Flag::load_test_failed)) {
    say("Recharge and repeat the load test at 75 % SOC or more; if it fails again, plan a replacement.");
    cautions.push_back(analytics::kLoadTestCaution);
  }
  return out.empty() ? "<p>Nothing to do beyond the weekly round.</p>" : "<ul class=\"advice\">" + out + "</ul>";
}

http::Response saved_page(const PageCall& call, const storage::Battery& b, const storage::StoredReading& r,
                          bool replayed) {
  static const analytics::AnalyticsSettings kSettings;
  const auto d = analytics::derive(api::point_of(r), api::spec_of(b), kSettings);
  std::vector<std::string_view> cautions;
  std::string main;
  Html h(main);
  h << "<p class=\"saved\" role=\"status\" id=\"saved\">" << (replayed ? "Already saved earlier" : "Saved")
    << ": reading <code>";
  h.text(r.reading_id) << "</code> for <a href=\"/ui/batteries/" << url_encode(b.serial) << "\">";
  h.text(b.serial) << "</a>, taken " << time_text(r.taken_at) << ".</p><dl class=\"details\" id=\"derived\">"
    << "<dt>State of charge</dt><dd id=\"derived-soc\">"
    << (d.soc_percent ? number(d.soc_percent, 0) + " ± " + number(d.soc_uncertainty_percent, 0) + " %" : "not known")
    << "</dd><dt>Corrected SG (25 °C)</dt><dd>" << number(d.corrected_sg, 3) << "</dd><dt>Freezing point</dt><dd>"
    << (d.freezing_point_c ? number(d.freezing_point_c, 0) + " °C" : "–") << "</dd><dt>Flags</dt><dd id=\"derived-flags\">";
  const std::string flags = flag_words(d.flags);
  h.text(flags.empty() ? "none" : flags) << "</dd></dl><h2>What to do</h2>" << advice(d, cautions)
                                         << cautions_box(cautions) << "<p><a class=\"button\" href=\"/ui/readings/new?serial="
                                         << url_encode(b.serial) << "\">Log another for this battery</a> "
                                         << "<a class=\"button\" href=\"/ui/readings/new\">Log another battery</a></p>";
  return html_response(document(call, "Reading saved", main), replayed ? 200 : 201);
}

// The battery named by `serial` if the viewer may log for it.
std::optional<storage::Battery> loggable(const PageCall& call, const std::string& serial) {
  if (serial.empty()) return std::nullopt;
  auto b = call.ctx.store.get_battery(serial);
  if (!b || !call.in_scope(b->depot_id) || b->status != storage::BatteryStatus::in_service) return std::nullopt;
  return b.value();
}

http::Response ask_serial(const PageCall& call, int status, const std::string& error) {
  std::string main;
  Html h(main);
  if (!error.empty()) {
    h << "<p class=\"error\" role=\"alert\">";
    h.text(error) << "</p>";
  }
  h << "<form class=\"filters\" method=\"get\" action=\"/ui/readings/new\"><label for=\"serial\">Battery serial</label>"
       "<input id=\"serial\" name=\"serial\" autocomplete=\"off\" spellcheck=\"false\" required><button type=\"submit\">"
       "Next</button></form>";
  return html_response(document(call, "Log a reading", main), status);
}

}  // namespace

http::Response reading_form(const PageCall& call) {
  const std::string serial = call.query("serial");
  if (serial.empty()) return ask_serial(call, 200, {});
  auto b = loggable(call, serial);
  if (!b) return ask_serial(call, 404, "No in-service battery with serial '" + serial + "' that you may log for.");
  return form_page(call, Form{*b, {}, {}}, 200);
}

http::Response reading_submit(const PageCall& call) {
  auto b = loggable(call, call.field("serial"));
  if (!b) return ask_serial(call, 404, "No in-service battery with serial '" + call.field("serial") + "' that you may log for.");
  Form form{*b, {}, {}};
  std::vector<wire::ReadingInput> batch{reading_of(call, *b, form.errors)};
  {
    // The shared rules run even when a field did not parse, so every
    // problem is shown at once; a field's parse error stays its first.
    auto checked = api::check_batch(call.ctx.store, batch, call.ctx.clock.now(), call.viewer->caller.depot_id,
                                    [](std::size_t, const std::string& field) {
                                      return api::ProblemField{field, {}, {}, {}};
                                    });
    if (checked.storage_failed) return message_page(call, 503, "Log a reading", "The database is unavailable; nothing was stored.");
    for (const auto& p : checked.problems) {
      std::string text = p.detail;
      if (!p.allowed.empty()) text += " (allowed: " + p.allowed + ")";
      form.errors.emplace(form_field(p.field), text);
    }
  }
  if (!form.errors.empty()) {
    form.summary = std::to_string(form.errors.size()) + " field(s) need correcting; nothing was stored.";
    return form_page(call, form, 422);
  }
  std::promise<storage::StoreResult<storage::AppendOutcome>> stored;
  auto future = stored.get_future();
  api::ReadingWriter::Batch prepared{storage::prepare_reading(batch.front(), storage::spec_of(*b))};
  if (!call.ctx.writer.submit(std::move(prepared), [&stored](auto result) { stored.set_value(std::move(result)); }))
    return message_page(call, 503, "Log a reading", "The server is busy; nothing was stored. Try again.");
  auto result = future.get();
  if (!result) return message_page(call, 503, "Log a reading", "Not stored: " + result.error().detail);
  const auto& outcome = result.value();
  if (!outcome.accepted()) {
    for (const auto& p : outcome.problems) form.errors[form_field(p.field.empty() ? "reading_id" : p.field)] = p.detail;
    form.summary = "The reading was refused; nothing was stored.";
    if (form.errors.count("reading_id")) form.summary += " Reload the form to log a new reading.";
    return form_page(call, form, 409);
  }
  call.ctx.metrics.add_readings_stored(outcome.stored);
  return saved_page(call, *b, outcome.readings.front(), outcome.replayed_count > 0);
}

}  // namespace pbfleet::web::pages
