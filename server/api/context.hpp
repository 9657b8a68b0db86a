// What a handler works with: the request, its route parameters, the caller
// and the services. Handlers parse -> validate -> call a service -> render.
#pragma once

#include <filesystem>
#include <map>
#include <string>

#include "server/api/auth.hpp"
#include "server/api/clock.hpp"
#include "server/api/metrics.hpp"
#include "server/api/request_util.hpp"
#include "server/api/services/reading_writer.hpp"
#include "server/api/services/report_cache.hpp"
#include "server/api/services/trend_memo.hpp"
#include "server/http/message.hpp"
#include "server/storage/store.hpp"

namespace pbfleet::api {

struct ApiOptions {
  std::filesystem::path backup_dir;  // POST /v1/admin/backup writes here only
  AuthLimits auth;
  WriterOptions writer;
};

// Long-lived services shared by every request.
struct Context {
  storage::Store& store;
  const Clock& clock;
  Metrics& metrics;
  Authenticator& auth;
  ReadingWriter& writer;
  const ApiOptions& options;
  ReportCache& reports;    // built reports and their rendered bodies
  TrendMemo& trends;       // sulfation bases per battery, between reports
  ReportCache& histories;  // rendered battery histories, per battery version
};

// One request as a handler sees it.
struct Call {
  const http::Request& request;
  const Target& target;                       // decoded path and query
  std::map<std::string, std::string> params;  // path parameters, e.g. "serial"
  const Caller* caller = nullptr;             // null on public routes
  Context& ctx;

  // A path parameter (empty when absent).
  [[nodiscard]] const std::string& param(const std::string& name) const;
  // A query parameter, or nullptr.
  [[nodiscard]] const std::string* query(const std::string& name) const;
};

}  // namespace pbfleet::api
