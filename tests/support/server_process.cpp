#include "tests/support/server_process.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/prctl.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <iterator>
#include <mutex>
#include <set>
#include <sstream>
#include <stdexcept>
#include <thread>

#include "tests/support/http_client.hpp"

#ifndef PBFLEET_DAEMON_PATH
#error "PBFLEET_DAEMON_PATH must name the pbfleetd executable (set by CMake)"
#endif

namespace pbfleet::testing {

namespace {

constexpr auto kStartLimit = std::chrono::seconds{20};
constexpr auto kPoll = std::chrono::milliseconds{20};
constexpr int kDefaultWatchdogS = 300;

// Every daemon this test process runs, for the watchdog and exit handler.
struct Registry {
  std::mutex mutex;
  std::set<pid_t> pids;
  std::once_flag watchdog_started;
};

Registry& registry() {
  static Registry* r = new Registry;  // never destroyed: used from atexit
  return *r;
}

void kill_all() {
  std::lock_guard lock(registry().mutex);
  for (pid_t pid : registry().pids) ::kill(pid, SIGKILL);
}

void start_watchdog() {
  std::call_once(registry().watchdog_started, [] {
    int limit_s = kDefaultWatchdogS;
    if (const char* env = std::getenv("PBFLEET_TEST_WATCHDOG_S")) limit_s = std::atoi(env);
    std::atexit(kill_all);
    std::thread([limit_s] {
      std::this_thread::sleep_for(std::chrono::seconds{limit_s});
      std::cerr << "watchdog: test ran over " << limit_s << " s; killing its daemons\n";
      kill_all();
      std::_Exit(3);
    }).detach();
  });
}

bool reap(pid_t pid, int* status, bool wait) {
  return ::waitpid(pid, status, wait ? 0 : WNOHANG) == pid;
}

bool healthy(std::uint16_t port) {
  try {
    HttpClient client(port, std::chrono::seconds{2});
    return client.get("/healthz").status == 200;
  } catch (const TransportError&) {
    return false;
  }
}

std::uint16_t read_port(const std::filesystem::path& file) {
  std::ifstream in(file);
  unsigned port = 0;
  if (in >> port && port > 0 && port < 65536) return static_cast<std::uint16_t>(port);
  return 0;
}

}  // namespace

TempDir::TempDir(const std::string& prefix) {
  const char* base = std::getenv("TMPDIR");
  std::string pattern = std::string(base && *base ? base : "/tmp") + "/" + prefix + "-XXXXXX";
  if (::mkdtemp(pattern.data()) == nullptr) throw std::runtime_error("mkdtemp failed");
  path_ = pattern;
}

TempDir::~TempDir() {
  if (std::getenv("PBFLEET_KEEP_TEST_DIRS")) return;
  std::error_code ignored;
  std::filesystem::remove_all(path_, ignored);
}

std::filesystem::path ServerProcess::executable() { return PBFLEET_DAEMON_PATH; }

ServerProcess::ServerProcess(ServerConfig config) : config_(std::move(config)) { start(); }

ServerProcess::~ServerProcess() {
  if (running()) kill_hard();
}

void ServerProcess::start() {
  if (running()) throw std::logic_error("daemon already running");
  start_watchdog();
  const auto port_file = std::filesystem::path(config_.db.string() + ".port");
  std::filesystem::remove(port_file);
  std::vector<std::string> args{executable().string(), "--listen", "127.0.0.1:0",
                                "--log-level", config_.log_level, "--port-file", port_file.string()};
  if (config_.database.empty()) {
    args.insert(args.end(), {"--db", config_.db.string()});
  } else {
    args.insert(args.end(), {"--database", config_.database});
  }
  if (!config_.admin_token.empty() && !std::filesystem::exists(config_.admin_token)) {
    args.push_back("--init-admin-token");
    args.push_back(config_.admin_token.string());
  }
  args.insert(args.end(), config_.extra_args.begin(), config_.extra_args.end());
  std::vector<char*> argv;
  for (auto& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);

  const pid_t parent = ::getpid();
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error("fork failed");
  if (pid == 0) {
    // Dies with the test process (the forking thread, in fact: tests fork
    // from their main thread).
    ::prctl(PR_SET_PDEATHSIG, SIGKILL);
    if (::getppid() != parent) ::_exit(126);
    const int fd = ::open(config_.log.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0600);
    if (fd >= 0) {
      ::dup2(fd, 1);
      ::dup2(fd, 2);
    }
    ::execv(argv[0], argv.data());
    ::_exit(127);
  }
  {
    std::lock_guard lock(registry().mutex);
    registry().pids.insert(pid);
  }
  pid_ = pid;
  const auto deadline = std::chrono::steady_clock::now() + kStartLimit;
  for (;;) {
    int status = 0;
    if (reap(pid_, &status, false)) {
      pid_ = -1;
      throw std::runtime_error("pbfleetd exited at start; log:\n" + log_text());
    }
    if (std::chrono::steady_clock::now() > deadline) {
      kill_hard();
      throw std::runtime_error("pbfleetd did not answer /healthz in time; log:\n" + log_text());
    }
    port_ = read_port(port_file);
    if (port_ != 0 && healthy(port_)) return;
    std::this_thread::sleep_for(kPoll);
  }
}

void ServerProcess::kill_hard() {
  if (!running()) return;
  ::kill(pid_, SIGKILL);
  reap(pid_, nullptr, true);
  std::lock_guard lock(registry().mutex);
  registry().pids.erase(pid_);
  pid_ = -1;
}

int ServerProcess::terminate(std::chrono::milliseconds grace) {
  if (!running()) return -1;
  ::kill(pid_, SIGTERM);
  const auto deadline = std::chrono::steady_clock::now() + grace;
  int status = 0;
  while (!reap(pid_, &status, false)) {
    if (std::chrono::steady_clock::now() > deadline) {
      kill_hard();
      return -1;
    }
    std::this_thread::sleep_for(kPoll);
  }
  {
    std::lock_guard lock(registry().mutex);
    registry().pids.erase(pid_);
  }
  pid_ = -1;
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string ServerProcess::admin_token() const { return read_text_file(config_.admin_token); }

std::string ServerProcess::log_text() const {
  std::ifstream in(config_.log, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

std::string read_text_file(const std::filesystem::path& file) {
  std::ifstream in(file, std::ios::binary);
  std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  while (!text.empty() && (text.back() == '\n' || text.back() == '\r')) text.pop_back();
  return text;
}

std::size_t count_in_file(const std::filesystem::path& file, const std::string& needle) {
  if (needle.empty() || !std::filesystem::exists(file)) return 0;
  std::ifstream in(file, std::ios::binary);
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  std::size_t count = 0;
  for (auto at = text.find(needle); at != std::string::npos; at = text.find(needle, at + needle.size()))
    ++count;
  return count;
}

}  // namespace pbfleet::testing
