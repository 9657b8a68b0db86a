// The OpenAPI 3.1 document of this API (server/api/openapi.json), embedded
// at build time so the binary serves the description it was built with.
#pragma once

#include <string_view>

namespace pbfleet::api {

std::string_view openapi_document();

}  // namespace pbfleet::api
