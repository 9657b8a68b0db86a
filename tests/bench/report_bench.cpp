// Report figures on a generated fleet (deploy/demogen, cached between runs):
//   report.*   winter, sulfation and one battery's history at B batteries x
//              W weekly readings, timed in process (the service the handler
//              calls) and over HTTP, each against a bare SQL scan of the same
//              rows by the same index;
//   memory.*   peak RSS (VmHWM) of pbfleetd across the winter report over HTTP;
//   scale.*    the winter report at each fleet size of a series, and its
//              growth from the second-largest to the largest size against
//              linear growth.
// Times are the median of R runs after one untimed warm-up run.
//
//   bench_report --pbfleetd PATH --cache DIR [--batteries B] [--weeks W]
//                [--scaling 1000,10000,50000] [--scaling-weeks W2] [--repeat R]
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
  int repeat = 3;
};

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
    else if (key == "--repeat") o.repeat = std::max(1, std::stoi(value));
    else { std::fprintf(stderr, "unknown option %s\n", key.c_str()); std::exit(2); }
  }
  if (o.pbfleetd.empty() || o.cache.empty() || o.scaling.size() < 2) {
    std::fprintf(stderr, "usage: bench_report --pbfleetd PATH --cache DIR [--batteries B] "
                         "[--weeks W] [--scaling A,B,...] [--scaling-weeks W2] [--repeat R]\n");
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

void reports(const Options& o) {
  const FleetDb db = fleet_db(o.cache, o.batteries, o.weeks);
  const std::string tag = "." + size_name(o.batteries);
  const std::string serial = serial_with_id(db.file, o.batteries / 2);
  BareReader bare(db.file);
  const double bare_winter = median_scan(o.repeat, [&] { return bare.last_readings(api::kWinterLookback); });
  const double bare_trend = median_scan(o.repeat, [&] { return bare.last_readings(api::kTrendLookback); });
  const double bare_history = median_scan(o.repeat, [&] { return bare.history(serial); });
  const std::string history_target = "/v1/batteries/" + serial + "/history";
  std::string token;
  {
    auto store = open_store(db.file);
    token = admin_token(*store);
    const double winter = winter_in_process(*store, o.repeat);
    const double sulfation = median_seconds(o.repeat, [&] {
      auto r = api::build_sulfation_report(*store, std::nullopt, kReportNow, {});
      if (!r) std::exit((std::fprintf(stderr, "sulfation: %s\n", r.error().detail.c_str()), 1));
    });
    FixedClock clock;
    api::Api app(*store, clock);
    const double history = median_seconds(o.repeat, [&] {
      http::Request req{"GET", history_target, {{"authorization", "Bearer " + token}}, {}, "127.0.0.1:1"};
      const auto res = app.handle(std::move(req));
      if (res.status != 200) std::exit((std::fprintf(stderr, "history: %d %.300s\n", res.status, res.body.c_str()), 1));
    });
    print_figure(timed("report.winter" + tag, winter, bare_winter, below(1.0, "< 1 s")));
    print_figure(timed("report.sulfation" + tag, sulfation, bare_trend));
    print_figure(timed("report.history", history, bare_history, below(0.020, "< 20 ms")));
  }
  Daemon daemon(o.pbfleetd, db.file, o.cache / "pbfleetd-report.log");
  HttpClient client("127.0.0.1", daemon.port());
  client.set_token(token);
  const long idle_kb = daemon.status_kb("VmHWM");
  const double winter_http = http_seconds(client, "/v1/reports/winter?on=2026-12-14", o.repeat);
  const long peak_kb = daemon.status_kb("VmHWM");
  const double history_http = http_seconds(client, history_target, o.repeat);
  print_figure(timed("report.winter" + tag + ".http", winter_http, bare_winter, below(1.0, "< 1 s")));
  print_figure(timed("report.history.http", history_http, bare_history, below(0.020, "< 20 ms")));
  Figure mem{"memory.winter" + tag + ".http", peak_kb / 1024.0, "MB peak RSS", "pbfleetd after start",
             idle_kb / 1024.0, "MB", static_cast<double>(peak_kb) / static_cast<double>(idle_kb),
             below(500, "< 500 MB"), peak_kb / 1024.0, "VmHWM across the report"};
  print_figure(mem);
}

void scaling(const Options& o) {
  std::vector<double> times;
  for (const int batteries : o.scaling) {
    const FleetDb db = fleet_db(o.cache, batteries, o.scaling_weeks);
    BareReader reader(db.file);
    const double bare = median_scan(o.repeat, [&] { return reader.last_readings(api::kWinterLookback); });
    auto store = open_store(db.file);
    times.push_back(winter_in_process(*store, o.repeat));
    auto f = timed("scale.winter." + size_name(batteries), times.back(), bare);
    f.note = std::to_string(o.scaling_weeks) + " readings per battery";
    print_figure(f);
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
  scaling(o);
  return 0;
}
