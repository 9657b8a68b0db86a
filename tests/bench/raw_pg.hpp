// The limit the PostgreSQL ingest figures are measured against: the same
// rows inserted with bare libpqxx calls (one prepared INSERT, no domain
// types, no hashing, no replay check) into a database the store created, so
// schema and indexes are the server's.
#pragma once

#include <string>
#include <vector>

#include "models/wire/reading.hpp"

namespace pbfleet::bench {

// Rows per second inserting `readings`, `batch` rows per transaction, from
// `connections` connections at once (each takes an equal share; one row per
// transaction from several connections is how single-reading requests
// arrive). Connections are opened and prepared before timing.
double raw_pg_insert_rate(const std::string& uri,
                          const std::vector<models::wire::ReadingInput>& readings,
                          std::size_t batch, int connections);

}  // namespace pbfleet::bench
