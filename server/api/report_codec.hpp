// JSON and CSV renderings of the reports. CSV text cells go through
// models::wire::csv_cell (formula-injection guard); numbers never do.
// JSON is rendered straight to text by JsonText (a fleet report is
// megabytes; building an nlohmann::json tree first cost more than the
// report's analytics).
#pragma once

#include <string>
#include <vector>

#include "models/analytics/overdue.hpp"
#include "models/analytics/replacement.hpp"
#include "models/analytics/sulfation.hpp"
#include "models/analytics/winter.hpp"

namespace pbfleet::api {

std::string winter_json(const analytics::WinterReport& report);
std::string sulfation_json(const std::vector<analytics::SulfationAssessment>& report);
std::string replacement_json(const std::vector<analytics::ReplacementForecast>& report);
std::string overdue_json(const std::vector<analytics::DepotOverdue>& report, int days);

// One CSV document per report (header row, CRLF line ends): the batteries
// of the winter report, one row per battery for the others.
std::string winter_csv(const analytics::WinterReport& report);
std::string sulfation_csv(const std::vector<analytics::SulfationAssessment>& report);
std::string replacement_csv(const std::vector<analytics::ReplacementForecast>& report);
std::string overdue_csv(const std::vector<analytics::DepotOverdue>& report);

}  // namespace pbfleet::api
