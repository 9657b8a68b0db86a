// `pbfleet history SERIAL`: one battery's readings as a table and as charts
// of state of charge and corrected SG over time, flagged readings marked.
#pragma once

#include <vector>

#include "cli/client/api.hpp"
#include "cli/format/chart.hpp"

namespace pbfleet::cli {

// One flat row per reading of a history answer: when, OCV, rest, the
// temperature as entered ("41F"), raw mean SG, then the derived values.
std::vector<client::Json> history_rows(const client::Json& body);

// SOC (0 to 100 %) per reading, oldest first; flagged where the server
// flagged the reading.
format::ChartSeries soc_series(const std::vector<client::Json>& rows);

// Corrected SG per reading; the axis spans the data with a little room and
// at least 0.020 SG.
format::ChartSeries sg_series(const std::vector<client::Json>& rows);

}  // namespace pbfleet::cli
