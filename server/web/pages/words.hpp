// Plain words for the flags a reading can carry (the API's wire words stay
// on the page too, so a technician can match them with the CLI).
#pragma once

#include <string>

#include "models/analytics/derive.hpp"

namespace pbfleet::web::pages {

// "rested too briefly (ocv_unsettled); cell spread (cell_spread)"; empty when none.
std::string flag_words(const analytics::FlagSet& flags);

}  // namespace pbfleet::web::pages
