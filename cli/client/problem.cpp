#include "cli/client/problem.hpp"

#include <nlohmann/json.hpp>

namespace pbfleet::cli::client {
namespace {

using nlohmann::json;

constexpr int kStatusConflict = 409;
constexpr int kStatusUnprocessable = 422;
constexpr std::size_t kMaxPlainDetail = 200;  // keep a stray HTML page from flooding the terminal

std::string text_of(const json& j, const char* key) {
  auto it = j.find(key);
  return it != j.end() && it->is_string() ? it->get<std::string>() : "";
}

ProblemField field_of(const json& e) {
  ProblemField f{text_of(e, "field"), text_of(e, "detail"), text_of(e, "allowed"), std::nullopt};
  if (auto it = e.find("row"); it != e.end() && it->is_number_integer()) f.row = it->get<int>();
  return f;
}

std::string first_line(std::string_view body) {
  auto line = body.substr(0, body.find('\n'));
  return std::string(line.substr(0, kMaxPlainDetail));
}

}  // namespace

Problem parse_problem(int status, std::string_view body) {
  Problem p;
  p.status = status;
  auto j = json::parse(body, nullptr, /*allow_exceptions=*/false);
  if (!j.is_object()) {
    p.detail = first_line(body);
    return p;
  }
  auto type = text_of(j, "type");
  p.slug = type.substr(type.rfind('/') + 1);
  p.title = text_of(j, "title");
  p.detail = text_of(j, "detail");
  if (auto it = j.find("status"); it != j.end() && it->is_number_integer()) p.status = it->get<int>();
  if (auto it = j.find("errors"); it != j.end() && it->is_array()) {
    for (const auto& e : *it) {
      if (e.is_object()) p.errors.push_back(field_of(e));
    }
  }
  return p;
}

std::string render_problem(const Problem& p, int row_offset) {
  std::string out = "error: server answered " + std::to_string(p.status);
  if (!p.title.empty()) out += " " + p.title;
  if (!p.detail.empty()) out += ": " + p.detail;
  out += "\n";
  for (const auto& e : p.errors) {
    out += "  ";
    if (e.row) out += "row " + std::to_string(*e.row + row_offset) + "  ";
    out += e.field.empty() ? std::string("(request)") : e.field;
    out += ": " + e.detail;
    if (!e.allowed.empty()) out += " (allowed: " + e.allowed + ")";
    out += "\n";
  }
  return out;
}

bool is_data_rejection(const Problem& problem) {
  return problem.status == kStatusUnprocessable || problem.status == kStatusConflict;
}

}  // namespace pbfleet::cli::client
