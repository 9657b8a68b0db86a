// Report figures on a generated fleet (deploy/demogen, cached between runs):
//   report.*   winter, sulfation, replacement and one battery's history at
//              B batteries x W weekly readings, timed in process (the
//              service the handler calls) and over HTTP, against bare SQL
//              scans by the same index: the winter report against the
//              latest reading per battery, sulfation and replacement
//              against the last 13 per battery, the history against its
//              rows; the winter report asked twice (report cache); and the
//              winter report at G batteries with W3 and W4 readings each
//              (it must not grow with history);
//   report.history.http.16.*  one battery's history over HTTP with 16
//              clients asking at once (64 batteries in turn; S seconds),
//              p50 and p99 latency; answers asked again come from the
//              history cache as in use, and the ".cold" figures give every
//              request its own range (?to=), so each one is built;
//   memory.*   peak RSS (VmHWM) of pbfleetd across the winter report over
//              HTTP, at B batteries and at the largest scaling size;
//   scale.*    the winter report at each fleet size of a series, and its
//              growth from the second-largest to the largest size against
//              linear growth.
// Times are the median of R runs after one untimed warm-up run (at least 7
// for the growth figures, which divide two of them).
//
//   bench_report --pbfleetd PATH --cache DIR [--batteries B] [--weeks W]
//                [--scaling 1000,10000,50000] [--scaling-weeks W2]
//                [--growth-batteries G] [--growth-weeks W3,W4] [--repeat R]
//                [--load-seconds S]
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <functional>
#include <string>
#include <vector>

#include <spdlog/spdlog.h>

#include "server/api/api.hpp"
#include "server/api/services/reports.hpp"
#include "tests/bench/daemon.hpp"
#include "tests/bench/figure.hpp"
#include "tests/bench/fleet_db.hpp"
#include "tests/bench/http_client.hpp"
#include "tests/bench/load.hpp"
#include "tests/bench/raw_sqlite.hpp"

