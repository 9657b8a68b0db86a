// POST /v1/readings (JSON object, JSON array or text/csv; atomic batch,
// idempotent on reading_id) and GET /v1/readings (paged list).
//
// parse (JSON or CSV) -> check_batch (battery, cell count, validate_reading)
// -> group-commit writer -> 201 with derived values after COMMIT.
#include "models/analytics/derive.hpp"
#include "models/wire/csv.hpp"
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/reading_codec.hpp"
#include "server/api/reading_stream.hpp"
#include "server/api/services/analytics_adapter.hpp"
#include "server/api/services/reading_intake.hpp"

namespace pbfleet::api::handlers {

namespace wire = models::wire;
using nlohmann::json;

namespace {

// A decoded body: the readings and how to name their fields in problems.
struct Parsed {
  std::vector<wire::ReadingInput> readings;
  FieldNamer name;
};

// Problems in item i of a batch are named "/i/field"; in a single reading "/field".
FieldNamer json_namer(bool batch) {
  return [batch](std::size_t i, const std::string& field) {
    return ProblemField{(batch ? "/" + std::to_string(i) : std::string{}) + "/" + field, {}, {}, {}};
  };
}

std::variant<Parsed, http::Response> parse_json(const Call& call) {
  // The plain shape in one scanning pass (reading_stream.hpp); anything else
  // through the tree, which words the problems.
  if (media_type(call.request.header("content-type")) == "application/json") {
    if (auto streamed = stream_readings(call.request.body))
      return Parsed{std::move(streamed->readings), json_namer(streamed->batch)};
  }
  auto body = json_body(call.request);
  if (auto* refused = std::get_if<http::Response>(&body)) return std::move(*refused);
  const json& doc = std::get<json>(body);
  const bool batch = doc.is_array();
  Issues issues;
  Parsed out;
  auto read_one = [&](const json& item, const std::string& base) {
    FieldReader in(item, base, issues);
    out.readings.push_back(read_reading(in));
  };
  if (batch) {
    for (std::size_t i = 0; i < doc.size(); ++i) read_one(doc[i], "/" + std::to_string(i));
  } else {
    read_one(doc, "");
  }
  if (!issues.empty()) return issues.to_problem();
  out.name = json_namer(batch);
  return out;
}

std::variant<Parsed, http::Response> parse_csv(const Call& call) {
  auto parsed = wire::parse_reading_csv(call.request.body);
  if (!parsed) {
    const auto& e = parsed.error();
    return problem(ProblemKind::malformed_body, e.detail,
                   {{e.field.empty() ? "header" : e.field, e.detail, e.allowed, {}}});
  }
  if (!parsed->errors.empty()) {
    std::vector<ProblemField> fields;
    for (const auto& e : parsed->errors)
      fields.push_back({wire::csv_column_for_field(e.error.field), e.error.detail,
                        e.error.allowed, e.row});
    return problem(ProblemKind::validation_failed,
                   std::to_string(fields.size()) + " problem(s) in the CSV; nothing was stored",
                   fields);
  }
  Parsed out;
  out.readings = std::move(parsed->readings);
  out.name = [rows = std::move(parsed->rows)](std::size_t i, const std::string& field) {
    return ProblemField{wire::csv_column_for_field(field), {}, {}, rows.at(i)};
  };
  return out;
}

std::variant<Parsed, http::Response> parse_body(const Call& call) {
  const std::string type = media_type(call.request.header("content-type"));
  if (type == "text/csv") return parse_csv(call);
  return parse_json(call);  // refuses other media types with 415
}

// Rows the store refused (reading_id reused with other content, or a
// battery that vanished meanwhile): 409 when any conflict, else 422.
http::Response refused_rows(const storage::AppendOutcome& outcome, const FieldNamer& name) {
  std::vector<ProblemField> fields;
  bool conflict = false;
  for (const auto& p : outcome.problems) {
    conflict = conflict || p.code == storage::StoreErrc::conflict;
    auto f = name(p.row, p.field.empty() ? "reading_id" : p.field);
    f.detail = p.detail;
    fields.push_back(std::move(f));
  }
  if (conflict)
    return problem(ProblemKind::conflict,
                   "a reading_id was stored before with different content; nothing was stored",
                   fields);
  return problem(ProblemKind::validation_failed, "batch refused; nothing was stored", fields);
}

// {"stored":N,"replayed":M,"readings":[{...}]}, each reading's members
// written by `members(out, index, replayed)`.
template <class Members>
std::string outcome_body(const storage::AppendOutcome& outcome, std::size_t bytes_per_reading,
                         Members members) {
  std::string body;
  body.reserve(64 + outcome.readings.size() * bytes_per_reading);
  JsonText out(body);
  out.begin_object()
      .member("stored", outcome.stored)
      .member("replayed", outcome.replayed_count)
      .key("readings")
      .begin_array();
  for (std::size_t i = 0; i < outcome.readings.size(); ++i) {
    out.begin_object();
    members(out, i, i < outcome.replayed.size() && outcome.replayed[i]);
    out.end_object();
  }
  out.end_array().end_object();
  return body;
}

using BatteriesBySerial = std::map<std::string, storage::Battery>;

// Each reading of the batch derived once, on the request's worker thread,
// under its battery's spec (default settings): for the answer, and for the
// facts the store keeps. A replay answers with the stored original, whose
// content (so derivation) is the same. nullopt for a battery the batch was
// not checked against (the batch is then refused anyway).
using Derivations = std::vector<std::optional<analytics::DerivedReading>>;

// The 201/200 body: every reading as stored, with its derived values.
std::string stored_body(const storage::AppendOutcome& outcome, const Derivations& derived) {
  return outcome_body(outcome, 900, [&](JsonText& out, std::size_t i, bool replayed) {
    write_reading_members(out, outcome.readings[i]);
    out.member("replayed", replayed);
    if (i < derived.size() && derived[i]) {
      out.key("derived");
      write_derived(out, *derived[i]);
    }
  });
}

// The body asked for with "Prefer: return=minimal" (RFC 7240), for bulk
// clients that keep what they sent: the counts, each reading's id and its
// flags (what needs the crew's attention; empty when nothing does).
std::string minimal_body(const storage::AppendOutcome& outcome, const Derivations& derived) {
  return outcome_body(outcome, 64, [&](JsonText& out, std::size_t i, bool replayed) {
    const auto& r = outcome.readings[i];
    out.member("reading_id", r.reading_id).member("replayed", replayed).key("flags").begin_array();
    if (i < derived.size() && derived[i])
      for (auto word : derived[i]->flags.words()) out.value(word);
    out.end_array();
  });
}

// Derivations, fingerprints and facts worked out here, on the request's
// worker thread, under the spec of each battery as the intake check found
// it: the writer thread only stores.
struct Prepared {
  ReadingWriter::Batch batch;
  Derivations derived;
};

Prepared prepare(std::vector<wire::ReadingInput> readings, const BatteriesBySerial& batteries) {
  static const analytics::AnalyticsSettings settings;
  std::map<std::string_view, models::BatterySpec> specs;
  for (const auto& [serial, battery] : batteries) specs.emplace(serial, spec_of(battery));
  Prepared out;
  out.batch.reserve(readings.size());
  out.derived.reserve(readings.size());
  for (auto& r : readings) {
    const auto spec = specs.find(r.serial);
    if (spec == specs.end()) {
      out.derived.emplace_back();
      out.batch.push_back(storage::prepare_reading(std::move(r), std::nullopt));
      continue;
    }
    out.derived.push_back(analytics::derive(point_of(r), spec->second, settings));
    out.batch.push_back(storage::prepare_reading(std::move(r), spec->second, *out.derived.back()));
  }
  return out;
}

}  // namespace

void post_readings(const Call& call, http::Reply reply) {
  // Parsing and deriving take turns for a core, leaving one to the writer
  // (reading_writer.hpp). Not held across check_batch, which may wait on
  // the database (PostgreSQL): that would queue the requests' round trips.
  std::optional<ReadingWriter::PrepareSlot> slot(std::in_place, call.ctx.writer);
  auto parsed = parse_body(call);
  slot.reset();
  if (auto* refused = std::get_if<http::Response>(&parsed)) return reply(std::move(*refused));
  auto& [readings, name] = std::get<Parsed>(parsed);
  if (readings.empty())
    return reply(problem(ProblemKind::validation_failed, "the batch holds no reading",
                         {{"/", "send one reading or a non-empty array", "1 or more readings", {}}}));
  const auto scope = call.caller ? call.caller->depot_id : std::nullopt;
  auto checked = check_batch(call.ctx.store, readings, call.ctx.clock.now(), scope, name);
  if (checked.storage_failed) return reply(store_problem(checked.storage_error));
  if (!checked.problems.empty())
    return reply(problem(ProblemKind::validation_failed,
                         std::to_string(checked.problems.size()) +
                             " field(s) invalid; nothing was stored",
                         checked.problems));
  slot.emplace(call.ctx.writer);
  Prepared prepared = prepare(std::move(readings), checked.batteries);
  slot.reset();
  Metrics& metrics = call.ctx.metrics;
  const bool minimal = prefers(call.request.header("prefer"), "return=minimal");
  auto done = [reply, name = name, derived = std::move(prepared.derived), &metrics,
               minimal](storage::StoreResult<storage::AppendOutcome> result) {
    if (!result) return reply(store_problem(result.error()));
    const auto& outcome = result.value();
    if (!outcome.accepted()) return reply(refused_rows(outcome, name));
    metrics.add_readings_stored(outcome.stored);
    const int status = outcome.stored > 0 ? 201 : 200;
    if (!minimal) return reply(json_text_response(status, stored_body(outcome, derived)));
    auto response = json_text_response(status, minimal_body(outcome, derived));
    response.headers.emplace_back("Preference-Applied", "return=minimal");
    reply(std::move(response));
  };
  if (!call.ctx.writer.submit(std::move(prepared.batch), std::move(done)))
    reply(problem(ProblemKind::storage_unavailable, "too many writes queued; retry shortly"));
}

http::Response list_readings(const Call& call) {
  Issues issues;
  auto page = page_request(call.query("limit"), call.query("cursor"), issues);
  storage::ReadingFilter filter;
  if (const auto* serial = call.query("serial")) filter.serial = *serial;
  for (const char* key : {"from", "to"}) {
    const auto* text = call.query(key);
    if (!text) continue;
    auto t = wire::parse_timestamp(*text, key);
    if (!t) {
      issues.invalid.push_back({key, t.error().detail, t.error().allowed, {}});
      continue;
    }
    (std::string_view(key) == "from" ? filter.from : filter.to) = *t;
  }
  if (!issues.empty()) return problem(ProblemKind::bad_query, "bad query", issues.invalid);
  if (call.caller && call.caller->depot_id) {
    // A depot-scoped token lists one battery at a time, within its depot.
    if (!filter.serial)
      return problem(ProblemKind::bad_query, "a depot-scoped token must give ?serial=",
                     {{"serial", "required for depot-scoped tokens", "a battery serial", {}}});
    auto battery = call.ctx.store.get_battery(*filter.serial);
    if (!battery || !in_scope(call, battery->depot_id))
      return problem(ProblemKind::not_found, "no battery with serial '" + *filter.serial + "'");
  }
  auto result = call.ctx.store.list_readings(filter, page);
  if (!result) return store_problem(result.error());
  std::string body;
  body.reserve(64 + result->items.size() * 400);
  JsonText out(body);
  out.begin_object().key("items").begin_array();
  for (const auto& r : result->items) {
    out.begin_object();
    write_reading_members(out, r);
    out.end_object();
  }
  out.end_array().key("next_cursor");
  if (result->next_cursor.empty()) out.null();
  else out.value(result->next_cursor);
  out.end_object();
  return json_text_response(200, std::move(body));
}

}  // namespace pbfleet::api::handlers
