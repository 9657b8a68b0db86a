#include "server/web/pages/words.hpp"

namespace pbfleet::web::pages {
namespace {

std::string_view phrase(std::string_view word) {
  struct Phrase {
    std::string_view word, text;
  };
  static constexpr Phrase kPhrases[] = {
      {"ocv_unsettled", "rested too briefly for a settled OCV"},
      {"surface_charge_suspected", "surface charge suspected"},
      {"soc_disagreement", "SG and OCV disagree"},
      {"cell_spread", "cells differ too much"},
      {"water_added_hold", "spread held back after watering"},
      {"low_soc", "low state of charge"},
      {"temperature_assumed", "no temperature: 25 °C assumed"},
      {"sg_out_of_range", "SG outside the model"},
      {"ocv_out_of_range", "OCV outside the model"},
      {"load_test_at_low_soc", "load test below 75 % SOC"},
      {"load_test_failed", "load test failed"},
      {"no_soc", "no usable SG or OCV"},
  };
  for (const auto& p : kPhrases)
    if (p.word == word) return p.text;
  return word;
}

}  // namespace

std::string flag_words(const analytics::FlagSet& flags) {
  std::string out;
  for (auto word : flags.words()) {
    if (!out.empty()) out += "; ";
    out += std::string(phrase(word)) + " (" + std::string(word) + ")";
  }
  return out;
}

}  // namespace pbfleet::web::pages
