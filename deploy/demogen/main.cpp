// pbfleet-demogen: writes the demo fleet of Fjellvik Transport (fictional)
// as CSV files that deploy/demo loads through the CLI.
//
//   pbfleet-demogen --out DIR [--batteries N] [--weeks W] [--seed S]
//                   [--last-round YYYY-MM-DD]
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <string>

#include "deploy/demogen/generator.hpp"
#include "models/wire/csv.hpp"

namespace fs = std::filesystem;
using namespace pbfleet;

namespace {

std::string date_text(std::chrono::sys_days d) {
  const std::chrono::year_month_day ymd{d};
  char buf[16];
  std::snprintf(buf, sizeof buf, "%04d-%02u-%02u", int(ymd.year()), unsigned(ymd.month()),
                unsigned(ymd.day()));
  return buf;
}

bool parse_date(const std::string& text, std::chrono::sys_days& out) {
  int y = 0;
  unsigned m = 0, d = 0;
  if (std::sscanf(text.c_str(), "%d-%u-%u", &y, &m, &d) != 3) return false;
  const std::chrono::year_month_day ymd{std::chrono::year{y}, std::chrono::month{m}, std::chrono::day{d}};
  if (!ymd.ok()) return false;
  out = std::chrono::sys_days{ymd};
  return true;
}

// The most recent Monday on or before today (weekly rounds are on Mondays).
std::chrono::sys_days last_monday() {
  const auto today = std::chrono::floor<std::chrono::days>(std::chrono::system_clock::now());
  const std::chrono::weekday wd{today};
  return today - (wd - std::chrono::Monday);
}

void write_structure(const fs::path& out, const demogen::Fleet& fleet) {
  std::ofstream depots(out / "depots.csv");
  depots << "name,time_zone,design_low_c\n";
  for (const auto& d : fleet.depots) depots << d.name << ',' << d.time_zone << ',' << d.design_low_c << '\n';
  std::ofstream vehicles(out / "vehicles.csv");
  vehicles << "code,depot_id,engine,displacement_l,required_cca_a\n";
  for (const auto& v : fleet.vehicles)
    vehicles << v.code << ',' << v.depot_index + 1 << ',' << models::to_string(v.engine) << ','
             << v.displacement_l << ',' << v.required_cca_a << '\n';
  std::ofstream batteries(out / "batteries.csv");
  batteries << "serial,chemistry,cells,rated_cca_a,reserve_capacity_min,full_charge_sg,installed_on,vehicle_id,simulated_condition\n";
  for (const auto& b : fleet.batteries)
    batteries << b.serial << ',' << models::to_string(b.chemistry) << ',' << b.cells << ','
              << b.rated_cca_a << ',' << b.reserve_capacity_min << ',' << b.full_charge_sg << ','
              << date_text(b.installed_on) << ',' << b.vehicle_index + 1 << ','
              << demogen::to_string(b.condition) << '\n';
}

int usage() {
  std::cerr << "usage: pbfleet-demogen --out DIR [--batteries N] [--weeks W] [--seed S] "
               "[--last-round YYYY-MM-DD]\n";
  return 2;
}

}  // namespace

int main(int argc, char** argv) {
  demogen::FleetConfig config;
  config.last_round = last_monday();
  fs::path out;
  for (int i = 1; i < argc; ++i) {
    const std::string arg = argv[i];
    if (i + 1 >= argc) return usage();
    const std::string value = argv[++i];
    if (arg == "--out") out = value;
    else if (arg == "--batteries") config.batteries = std::atoi(value.c_str());
    else if (arg == "--weeks") config.weeks = std::atoi(value.c_str());
    else if (arg == "--seed") config.seed = std::strtoull(value.c_str(), nullptr, 10);
    else if (arg == "--last-round") { if (!parse_date(value, config.last_round)) return usage(); }
    else return usage();
  }
  if (out.empty() || config.batteries < 1 || config.batteries > 100000 || config.weeks < 1 ||
      config.weeks > 1000)
    return usage();
  fs::create_directories(out);
  const auto fleet = demogen::make_fleet(config);
  write_structure(out, fleet);

  std::ofstream readings(out / "readings.csv");
  bool header = true;
  std::size_t count = 0;
  demogen::generate_readings(config, fleet, [&](const auto&, const auto& rows) {
    std::string text = models::wire::format_reading_csv(rows);
    if (!header) text.erase(0, text.find('\n') + 1);  // one header for the whole file
    header = false;
    readings << text;
    count += rows.size();
  });
  std::cerr << "pbfleet-demogen: " << fleet.depots.size() << " depots, " << fleet.batteries.size()
            << " batteries, " << count << " readings up to " << date_text(config.last_round)
            << " in " << out.string() << '\n';
  return 0;
}
