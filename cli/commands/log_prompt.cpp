// Asking for one reading on a terminal: temperature, then SG cell by cell,
// then OCV and rest. Each answer is checked as it is typed and asked again
// when it does not parse or is out of range, so one slip does not lose the
// whole round.
#include <charconv>
#include <ostream>

#include <fmt/format.h>

#include "cli/commands/log.hpp"
#include "cli/commands/prompt.hpp"

namespace pbfleet::cli {
namespace {

// A wrong answer is asked again this many times before giving up.
constexpr int kTries = 3;

std::optional<double> number(const std::string& text) {
  double value = 0;
  auto [end, ec] = std::from_chars(text.data(), text.data() + text.size(), value);
  if (ec != std::errc{} || end != text.data() + text.size()) return std::nullopt;
  return value;
}

enum class Answer { value, blank, ended };

// Asks until `accept` takes the answer (it prints why not otherwise).
template <class Accept>
Answer ask_until(Context& ctx, const std::string& question, Accept accept) {
  for (int attempt = 0; attempt < kTries; ++attempt) {
    auto line = ask(ctx, question);
    if (!line) return Answer::ended;
    if (line->empty()) return Answer::blank;
    if (accept(*line)) return Answer::value;
  }
  return Answer::ended;
}

bool ask_temperature(LogFlags& f, Context& ctx) {
  auto answer = ask_until(ctx, "Electrolyte temperature (e.g. 41F or 5C): ", [&](const std::string& text) {
    auto t = models::wire::parse_temperature(text, "temperature");
    if (!t) ctx.err() << "  " << describe(t.error()) << '\n';
    if (t) f.temp = text;
    return t.ok();
  });
  return answer != Answer::ended;
}

// A number within [lo, hi], or blank.
Answer ask_number(Context& ctx, const std::string& question, double lo, double hi, std::optional<double>& out) {
  return ask_until(ctx, question, [&](const std::string& text) {
    auto v = number(text);
    if (!v || *v < lo || *v > hi) {
      ctx.err() << fmt::format("  '{}' is not a number from {} to {}\n", text, lo, hi);
      return false;
    }
    out = v;
    return true;
  });
}

bool ask_cells(LogFlags& f, Context& ctx) {
  int blanks = 0;
  for (int cell = 1; cell <= f.cells; ++cell) {
    std::optional<double> sg;
    auto answer = ask_number(ctx, fmt::format("Cell {} SG: ", cell), models::wire::kMinSg, models::wire::kMaxSg, sg);
    if (answer == Answer::ended) return false;
    if (answer == Answer::blank) {
      if (cell == 1) return true;  // no hydrometer readings this time
      if (++blanks >= kTries) return false;
      ctx.err() << "  every cell needs a value once the first is given\n";
      --cell;
      continue;
    }
    f.cell_sg.push_back(*sg);
  }
  return true;
}

bool ask_ocv(LogFlags& f, Context& ctx) {
  const double max_v = models::wire::kMaxOcvPerCellV * f.cells;
  if (ask_number(ctx, "OCV in volts (blank to skip): ", 0.0, max_v, f.ocv_v) == Answer::ended) return false;
  if (!f.ocv_v) return true;
  return ask_number(ctx, "Hours at rest before the OCV: ", 0.0, models::wire::kMaxRestH, f.rest_h) != Answer::ended;
}

}  // namespace

bool ask_for_reading(LogFlags& f, Context& ctx) {
  ctx.err() << "Reading for " << f.serial << " (blank skips a value; Ctrl-D stops)\n";
  if (!ask_temperature(f, ctx) || !ask_cells(f, ctx) || !ask_ocv(f, ctx)) return false;
  return f.has_values();
}

}  // namespace pbfleet::cli
