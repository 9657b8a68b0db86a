// Model figure: estimates per second of the full chain (raw SG and OCV ->
// corrected SG -> acid -> EMF -> SOC -> freeze and crank margins), against
// a trivial baseline over the same inputs: copying the input and
// temperature-correcting its six cell SGs (the chain's first link only).
//
//   bench_model [--seconds S]     (default 2 s per loop)
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "models/estimate.hpp"
#include "models/specific_gravity.hpp"
#include "tests/bench/figure.hpp"

namespace {

using namespace pbfleet;
using bench::SteadyClock;

constexpr std::size_t kInputs = 1024;  // varied inputs so branches are not all predicted

// Deterministic pseudo-random in [lo, hi) (64-bit LCG, Knuth's MMIX constants).
struct Lcg {
  std::uint64_t state = 20261202;
  double next(double lo, double hi) {
    state = state * 6364136223846793005ULL + 1442695040888963407ULL;
    return lo + (hi - lo) * static_cast<double>(state >> 11) / 9007199254740992.0;
  }
};

models::EstimateInput one_input(Lcg& rng) {
  models::EstimateInput in;
  const double sg = rng.next(1.160, 1.280);
  for (int c = 0; c < 6; ++c) in.cell_sg.push_back(models::SpecificGravity{sg + rng.next(-0.01, 0.01)});
  in.ocv = models::Volts{rng.next(12.0, 12.7)};
  in.electrolyte = models::Celsius{rng.next(-15.0, 30.0)};
  in.spec = models::default_spec(models::Chemistry::flooded, 6);
  in.spec.rated_cca = models::Amperes{rng.next(500.0, 900.0)};
  in.rest = models::Hours{rng.next(1.0, 48.0)};
  in.low = models::Celsius{rng.next(-30.0, 0.0)};
  in.engine = models::EngineKind::diesel;
  in.displacement_l = rng.next(4.0, 12.0);
  return in;
}

std::vector<models::EstimateInput> inputs() {
  Lcg rng;
  std::vector<models::EstimateInput> out;
  for (std::size_t i = 0; i < kInputs; ++i) out.push_back(one_input(rng));
  return out;
}

// Runs `step(input)` over the inputs round-robin for about `seconds`;
// returns calls per second. `sink` keeps the results observable.
template <class Step>
double rate(const std::vector<models::EstimateInput>& in, double seconds, Step step, double& sink) {
  const auto start = SteadyClock::now();
  std::size_t calls = 0;
  double elapsed = 0.0;
  do {
    for (const auto& input : in) sink += step(input);
    calls += in.size();
    elapsed = bench::seconds_since(start);
  } while (elapsed < seconds);
  return static_cast<double>(calls) / elapsed;
}

double full_chain(const models::EstimateInput& input) {
  auto out = models::estimate(input);
  if (!out) {
    std::fprintf(stderr, "estimate refused a bench input: %s\n", out.error().detail.c_str());
    std::exit(1);
  }
  return out->crank_margin.value_or(0.0) + out->soc_percent;
}

double first_link(const models::EstimateInput& input) {
  const models::EstimateInput copy = input;  // the chain copies nothing less
  double sum = 0.0;
  for (const auto sg : copy.cell_sg) sum += models::correct_sg(sg, copy.electrolyte).value;
  return sum / static_cast<double>(copy.cell_sg.size());
}

}  // namespace

int main(int argc, char** argv) {
  double seconds = 2.0;
  if (argc == 3 && std::strcmp(argv[1], "--seconds") == 0) seconds = std::atof(argv[2]);
  bench::arm_watchdog(std::chrono::seconds{30 + static_cast<int>(4 * seconds)});
  const auto in = inputs();
  double sink = 0.0;
  const double baseline = rate(in, seconds, first_link, sink);
  const double chain = rate(in, seconds, full_chain, sink);
  bench::Figure f;
  f.name = "model.estimate";
  f.value = chain;
  f.unit = "estimates/s";
  f.limit_name = "SG correction only";
  f.limit = baseline;
  f.limit_unit = "inputs/s";
  f.ratio = chain / baseline;
  f.note = sink == 0.0 ? "(no result?)" : "";
  bench::print_figure(f);
  return 0;
}
