// Test helpers for the CLI: a fake pbfleetd (records requests, answers from
// a script) and a captured terminal (string streams, chosen TTY-ness,
// chosen environment).
#pragma once

#include <functional>
#include <sstream>
#include <string>
#include <vector>

#include "cli/app.hpp"
#include "cli/client/api.hpp"

namespace pbfleet::cli::testing {

class FakeServer {
 public:
  using Handler = std::function<client::HttpResponse(const client::HttpRequest&)>;

  explicit FakeServer(Handler handler) : handler_(std::move(handler)) {}

  client::Transport transport() {
    return [this](const client::HttpRequest& r) -> models::Result<client::HttpResponse> {
      requests.push_back(r);
      return handler_(r);
    };
  }

  std::vector<client::HttpRequest> requests;

 private:
  Handler handler_;
};

inline client::HttpResponse json_response(int status, const std::string& body) {
  return {status, status >= 400 ? "application/problem+json" : "application/json", body};
}

// A terminal made of strings.
struct Terminal {
  std::istringstream in;
  std::ostringstream out;
  std::ostringstream err;
  Io io;

  explicit Terminal(std::string input = "", bool tty = false) : in(std::move(input)) {
    io.in = &in;
    io.out = &out;
    io.err = &err;
    io.in_tty = io.out_tty = io.err_tty = tty;
    io.env = {{"HOME", "/nonexistent-pbfleet-test-home"}, {"LANG", "C.UTF-8"}};
  }

  int run(const std::vector<std::string>& args, Seams seams = {}) { return cli::run(args, io, std::move(seams)); }
};

// A fixed clock: 2026-12-01T12:00:00Z.
inline std::chrono::sys_seconds test_now() {
  using namespace std::chrono;
  return sys_days{year{2026} / December / 1} + hours{12};
}

// The seams of a command run against `server` at test_now().
inline Seams seams(FakeServer& server) { return {server.transport(), test_now}; }

}  // namespace pbfleet::cli::testing
