// A reading as the JSON object POST /v1/readings takes (field names and
// units as in server/api/CONTRACT.md), and the server's derived values back.
#pragma once

#include "cli/client/api.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli::client {

// Temperatures go out in the unit they were entered in (`_c` or `_f`);
// optional fields that are unset are left out.
Json reading_to_json(const models::wire::ReadingInput& reading);

}  // namespace pbfleet::cli::client
