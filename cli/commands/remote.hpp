// Steps shared by the commands that talk to pbfleetd: follow a paginated
// list to its end, and print a list, a report or one object as text, JSON
// or CSV.
#pragma once

#include <optional>
#include <string>
#include <utility>
#include <vector>

#include "cli/commands/context.hpp"
#include "cli/commands/render.hpp"

namespace pbfleet::cli {

// Page size asked for (the server's maximum, server/api/CONTRACT.md) and a
// bound on pages, so a server bug cannot loop us forever (1000 x 1000 rows).
inline constexpr int kPageLimit = 1000;
inline constexpr int kMaxPages = 1000;

using Query = std::vector<std::pair<std::string, std::string>>;

// Every item of a list route, following next_cursor. On failure the reply
// that failed is returned in `failure`.
struct ListResult {
  std::vector<client::Json> items;
  std::optional<client::Reply> failure;
};
ListResult fetch_all(const client::Api& api, const std::string& path, Query query);

// One section of a report: the member holding its rows and the columns a
// person wants first. An empty key means "the first list in the answer".
struct Section {
  std::string key;
  std::string title;
  std::vector<std::string> columns;
};

// Prints list items: a table (text), a JSON array, or CSV.
void print_list(Context& ctx, const std::vector<client::Json>& items, OutputMode mode,
                const std::vector<std::string>& columns);

// Prints a report answer in text: its plain top-level fields as a heading,
// then each section's table, then the safety cautions its rows carry.
void print_report_text(Context& ctx, const client::Json& body, const std::vector<Section>& sections);

// Prints one object as "label  value" lines (text) or JSON.
void print_object(Context& ctx, const client::Json& object, OutputMode mode);

// GETs a report and prints it: JSON as the server sent it, CSV straight
// from the server (Accept: text/csv), or text. Returns the exit code.
int run_report(Context& ctx, const std::string& path, const Query& query, OutputMode mode,
               const std::vector<Section>& sections);

// The API client, or an error printed and exit code 1 in `code`.
std::optional<client::Api> api_or_fail(Context& ctx, int& code);

}  // namespace pbfleet::cli
