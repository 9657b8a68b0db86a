// /healthz, /readyz, /metrics, /openapi.json: no token needed.
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"
#include "server/api/openapi.hpp"

namespace pbfleet::api::handlers {

http::Response healthz(const Call&) { return json_response(200, {{"status", "ok"}}); }

http::Response readyz(const Call& call) {
  auto ping = call.ctx.store.ping();
  if (!ping) return problem(ProblemKind::storage_unavailable, "database does not answer");
  return json_response(200, {{"status", "ready"}});
}

http::Response metrics(const Call& call) {
  auto count = call.ctx.store.readings_count();
  http::Response r;
  r.content_type = "text/plain; version=0.0.4; charset=utf-8";
  r.body = call.ctx.metrics.render(count ? count.value() : -1);
  return r;
}

http::Response openapi(const Call&) {
  http::Response r;
  r.content_type = "application/json";
  r.body = std::string(openapi_document());
  return r;
}

}  // namespace pbfleet::api::handlers
