#include "server/api/api.hpp"

#include <atomic>
#include <chrono>
#include <exception>
#include <future>

#include <spdlog/spdlog.h>

#include "server/api/problem.hpp"
#include "server/api/router.hpp"

namespace pbfleet::api {

struct Api::Impl {
  ApiOptions options;
  Metrics metrics;
  Authenticator auth;
  ReadingWriter writer;
  ReportCache reports;
  TrendMemo trends;
  // A history answer depends on no clock, only on its battery's version;
  // 128 answers of 260 readings take about 30 MB.
  ReportCache histories{ReportCacheOptions{.max_entries = 128, .max_age = std::chrono::hours{1}}};
  Context context;
  Pages* pages = nullptr;

  Impl(storage::Store& store, const Clock& clock, ApiOptions o)
      : options(std::move(o)),
        auth(store, clock, options.auth),
        writer(store, clock, options.writer),
        context{store, clock, metrics, auth, writer, options, reports, trends, histories} {}
};

const std::string& Call::param(const std::string& name) const {
  static const std::string kEmpty;
  auto it = params.find(name);
  return it == params.end() ? kEmpty : it->second;
}

const std::string* Call::query(const std::string& name) const {
  auto it = target.query.find(name);
  return it == target.query.end() ? nullptr : &it->second;
}

Api::Api(storage::Store& store, const Clock& clock, ApiOptions options)
    : impl_(std::make_unique<Impl>(store, clock, std::move(options))) {}

Api::~Api() = default;

Metrics& Api::metrics() { return impl_->metrics; }

Context& Api::context() { return impl_->context; }

void Api::set_pages(Pages* pages) { impl_->pages = pages; }

http::Response Api::refusal(int status, std::string_view detail) {
  return problem(kind_for_status(status), detail);
}

namespace {

using Steady = std::chrono::steady_clock;

// Wraps `reply` so every answer is counted and logged exactly once.
http::Reply observed(http::Reply reply, Metrics& metrics, std::string method, std::string route,
                     std::string token) {
  const auto start = Steady::now();
  auto answered = std::make_shared<std::atomic<bool>>(false);
  return [reply = std::move(reply), &metrics, method = std::move(method),
          route = std::move(route), token = std::move(token), start, answered](http::Response r) {
    if (answered->exchange(true)) return;  // a second answer (after a throw) is dropped
    const auto took = Steady::now() - start;
    metrics.record_request(route, r.status, took);
    spdlog::info("access method={} route={} status={} duration_ms={:.3f} bytes={} token={}",
                 method, route, r.status,
                 std::chrono::duration<double, std::milli>(took).count(), r.body_text().size(), token);
    reply(std::move(r));
  };
}

// Route-level refusals: 404, 405, 400 on a broken target.
std::optional<http::Response> refuse_unmatched(const Match& m, const Target& target) {
  if (target.malformed) return problem(ProblemKind::bad_query, "broken percent-encoding in URL");
  if (m.route) return std::nullopt;
  if (m.allowed.empty()) return problem(ProblemKind::not_found, "no such resource: " + target.path);
  std::string allow;
  for (auto method : m.allowed) allow += (allow.empty() ? "" : ", ") + std::string(method);
  auto r = problem(ProblemKind::method_not_allowed, "allowed methods: " + allow);
  r.headers.emplace_back("Allow", allow);
  return r;
}

}  // namespace

void Api::dispatch(http::Request request, http::Reply reply) {
  const Target target = parse_target(request.target);
  if (impl_->pages && !target.malformed) {
    const std::string_view page_route = impl_->pages->route_of(target.path);
    if (!page_route.empty()) {
      auto done = observed(std::move(reply), impl_->metrics, request.method, std::string(page_route), "-");
      try {
        done(impl_->pages->serve(request, target));
      } catch (const std::exception& e) {
        spdlog::error("page {} {} failed: {}", request.method, page_route, e.what());
        done(problem(ProblemKind::internal, "internal error; see the server log"));
      }
      return;
    }
  }
  Match m = match_route(routes(), request.method, target.path);
  const std::string route_name = m.route ? std::string(m.route->pattern) : "unmatched";
  if (auto refused = refuse_unmatched(m, target)) {
    observed(std::move(reply), impl_->metrics, request.method, route_name, "-")(*refused);
    return;
  }
  std::optional<Caller> caller;
  if (m.route->roles != kPublic) {
    auto who = impl_->auth.authenticate(request);
    if (auto* refused = std::get_if<http::Response>(&who)) {
      observed(std::move(reply), impl_->metrics, request.method, route_name, "-")(*refused);
      return;
    }
    caller = std::get<Caller>(who);
  }
  auto done = observed(std::move(reply), impl_->metrics, request.method, route_name,
                       caller ? std::to_string(caller->token_id) : "-");
  if (caller && (m.route->roles & role_bit(caller->role)) == 0) {
    done(problem(ProblemKind::forbidden, "role '" + std::string(storage::to_string(caller->role)) +
                                             "' may not use " + std::string(m.route->method) +
                                             " " + std::string(m.route->pattern)));
    return;
  }
  if (!accepts(request.header("accept"), produced_types(*m.route))) {
    done(problem(ProblemKind::not_acceptable,
                 "this route answers " + std::string(produced_types(*m.route)) +
                     "; the Accept header admits none of them"));
    return;
  }
  Call call{request, target, std::move(m.params), caller ? &*caller : nullptr, impl_->context};
  try {
    if (m.route->async) {
      m.route->async(call, done);
    } else {
      done(m.route->sync(call));
    }
  } catch (const std::exception& e) {
    spdlog::error("handler for {} {} failed: {}", request.method, route_name, e.what());
    done(problem(ProblemKind::internal, "internal error; see the server log"));
  }
}

http::Response Api::handle(http::Request request) {
  std::promise<http::Response> promise;
  auto future = promise.get_future();
  dispatch(std::move(request), [&promise](http::Response r) { promise.set_value(std::move(r)); });
  http::Response r = future.get();
  if (r.shared_body) {  // self-contained for its callers: the body in `body`
    r.body = *r.shared_body;
    r.shared_body.reset();
  }
  return r;
}

}  // namespace pbfleet::api
