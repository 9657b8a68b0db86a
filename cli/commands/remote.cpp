#include "cli/commands/remote.hpp"

#include <algorithm>
#include <ostream>

#include <fmt/format.h>

namespace pbfleet::cli {
namespace {

using client::Json;

std::string heading(const Json& body, bool unicode) {
  std::string s;
  if (!body.is_object()) return s;
  for (const auto& [key, value] : body.items()) {
    if (value.is_primitive() && !value.is_null()) {
      s += fmt::format("{}: {}\n", column_header(key, unicode), cell_text(key, value));
    }
  }
  return s;
}

std::vector<Json> section_rows(const Json& body, const Section& section) {
  if (section.key.empty() || !body.is_object()) return rows_of(body);
  auto it = body.find(section.key);
  if (it == body.end()) return {};
  return rows_of(*it);
}

}  // namespace

std::optional<client::Api> api_or_fail(Context& ctx, int& code) {
  auto api = ctx.api();
  if (!api) {
    code = ctx.fail(kExitFailure, describe(api.error()));
    return std::nullopt;
  }
  return std::move(api).value();
}

ListResult fetch_all(const client::Api& api, const std::string& path, Query query) {
  ListResult result;
  query.emplace_back("limit", std::to_string(kPageLimit));
  std::string cursor;
  for (int page = 0; page < kMaxPages; ++page) {
    auto q = query;
    q.emplace_back("cursor", cursor);
    auto reply = api.get(client::with_query(path, q));
    if (!reply.ok) {
      result.failure = std::move(reply);
      return result;
    }
    for (const auto& item : rows_of(reply.json)) result.items.push_back(item);
    auto next = reply.json.is_object() ? reply.json.value("next_cursor", Json()) : Json();
    if (!next.is_string() || next.get<std::string>().empty()) break;
    cursor = next.get<std::string>();
  }
  return result;
}

void print_list(Context& ctx, const std::vector<Json>& items, OutputMode mode, const std::vector<std::string>& columns) {
  if (mode == OutputMode::json) {
    ctx.out() << Json(items).dump(2) << '\n';
    return;
  }
  auto style = ctx.out_style();
  auto table = rows_table(items, columns, style.unicode);
  if (mode == OutputMode::csv) {
    ctx.out() << table.render_csv();
    return;
  }
  if (items.empty()) {
    ctx.err() << "(none)\n";
    return;
  }
  ctx.out() << table.render(style);
}

void print_report_text(Context& ctx, const Json& body, const std::vector<Section>& sections) {
  auto style = ctx.out_style();
  ctx.out() << heading(body, style.unicode);
  std::vector<std::string> cautions;
  for (const auto& section : sections) {
    auto rows = section_rows(body, section);
    if (!section.title.empty()) ctx.out() << '\n' << format::paint(style, format::Tone::bold, section.title) << '\n';
    if (rows.empty()) {
      ctx.out() << "(none)\n";
      continue;
    }
    ctx.out() << rows_table(rows, section.columns, style.unicode).render(style);
    for (auto& c : cautions_of(rows)) {
      if (std::find(cautions.begin(), cautions.end(), c) == cautions.end()) cautions.push_back(std::move(c));
    }
  }
  ctx.out() << render_cautions(cautions);
}

void print_object(Context& ctx, const Json& object, OutputMode mode) {
  if (mode == OutputMode::json) {
    ctx.out() << object.dump(2) << '\n';
    return;
  }
  auto unicode = ctx.out_style().unicode;
  std::size_t width = 0;
  for (const auto& [key, value] : object.items()) width = std::max(width, column_header(key, unicode).size());
  for (const auto& [key, value] : object.items()) {
    if (!value.is_primitive() && !value.is_array()) continue;
    ctx.out() << fmt::format("{:<{}}  {}\n", column_header(key, unicode), width, cell_text(key, value));
  }
}

int run_report(Context& ctx, const std::string& path, const Query& query, OutputMode mode,
               const std::vector<Section>& sections) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto target = client::with_query(path, query);
  if (mode == OutputMode::csv) {
    auto reply = api->get(target, "text/csv");
    if (!reply.ok) return ctx.fail(reply);
    ctx.out() << reply.text;
    return kExitOk;
  }
  auto reply = api->get(target);
  if (!reply.ok) return ctx.fail(reply);
  if (mode == OutputMode::json) {
    ctx.out() << reply.json.dump(2) << '\n';
  } else {
    print_report_text(ctx, reply.json, sections);
  }
  return kExitOk;
}

}  // namespace pbfleet::cli
