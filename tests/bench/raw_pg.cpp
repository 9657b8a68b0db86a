#include "tests/bench/raw_pg.hpp"

#include <pqxx/pqxx>

#include <charconv>
#include <map>
#include <memory>
#include <thread>

#include "tests/bench/figure.hpp"

namespace pbfleet::bench {
namespace {

using models::wire::ReadingInput;

std::string join_sg(const std::vector<models::SpecificGravity>& cells) {
  std::string out;
  char buffer[32];
  for (const auto& sg : cells) {
    if (!out.empty()) out += ';';
    const auto r = std::to_chars(buffer, buffer + sizeof buffer, sg.value);
    out.append(buffer, r.ptr);
  }
  return out;
}

template <class Q>
std::optional<double> raw(const std::optional<Q>& q) {
  return q ? std::optional<double>(q->value) : std::nullopt;
}

// A distinct 16-byte value per row (the raw limit does not hash).
std::string counter_hash(std::uint64_t n) {
  static constexpr char kHex[] = "0123456789abcdef";
  std::string out = "\\x";
  for (int i = 0; i < 16; ++i) {
    const unsigned byte = i < 8 ? static_cast<unsigned>((n >> (8 * i)) & 0xff) : 0u;
    out += kHex[byte >> 4];
    out += kHex[byte & 0xf];
  }
  return out;
}

std::optional<std::string> unit(const std::optional<models::wire::EnteredTemperature>& t) {
  if (!t) return std::nullopt;
  return std::string(t->unit == models::wire::TempUnit::f ? "F" : "C");
}

std::optional<double> value(const std::optional<models::wire::EnteredTemperature>& t) {
  return t ? std::optional<double>(t->value.value) : std::nullopt;
}

}  // namespace

double raw_pg_insert_rate(const std::string& uri, const std::vector<ReadingInput>& readings,
                          std::size_t batch, int connections) {
  std::map<std::string, std::int64_t> ids;
  std::vector<std::unique_ptr<pqxx::connection>> pool;
  for (int i = 0; i < connections; ++i) {
    auto c = std::make_unique<pqxx::connection>(uri);
    pqxx::nontransaction(*c).exec("SET synchronous_commit = on");
    c->prepare("insert",
               "INSERT INTO readings (reading_id, battery_id, taken_at, received_at, ocv_v, cell_sg,"
               " electrolyte_temp_c, electrolyte_unit, ambient_temp_c, ambient_unit, rest_h,"
               " load_test_a, load_test_end_v, logged_by, source, note, after_charge,"
               " water_added, content_hash) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11,"
               " $12, $13, $14, $15, $16, $17, $18, $19)");
    pool.push_back(std::move(c));
  }
  {
    pqxx::nontransaction tx(*pool.front());
    for (const auto& row : tx.exec("SELECT serial, id FROM batteries"))
      ids.emplace(row[0].c_str(), row[1].as<std::int64_t>());
  }
  const auto start = SteadyClock::now();
  std::vector<std::thread> threads;
  const std::size_t share = (readings.size() + pool.size() - 1) / pool.size();
  for (std::size_t t = 0; t < pool.size(); ++t) {
    threads.emplace_back([&, t] {
      const std::size_t from = t * share, to = std::min(readings.size(), from + share);
      for (std::size_t i = from; i < to; i += batch) {
        pqxx::work tx(*pool[t]);
        for (std::size_t j = i; j < std::min(to, i + batch); ++j) {
          const ReadingInput& r = readings[j];
          const auto taken = r.taken_at.time_since_epoch().count();
          tx.exec_prepared("insert", r.reading_id, ids.at(r.serial), taken, taken, raw(r.ocv),
                           join_sg(r.cell_sg), value(r.electrolyte), unit(r.electrolyte),
                           value(r.ambient), unit(r.ambient), raw(r.rest), std::optional<double>{},
                           std::optional<double>{}, r.logged_by, r.source, r.note, r.after_charge,
                           r.water_added, counter_hash(j));
        }
        tx.commit();
      }
    });
  }
  for (auto& t : threads) t.join();
  return static_cast<double>(readings.size()) / seconds_since(start);
}

}  // namespace pbfleet::bench
