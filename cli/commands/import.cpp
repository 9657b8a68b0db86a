// `pbfleet import FILE.csv`: a round of readings from CSV. Parsed and
// validated here first (every bad row reported, nothing sent), then sent in
// chunks that the server stores atomically. Row ids come from the row
// content, so running the same import again stores nothing twice.
#include <fstream>
#include <ostream>
#include <sstream>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"
#include "cli/format/progress.hpp"
#include "cli/import/batch.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli {
namespace {

using client::Json;

struct ImportFlags {
  std::string file;
  bool dry_run = false;
  std::size_t chunk = import::kDefaultChunkRows;
  bool json = false;
};

models::Result<std::string> read_input(const std::string& file, Context& ctx) {
  std::stringstream text;
  if (file == "-") {
    text << ctx.io().in->rdbuf();
    return text.str();
  }
  std::ifstream in(file, std::ios::binary);
  if (!in) return models::Error{"FILE", "cannot open " + file, "a readable CSV file, or - for stdin"};
  text << in.rdbuf();
  return text.str();
}

int report_local_errors(const std::vector<models::wire::RowError>& errors, bool json, Context& ctx) {
  Json list = Json::array();
  for (const auto& e : errors) {
    ctx.err() << fmt::format("  row {}  {}\n", e.row, describe({e.error.field, e.error.detail, e.error.allowed}));
    list.push_back({{"row", e.row}, {"field", e.error.field}, {"detail", e.error.detail}, {"allowed", e.error.allowed}});
  }
  if (json) ctx.out() << Json{{"ok", false}, {"errors", list}}.dump(2) << '\n';
  return ctx.fail(kExitRejected, fmt::format("{} problem(s) in the file; nothing was sent (rows count from 1 "
                                             "after the header)", errors.size()));
}

// "/3/cell_sg/2" -> "cell_sg/2": the row number says which reading.
std::string field_in_row(const std::string& field) {
  if (field.size() < 2 || field[0] != '/') return field;
  auto slash = field.find('/', 1);
  return slash == std::string::npos ? "(row)" : field.substr(slash + 1);
}

int report_server_refusal(const import::SendOutcome& sent, const std::vector<int>& rows, Context& ctx) {
  const auto& chunk = *sent.failed_chunk;
  if (sent.rows_done > 0) {
    ctx.err() << fmt::format("rows up to {} were stored ({} new, {} already there)\n", rows[sent.rows_done - 1],
                             sent.stored, sent.replayed);
  }
  if (!sent.failure.problem) return ctx.fail(sent.failure);
  auto problem = *sent.failure.problem;
  auto fields = std::move(problem.errors);
  problem.errors.clear();
  ctx.err() << client::render_problem(problem);
  for (const auto& e : fields) {
    auto row = import::file_row(e, chunk, rows);
    ctx.err() << fmt::format("  {}{}: {}{}\n", row ? fmt::format("row {}  ", *row) : "", field_in_row(e.field), e.detail,
                             e.allowed.empty() ? "" : " (allowed: " + e.allowed + ")");
  }
  ctx.err() << fmt::format("rows {} to {} were refused as a whole; fix them and run the same import again "
                           "(stored rows are recognised, not duplicated)\n",
                           rows[chunk.first], rows[chunk.first + chunk.count - 1]);
  return client::is_data_rejection(*sent.failure.problem) ? kExitRejected : kExitFailure;
}

// Flagged readings listed line by line; a bulk import of past years can flag
// thousands, which no one reads on a terminal: the rest are counted.
constexpr std::size_t kMaxFlaggedLines = 20;

// The readings that need attention, one line each, so the crew can act
// before leaving the yard.
void print_flagged(const std::vector<import::Flagged>& flagged, const import::Prepared& prepared, Context& ctx) {
  if (flagged.empty()) return;
  ctx.out() << fmt::format("{} flagged:\n", flagged.size() == 1 ? std::string("1 reading") :
                                                                   fmt::format("{} readings", flagged.size()));
  for (std::size_t i = 0; i < flagged.size() && i < kMaxFlaggedLines; ++i) {
    const auto& x = flagged[i];
    const auto& r = prepared.readings[x.index];
    ctx.out() << fmt::format("  row {}  {}  {}  {}\n", prepared.rows[x.index], r.serial,
                             models::wire::format_timestamp(r.taken_at), fmt::join(x.flags, "; "));
  }
  if (flagged.size() > kMaxFlaggedLines)
    ctx.out() << fmt::format("  ... and {} more (--json lists every one)\n", flagged.size() - kMaxFlaggedLines);
  ctx.out() << "details: pbfleet history SERIAL\n";
}

int send(const import::Prepared& prepared, const ImportFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  format::ProgressBar bar(&ctx.err(), ctx.io().err_tty, ctx.err_style().unicode, prepared.readings.size(), "rows");
  auto sent = import::send_readings(*api, prepared.readings, f.chunk, [&](std::size_t done) { bar.update(done); });
  bar.finish();
  if (sent.failed_chunk) return report_server_refusal(sent, prepared.rows, ctx);
  if (f.json) {
    Json flagged = Json::array();
    for (const auto& x : sent.flagged) {
      const auto& r = prepared.readings[x.index];
      flagged.push_back({{"row", prepared.rows[x.index]}, {"serial", r.serial},
                         {"taken_at", models::wire::format_timestamp(r.taken_at)}, {"flags", x.flags}});
    }
    ctx.out() << Json{{"ok", true}, {"rows", sent.rows_done}, {"stored", sent.stored}, {"replayed", sent.replayed},
                      {"flagged", flagged}}
                     .dump(2)
              << '\n';
  } else {
    ctx.out() << fmt::format("imported {} rows: {} new, {} already stored\n", sent.rows_done, sent.stored, sent.replayed);
    print_flagged(sent.flagged, prepared, ctx);
  }
  return kExitOk;
}

int run_import(const ImportFlags& f, Context& ctx) {
  auto text = read_input(f.file, ctx);
  if (!text) return ctx.fail(kExitFailure, describe(text.error()));
  auto prepared = import::prepare_import(*text, ctx.now());
  if (!prepared) return ctx.fail(kExitRejected, f.file + ": " + describe(prepared.error()));
  if (!prepared->errors.empty()) return report_local_errors(prepared->errors, f.json, ctx);
  if (prepared->readings.empty()) return ctx.fail(kExitRejected, f.file + ": no readings after the header");
  if (f.dry_run) {
    if (f.json) ctx.out() << Json{{"ok", true}, {"rows", prepared->readings.size()}, {"dry_run", true}}.dump(2) << '\n';
    else ctx.out() << fmt::format("{} rows are valid; nothing was sent (dry run)\n", prepared->readings.size());
    return kExitOk;
  }
  return send(*prepared, f, ctx);
}

}  // namespace

void install_import(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<ImportFlags>();
  cmd.add_option("file", f->file, "CSV file (- for stdin). Columns: reading_id, serial, taken_at, ocv_v, "
                                  "cell_sg (values separated by ';'), electrolyte_temp (41F / 5C), ambient_temp, "
                                  "rest_h, load_test_a, load_test_end_v, logged_by, source, note, after_charge, "
                                  "water_added; header row required, order free")
      ->required()->type_name("FILE.csv");
  cmd.add_flag("--dry-run", f->dry_run, "Check every row and send nothing");
  cmd.add_option("--chunk", f->chunk, "Rows per request; each request is stored whole or not at all")
      ->check(CLI::Range(std::size_t{1}, import::kMaxChunkRows))->capture_default_str();
  cmd.add_flag("--json", f->json, "Print the outcome as JSON");
  cmd.footer(example("pbfleet import monday-round.csv --dry-run\npbfleet import monday-round.csv"));
  cmd.callback([f, &ctx] { ctx.exit_code = run_import(*f, ctx); });
}

}  // namespace pbfleet::cli
