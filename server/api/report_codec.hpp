// JSON and CSV renderings of the reports. CSV text cells go through
// models::wire::csv_cell (formula-injection guard); numbers never do.
#pragma once

#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "models/analytics/overdue.hpp"
#include "models/analytics/replacement.hpp"
#include "models/analytics/sulfation.hpp"
#include "models/analytics/winter.hpp"

namespace pbfleet::api {

nlohmann::json winter_json(const analytics::WinterReport& report);
nlohmann::json sulfation_json(const std::vector<analytics::SulfationAssessment>& report);
nlohmann::json replacement_json(const std::vector<analytics::ReplacementForecast>& report);
nlohmann::json overdue_json(const std::vector<analytics::DepotOverdue>& report, int days);

// One CSV document per report (header row, CRLF line ends): the batteries
// of the winter report, one row per battery for the others.
std::string winter_csv(const analytics::WinterReport& report);
std::string sulfation_csv(const std::vector<analytics::SulfationAssessment>& report);
std::string replacement_csv(const std::vector<analytics::ReplacementForecast>& report);
std::string overdue_csv(const std::vector<analytics::DepotOverdue>& report);

}  // namespace pbfleet::api