namespace {

using namespace pbfleet;
using namespace pbfleet::bench;
namespace fs = std::filesystem;

struct Options {
  fs::path pbfleetd, cache;
  int batteries = 10'000;
  int weeks = 260;
  std::vector<int> scaling{1'000, 10'000, 50'000};
  int scaling_weeks = 52;
  int growth_batteries = 10'000;
  std::vector<int> growth_weeks{52, 520};
  int repeat = 3;
  double load_seconds = 3.0;  // history under concurrent load
};

constexpr int kHistoryClients = 16;
// Runs at least, for the figures that are a ratio of two report times (a
// median of three moved them by 20 % on a shared machine).
constexpr int kRatioRepeat = 7;

std::vector<int> parse_list(const std::string& text) {
  std::vector<int> out;
  std::size_t pos = 0;
  while (pos < text.size()) {
    const auto comma = text.find(',', pos);
    out.push_back(std::stoi(text.substr(pos, comma - pos)));
    if (comma == std::string::npos) break;
    pos = comma + 1;
  }
  return out;
}

Options parse(int argc, char** argv) {
  Options o;
  for (int i = 1; i + 1 < argc; i += 2) {
    const std::string key = argv[i], value = argv[i + 1];
    if (key == "--pbfleetd") o.pbfleetd = value;
    else if (key == "--cache") o.cache = value;
    else if (key == "--batteries") o.batteries = std::stoi(value);
    else if (key == "--weeks") o.weeks = std::stoi(value);
    else if (key == "--scaling") o.scaling = parse_list(value);
    else if (key == "--scaling-weeks") o.scaling_weeks = std::stoi(value);
    else if (key == "--growth-batteries") o.growth_batteries = std::stoi(value);
    else if (key == "--growth-weeks") o.growth_weeks = parse_list(value);
    else if (key == "--repeat") o.repeat = std::max(1, std::stoi(value));
    else if (key == "--load-seconds") o.load_seconds = std::stod(value);
    else { std::fprintf(stderr, "unknown option %s\n", key.c_str()); std::exit(2); }
  }
  if (o.pbfleetd.empty() || o.cache.empty() || o.scaling.size() < 2 || o.growth_weeks.size() < 2) {
    std::fprintf(stderr, "usage: bench_report --pbfleetd PATH --cache DIR [--batteries B] "
                         "[--weeks W] [--scaling A,B,...] [--scaling-weeks W2] "
                         "[--growth-batteries G] [--growth-weeks W3,W4] [--repeat R] "
                         "[--load-seconds S]\n");
    std::exit(2);
  }
  return o;
}

double median_scan(int repeat, const std::function<ScanResult()>& f) {
  return median_seconds(repeat, [&] {
    if (f().rows == 0) {
      std::fprintf(stderr, "bare scan read no rows\n");
      std::exit(1);
    }
  });
}

struct FixedClock final : api::Clock {
  [[nodiscard]] std::chrono::sys_seconds now() const override { return kReportNow; }
};

analytics::ColdSpec cold_spec() {
  analytics::ColdSpec cold;
  cold.cold_date = kLastRound + std::chrono::days{14};
  return cold;
}

double winter_in_process(storage::Store& store, int repeat) {
  return median_seconds(repeat, [&] {
    auto r = api::build_winter_report(store, std::nullopt, cold_spec(), kReportNow, {});
    if (!r) std::exit((std::fprintf(stderr, "winter: %s\n", r.error().detail.c_str()), 1));
  });
}

std::string size_name(int batteries) {
  return batteries % 1000 == 0 ? std::to_string(batteries / 1000) + "k" : std::to_string(batteries);
}

Figure timed(std::string name, double seconds, double bare, Target target = {}) {
  Figure f;
  f.name = std::move(name);
  f.value = seconds * 1000;
  f.unit = "ms";
  f.limit_name = "bare SQL scan";
  f.limit = bare * 1000;
  f.limit_unit = "ms";
  f.ratio = seconds / bare;
  f.target = std::move(target);
  f.checked = seconds;
  return f;
}

// Over HTTP on a running pbfleetd: `target` must answer 200.
double http_seconds(HttpClient& client, const std::string& target, int repeat) {
  return median_seconds(repeat, [&] {
    const auto reply = client.send("GET", target);
    if (reply.status != 200)
      std::exit((std::fprintf(stderr, "GET %s: %d %.300s\n", target.c_str(), reply.status,
                              reply.body.c_str()), 1));
  });
}

// Over HTTP, a different cold date each time, so every request misses the
// report cache and builds the report.
double http_uncached_seconds(HttpClient& client, int repeat) {
  int day = 0;
  return median_seconds(repeat, [&] {
    const std::string target = "/v1/reports/winter?on=2026-12-" + std::to_string(10 + (day++ % 19));
    const auto reply = client.send("GET", target);
    if (reply.status != 200)
      std::exit((std::fprintf(stderr, "GET %s: %d %.300s\n", target.c_str(), reply.status,
                              reply.body.c_str()), 1));
  });
}

// A bound far past every reading, its own for each `i`: the same history
// under another cache key.
std::string far_bound(std::size_t i) {
  char text[40];
  std::snprintf(text, sizeof text, "?to=2099-01-01T%02zu:%02zu:%02zuZ", (i / 3600) % 24, (i / 60) % 60, i % 60);
  return text;
}

// One battery's history over HTTP from kHistoryClients connections at once,
// each request for one of 64 batteries spread over the fleet; `cold` gives
// each request a range of its own, so none is answered from the cache.
LoadResult history_under_load(const Options& o, std::uint16_t port, const std::string& token,
                              const FleetDb& db, bool cold) {
  std::vector<std::string> targets;
  for (int i = 0; i < 64; ++i)
    targets.push_back("/v1/batteries/" + serial_with_id(db.file, 1 + (i * db.batteries) / 64) + "/history");
  LoadSpec spec;
  spec.port = port;
  spec.token = token;
  spec.threads = 2;
  spec.connections_per_thread = kHistoryClients / spec.threads;
  spec.limit = 1'000'000;
  spec.seconds = o.load_seconds;
  spec.make = [&](std::size_t i) {
    return LoadRequest{"GET", targets[i % targets.size()] + (cold ? far_bound(i) : ""), {}, {}};
  };
  LoadResult result = run_load(spec);
  if (!result.error.empty() || result.requests == 0)
    std::exit((std::fprintf(stderr, "history under load: %s\n", result.error.c_str()), 1));
  return result;
}

void reports(const Options& o) {
  const FleetDb db = fleet_db(o.cache, o.batteries, o.weeks);
  const std::string tag = "." + size_name(o.batteries);
  const std::string serial = serial_with_id(db.file, o.batteries / 2);
  std::string token;
  {
    auto store = open_store(db.file);  // first: a database from an older binary is summarised here
    token = admin_token(*store);
  }
  BareReader bare(db.file);
  const double bare_latest = median_scan(o.repeat, [&] { return bare.last_readings(1); });
  const double bare_recent = median_scan(o.repeat, [&] { return bare.last_readings(api::kWinterLookback); });
  const double bare_history = median_scan(o.repeat, [&] { return bare.history(serial); });
  const std::string history_target = "/v1/batteries/" + serial + "/history";
  {
    auto store = open_store(db.file);
    const double winter = winter_in_process(*store, o.repeat);
    // Sulfation and replacement keep one basis per battery between reports
    // (api::TrendMemo): the first report after start builds them all, the
    // next ones only those whose readings changed.
    api::TrendMemo memo;
    auto sulfation_report = [&] {
      auto r = api::build_sulfation_report(*store, memo, std::nullopt, kReportNow, {});
      if (!r) std::exit((std::fprintf(stderr, "sulfation: %s\n", r.error().detail.c_str()), 1));
    };
    const auto first_start = SteadyClock::now();
    sulfation_report();
    const double sulfation_first = seconds_since(first_start);
    const double sulfation = median_seconds(o.repeat, sulfation_report);
    const double replacement = median_seconds(o.repeat, [&] {
      auto r = api::build_replacement_report(*store, memo, std::nullopt, kReportNow, {});
      if (!r) std::exit((std::fprintf(stderr, "replacements: %s\n", r.error().detail.c_str()), 1));
    });
    FixedClock clock;
    api::Api app(*store, clock);
    const double history = median_seconds(o.repeat, [&] {
      http::Request req{"GET", history_target, {{"authorization", "Bearer " + token}}, {}, "127.0.0.1:1"};
      const auto res = app.handle(std::move(req));
      if (res.status != 200) std::exit((std::fprintf(stderr, "history: %d %.300s\n", res.status, res.body.c_str()), 1));
    });
    // The same winter report twice through the handler: the second from
    // the report cache (the rendered body is copied out, nothing built).
    auto winter_call = [&] {
      http::Request req{"GET", "/v1/reports/winter?on=2027-01-06", {{"authorization", "Bearer " + token}}, {}, "127.0.0.1:1"};
      const auto res = app.handle(std::move(req));
      if (res.status != 200) std::exit((std::fprintf(stderr, "winter: %d %.300s\n", res.status, res.body.c_str()), 1));
    };
    const auto built_start = SteadyClock::now();
    winter_call();
    const double winter_built = seconds_since(built_start);
    const double winter_cached = median_seconds(std::max(o.repeat, 5), winter_call);
    auto w = timed("report.winter" + tag, winter, bare_latest, at_most(5.0, "<= 5x"));
    w.limit_name = "latest reading/battery";
    print_figure(w);
    auto first = timed("report.sulfation" + tag + ".first", sulfation_first, bare_recent);
    first.limit_name = "last 13 per battery";
    first.note = "first report after start: every basis built";
    print_figure(first);
    auto su = timed("report.sulfation" + tag, sulfation, bare_recent, at_most(2.0, "<= 2x"));
    su.limit_name = "last 13 per battery";
    su.note = "bases kept between reports";
    print_figure(su);
    auto re = timed("report.replacement" + tag, replacement, bare_recent, at_most(2.0, "<= 2x"));
    re.limit_name = "last 13 per battery";
    print_figure(re);
    print_figure(timed("report.history", history, bare_history, below(0.020, "< 20 ms")));
    print_figure({"report.winter" + tag + ".cached", winter_cached * 1000, "ms", "first request",
                  winter_built * 1000, "ms", winter_built / winter_cached, at_least(20.0, ">= 20x"), {},
                  "in process, through the handler; ratio = first / cached"});
  }
  Daemon daemon(o.pbfleetd, db.file, o.cache / "pbfleetd-report.log");
  HttpClient client("127.0.0.1", daemon.port());
  client.set_token(token);
  const long idle_kb = daemon.status_kb("VmHWM");
  const double winter_http = http_uncached_seconds(client, o.repeat);
  const long peak_kb = daemon.status_kb("VmHWM");
  // The same report again with no new data: from the report cache.
  const std::string again = "/v1/reports/winter?on=2027-01-05";
  const auto first_start = SteadyClock::now();
  const auto first_reply = client.send("GET", again);
  if (first_reply.status != 200) std::exit((std::fprintf(stderr, "GET %s failed\n", again.c_str()), 1));
  const double first = seconds_since(first_start);
  const double cached = http_seconds(client, again, std::max(o.repeat, 5));
  // A client that kept the ETag asks with If-None-Match: 304, no body.
  const double revalidated = median_seconds(std::max(o.repeat, 5), [&] {
    client.revalidate_next(first_reply.etag);
    if (client.send("GET", again).status != 304)
      std::exit((std::fprintf(stderr, "GET %s with If-None-Match: not 304\n", again.c_str()), 1));
  });
  const double history_http = http_seconds(client, history_target, o.repeat);
  std::size_t cold_count = 0;
  const double history_cold = median_seconds(o.repeat, [&] {
    const std::string target = history_target + far_bound(cold_count++);
    if (client.send("GET", target).status != 200)
      std::exit((std::fprintf(stderr, "GET %s: not 200\n", target.c_str()), 1));
  });
  const LoadResult history_load = history_under_load(o, daemon.port(), token, db, false);
  const LoadResult history_cold_load = history_under_load(o, daemon.port(), token, db, true);
  auto wh = timed("report.winter" + tag + ".http", winter_http, bare_latest, at_most(5.0, "<= 5x"));
  wh.limit_name = "latest reading/battery";
  wh.note = "every request built (cold date varied)";
  print_figure(wh);
  print_figure({"report.winter" + tag + ".cached.http", cached * 1000, "ms", "first request", first * 1000, "ms",
                first / cached, at_least(20.0, ">= 20x"), {}, "ratio = first / cached; body sent again"});
  print_figure({"report.winter" + tag + ".revalidated.http", revalidated * 1000, "ms", "first request",
                first * 1000, "ms", first / revalidated, at_least(20.0, ">= 20x"), {},
                "ratio = first / 304 answer (If-None-Match)"});
  auto one = timed("report.history.http", history_http, bare_history, below(0.020, "< 20 ms"));
  one.note = "asked again: the kept answer";
  print_figure(one);
  auto one_cold = timed("report.history.cold.http", history_cold, bare_history, below(0.020, "< 20 ms"));
  one_cold.note = "a range of its own each time: built";
  print_figure(one_cold);
  for (const auto* load : {&history_load, &history_cold_load}) {
    const bool cold = load == &history_cold_load;
    const std::string name = cold ? "report.history.cold.http.16" : "report.history.http.16";
    const std::string clients = std::to_string(kHistoryClients) + " clients, " +
                                std::to_string(load->requests) + " requests" +
                                (cold ? ", each built" : ", 64 batteries in turn");
    auto p50 = timed(name + ".p50", load->percentile_s(50), bare_history, below(0.005, "<= 5 ms"));
    auto p99 = timed(name + ".p99", load->percentile_s(99), bare_history, below(0.015, "<= 15 ms"));
    for (Figure* f : {&p50, &p99}) {
      if (cold) f->target = {};  // shown for what the cache saves; no target
      f->note = clients;
      print_figure(*f);
    }
  }
  Figure mem{"memory.winter" + tag + ".http", peak_kb / 1024.0, "MB peak RSS", "pbfleetd after start",
             idle_kb / 1024.0, "MB", static_cast<double>(peak_kb) / static_cast<double>(idle_kb),
             below(300, "< 300 MB"), peak_kb / 1024.0, "VmHWM across the report"};
  print_figure(mem);
}

// Peak RSS of a pbfleetd started on `db` across one winter report over HTTP.
void winter_memory(const fs::path& pbfleetd, const FleetDb& db, storage::Store& store,
                   const fs::path& log) {
  const std::string token = admin_token(store);
  Daemon daemon(pbfleetd, db.file, log);
  HttpClient client("127.0.0.1", daemon.port());
  client.set_token(token);
  const long idle_kb = daemon.status_kb("VmHWM");
  if (client.send("GET", "/v1/reports/winter").status != 200)
    std::exit((std::fprintf(stderr, "winter report at %d batteries failed\n", db.batteries), 1));
  const long peak_kb = daemon.status_kb("VmHWM");
  print_figure({"memory.winter." + size_name(db.batteries) + ".http", peak_kb / 1024.0, "MB peak RSS",
                "pbfleetd after start", idle_kb / 1024.0, "MB",
                static_cast<double>(peak_kb) / static_cast<double>(idle_kb), below(300, "< 300 MB"),
                peak_kb / 1024.0, std::to_string(db.weeks) + " readings per battery"});
}

// The winter report on the same fleet with a short and a long history per
// battery: reading summaries keep it from growing with history.
void history_growth(const Options& o) {
  std::vector<double> times;
  for (const int weeks : o.growth_weeks) {
    const FleetDb db = fleet_db(o.cache, o.growth_batteries, weeks);
    open_store(db.file);  // summarises a database from an older binary once, untimed
    auto store = open_store(db.file);
    times.push_back(winter_in_process(*store, std::max(o.repeat, kRatioRepeat)));
  }
  const auto n = o.growth_weeks.size();
  Figure f{"report.winter.history-growth." + std::to_string(o.growth_weeks[0]) + "-" +
               std::to_string(o.growth_weeks[n - 1]) + "w",
           times[n - 1] * 1000, "ms", std::to_string(o.growth_weeks[0]) + " readings/battery",
           times[0] * 1000, "ms", times[n - 1] / times[0], at_most(1.2, "<= 1.2x"), {},
           size_name(o.growth_batteries) + " batteries, in process"};
  print_figure(f);
}

void scaling(const Options& o) {
  std::vector<double> times;
  for (const int batteries : o.scaling) {
    const FleetDb db = fleet_db(o.cache, batteries, o.scaling_weeks);
    BareReader reader(db.file);
    const double bare = median_scan(o.repeat, [&] { return reader.last_readings(api::kWinterLookback); });
    auto store = open_store(db.file);
    times.push_back(winter_in_process(*store, std::max(o.repeat, kRatioRepeat)));
    auto f = timed("scale.winter." + size_name(batteries), times.back(), bare);
    f.note = std::to_string(o.scaling_weeks) + " readings per battery";
    print_figure(f);
    if (batteries == o.scaling.back()) winter_memory(o.pbfleetd, db, *store, o.cache / "pbfleetd-scale.log");
  }
  const auto n = o.scaling.size();
  const double size_ratio = static_cast<double>(o.scaling[n - 1]) / o.scaling[n - 2];
  const double growth = times[n - 1] / times[n - 2];
  Figure f{"scale.growth." + size_name(o.scaling[n - 2]) + "-" + size_name(o.scaling[n - 1]),
           growth, "x time", "linear (fleet size ratio)", size_ratio, "x", growth / size_ratio,
           at_most(1.3, "<= 1.3"), {}, "1.0 = linear"};
  print_figure(f);
}

}  // namespace

int main(int argc, char** argv) {
  const Options o = parse(argc, argv);
  spdlog::set_level(spdlog::level::warn);  // the in-process API logs each request at info
  arm_watchdog(std::chrono::minutes{40}, kill_daemons);
  fs::create_directories(o.cache);
  reports(o);
  history_growth(o);
  scaling(o);
  return 0;
}
