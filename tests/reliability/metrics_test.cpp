// RELIABILITY-TESTS row 25: /metrics request counters rise by exactly the
// number of requests sent, and the exposition is well-formed Prometheus
// text format 0.0.4. promtool is not installed on CI machines, so the
// format rules it checks are checked here: HELP and TYPE before a family's
// samples, known types, samples only of declared families, histogram
// buckets cumulative with increasing `le` ending at +Inf equal to _count,
// a _sum and _count per series, and a final newline.
#include <doctest/doctest.h>

#include <map>
#include <regex>
#include <sstream>

#include "tests/support/live_fleet.hpp"

namespace pbfleet::testing {
namespace {

struct Sample {
  std::string name;
  std::map<std::string, std::string> labels;
  double value = 0;
};

// Parses `name{a="x",b="y"} value`; false when the line is malformed.
bool parse_sample(const std::string& line, Sample& out) {
  static const std::regex kLine(R"(^([a-zA-Z_:][a-zA-Z0-9_:]*)(\{(.*)\})? (\S+)$)");
  static const std::regex kLabel(R"re(([a-zA-Z_][a-zA-Z0-9_]*)="((?:[^"\\]|\\.)*)",?)re");
  std::smatch m;
  if (!std::regex_match(line, m, kLine)) return false;
  out.name = m[1];
  const std::string labels = m[3];
  std::string rest = labels;
  for (std::smatch l; std::regex_search(rest, l, kLabel) && l.position(0) == 0; rest = l.suffix())
    out.labels[l[1]] = l[2];
  if (!rest.empty()) return false;
  try {
    const std::string v = m[4];
    out.value = v == "+Inf" ? INFINITY : std::stod(v);
  } catch (const std::exception&) {
    return false;
  }
  return true;
}

// The family a sample belongs to (histogram suffixes stripped when declared).
std::string family_of(const std::string& name, const std::map<std::string, std::string>& types) {
  for (const std::string suffix : {"_bucket", "_sum", "_count"}) {
    if (name.size() > suffix.size() && name.ends_with(suffix)) {
      auto base = name.substr(0, name.size() - suffix.size());
      if (auto t = types.find(base); t != types.end() && t->second == "histogram") return base;
    }
  }
  return name;
}

// Every format problem found (empty when the text is valid), and the samples.
std::vector<std::string> check_exposition(const std::string& text, std::vector<Sample>& samples) {
  std::vector<std::string> problems;
  if (text.empty() || text.back() != '\n') problems.push_back("no final newline");
  std::map<std::string, std::string> types, help;
  std::istringstream in(text);
  std::string line;
  while (std::getline(in, line)) {
    if (line.rfind("# HELP ", 0) == 0) {
      help[line.substr(7, line.find(' ', 7) - 7)] = "1";
    } else if (line.rfind("# TYPE ", 0) == 0) {
      std::istringstream t(line.substr(7));
      std::string name, type;
      t >> name >> type;
      if (type != "counter" && type != "gauge" && type != "histogram" && type != "summary" &&
          type != "untyped")
        problems.push_back("unknown type: " + line);
      if (types.count(name)) problems.push_back("TYPE twice: " + name);
      if (!help.count(name)) problems.push_back("TYPE before HELP: " + name);
      types[name] = type;
    } else if (!line.empty() && line[0] != '#') {
      Sample s;
      if (!parse_sample(line, s)) {
        problems.push_back("malformed sample: " + line);
        continue;
      }
      if (!types.count(family_of(s.name, types))) problems.push_back("undeclared sample: " + line);
      samples.push_back(std::move(s));
    }
  }
  return problems;
}

// Histogram rules per series (labels without `le`).
std::vector<std::string> check_histograms(const std::vector<Sample>& samples, const std::string& family) {
  std::vector<std::string> problems;
  std::map<std::string, std::vector<std::pair<double, double>>> buckets;  // series -> (le, count)
  std::map<std::string, double> counts, sums;
  auto series_of = [](std::map<std::string, std::string> labels) {
    labels.erase("le");
    std::string key;
    for (const auto& [k, v] : labels) key += k + "=" + v + ",";
    return key;
  };
  for (const auto& s : samples) {
    if (s.name == family + "_bucket") {
      const auto le = s.labels.at("le");
      buckets[series_of(s.labels)].emplace_back(le == "+Inf" ? INFINITY : std::stod(le), s.value);
    } else if (s.name == family + "_count") {
      counts[series_of(s.labels)] = s.value;
    } else if (s.name == family + "_sum") {
      sums[series_of(s.labels)] = s.value;
    }
  }
  if (buckets.empty()) problems.push_back("no histogram series for " + family);
  for (const auto& [series, list] : buckets) {
    for (std::size_t i = 1; i < list.size(); ++i) {
      if (!(list[i].first > list[i - 1].first)) problems.push_back("le not increasing: " + series);
      if (list[i].second < list[i - 1].second) problems.push_back("buckets not cumulative: " + series);
    }
    if (list.empty() || list.back().first != INFINITY) problems.push_back("no +Inf bucket: " + series);
    if (!counts.count(series)) problems.push_back("no _count: " + series);
    if (!sums.count(series)) problems.push_back("no _sum: " + series);
    if (!list.empty() && counts.count(series) && list.back().second != counts[series])
      problems.push_back("+Inf bucket != _count: " + series);
  }
  return problems;
}

double counter(const std::vector<Sample>& samples, const std::string& route, const std::string& status) {
  for (const auto& s : samples)
    if (s.name == "pbfleet_http_requests_total" && s.labels.count("route") &&
        s.labels.at("route") == route && s.labels.at("status") == status)
      return s.value;
  return 0;
}

std::vector<Sample> scrape(HttpClient& client) {
  auto reply = client.get("/metrics");
  REQUIRE(reply.status == 200);
  CHECK(reply.header("content-type").rfind("text/plain; version=0.0.4", 0) == 0);
  std::vector<Sample> samples;
  auto problems = check_exposition(reply.body, samples);
  for (const auto& p : problems) FAIL_CHECK(p);
  for (const auto& p : check_histograms(samples, "pbfleet_http_request_duration_seconds")) FAIL_CHECK(p);
  return samples;
}

}  // namespace

TEST_CASE("metrics counters rise by exactly the requests sent and the exposition is well formed") {
  LiveFleet fleet({.batteries_per_depot = 2, .extra_args = {}, .log_level = "warn", .database = {}});
  auto anon = fleet.client("");
  auto manager = fleet.client("manager");
  auto crew = fleet.client("crew");
  const auto before = scrape(anon);

  constexpr int kHealth = 37, kList = 11, kNoToken = 5, kStored = 3;
  for (int i = 0; i < kHealth; ++i) REQUIRE(anon.get("/healthz").status == 200);
  for (int i = 0; i < kList; ++i) REQUIRE(manager.get("/v1/batteries").status == 200);
  for (int i = 0; i < kNoToken; ++i) REQUIRE(anon.get("/v1/batteries").status == 401);
  for (int i = 0; i < kStored; ++i)
    REQUIRE(crew.post("/v1/readings", good_reading(fleet.serials("Harbour")[0], "m" + std::to_string(i), i))
                .status == 201);
  const auto after = scrape(anon);

  CHECK(counter(after, "/healthz", "200") - counter(before, "/healthz", "200") == kHealth);
  CHECK(counter(after, "/v1/batteries", "200") - counter(before, "/v1/batteries", "200") == kList);
  CHECK(counter(after, "/v1/batteries", "401") - counter(before, "/v1/batteries", "401") == kNoToken);
  CHECK(counter(after, "/v1/readings", "201") - counter(before, "/v1/readings", "201") == kStored);
  // The scrape between counts itself once.
  CHECK(counter(after, "/metrics", "200") - counter(before, "/metrics", "200") == 1);
  auto value_of = [](const std::vector<Sample>& s, const std::string& name) {
    for (const auto& x : s)
      if (x.name == name) return x.value;
    return -1.0;
  };
  CHECK(value_of(after, "pbfleet_readings_stored_total") - value_of(before, "pbfleet_readings_stored_total") == kStored);
  CHECK(value_of(after, "pbfleet_readings") == kStored);
}

TEST_CASE("the exposition checker refuses broken text") {
  // The checker itself must be able to fail.
  std::vector<Sample> s;
  CHECK_FALSE(check_exposition("# HELP a x\n# TYPE a counter\na 1", s).empty());  // no final newline
  CHECK_FALSE(check_exposition("b 1\n", s).empty());                              // undeclared
  CHECK_FALSE(check_exposition("# HELP a x\n# TYPE a countr\na 1\n", s).empty()); // bad type
  s.clear();
  const std::string broken =
      "# HELP h x\n# TYPE h histogram\nh_bucket{le=\"1\"} 3\nh_bucket{le=\"2\"} 2\nh_sum 1\nh_count 2\n";
  CHECK(check_exposition(broken, s).empty());
  CHECK_FALSE(check_histograms(s, "h").empty());  // not cumulative, no +Inf
}

}  // namespace pbfleet::testing
