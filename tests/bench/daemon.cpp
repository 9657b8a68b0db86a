#include "tests/bench/daemon.hpp"

#include <fcntl.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <atomic>
#include <cstdlib>
#include <iterator>
#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>
#include <stdexcept>
#include <thread>

#include "tests/bench/http_client.hpp"

namespace pbfleet::bench {

namespace {

constexpr auto kStartLimit = std::chrono::seconds{20};
constexpr auto kStopGrace = std::chrono::seconds{10};
std::atomic<pid_t> g_running{-1};  // the one daemon a benchmark runs at a time

// The port pbfleetd wrote to its --port-file, or 0 while the line is not
// complete yet.
std::uint16_t port_from(const std::filesystem::path& file) {
  std::ifstream in(file);
  const std::string text{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  if (text.empty() || text.back() != '\n') return 0;
  const unsigned long port = std::strtoul(text.c_str(), nullptr, 10);
  return port > 0 && port < 65536 ? static_cast<std::uint16_t>(port) : 0;
}

bool answers(std::uint16_t port) {
  try {
    HttpClient client("127.0.0.1", port);
    return client.send("GET", "/healthz").status == 200;
  } catch (const std::exception&) {
    return false;
  }
}

bool exited(pid_t pid) { return ::waitpid(pid, nullptr, WNOHANG) == pid; }

}  // namespace

Daemon::Daemon(const std::filesystem::path& exe, const std::filesystem::path& db,
               const std::filesystem::path& log)
    : Daemon(exe, log, {"--db", db.string()}) {}

Daemon::Daemon(const std::filesystem::path& exe, const std::string& database_uri,
               const std::filesystem::path& log)
    : Daemon(exe, log, {"--database", database_uri}) {}

Daemon::Daemon(const std::filesystem::path& exe, const std::filesystem::path& log,
               std::vector<std::string> database_args) {
  const std::filesystem::path port_file = log.string() + ".port";
  std::filesystem::remove(port_file);
  std::vector<std::string> args{exe.string(), "--listen", "127.0.0.1:0", "--port-file",
                                port_file.string(), "--log-level", "warn"};
  args.insert(args.end(), database_args.begin(), database_args.end());
  std::vector<char*> argv;
  for (auto& a : args) argv.push_back(a.data());
  argv.push_back(nullptr);
  pid_ = ::fork();
  if (pid_ < 0) throw std::runtime_error("fork failed");
  if (pid_ == 0) {
    const int fd = ::open(log.c_str(), O_WRONLY | O_CREAT | O_APPEND, 0600);
    if (fd >= 0) { ::dup2(fd, 1); ::dup2(fd, 2); }
    ::execv(exe.c_str(), argv.data());
    ::_exit(127);
  }
  g_running = pid_;
  const auto deadline = std::chrono::steady_clock::now() + kStartLimit;
  while ((port_ = port_from(port_file)) == 0 || !answers(port_)) {
    if (exited(pid_) || std::chrono::steady_clock::now() > deadline) {
      stop();
      throw std::runtime_error("pbfleetd did not start (see " + log.string() + ")");
    }
    std::this_thread::sleep_for(std::chrono::milliseconds{50});
  }
}

Daemon::~Daemon() { stop(); }

void Daemon::stop() {
  if (pid_ <= 0) return;
  ::kill(pid_, SIGTERM);
  const auto deadline = std::chrono::steady_clock::now() + kStopGrace;
  while (!exited(pid_)) {
    if (std::chrono::steady_clock::now() > deadline) {
      ::kill(pid_, SIGKILL);
      ::waitpid(pid_, nullptr, 0);
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds{20});
  }
  pid_ = -1;
  g_running = -1;
}

long Daemon::status_kb(const std::string& field) const {
  std::ifstream in("/proc/" + std::to_string(pid_) + "/status");
  std::string line;
  while (std::getline(in, line)) {
    if (line.rfind(field + ":", 0) == 0) return std::stol(line.substr(field.size() + 1));
  }
  return -1;
}

double Daemon::cpu_seconds(const std::string& thread) const {
  const std::filesystem::path tasks = "/proc/" + std::to_string(pid_) + "/task";
  std::error_code ec;
  double ticks = 0;
  for (const auto& task : std::filesystem::directory_iterator(tasks, ec)) {
    std::ifstream in(task.path() / "stat");
    std::string stat((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
    // "tid (comm) state ppid ...": utime and stime are fields 14 and 15.
    const auto open = stat.find('('), close = stat.rfind(')');
    if (open == std::string::npos || close == std::string::npos) continue;
    if (!thread.empty() && stat.substr(open + 1, close - open - 1) != thread) continue;
    std::istringstream fields(stat.substr(close + 2));
    std::string field;
    for (int i = 3; i <= 15 && fields >> field; ++i)
      if (i >= 14) ticks += std::stod(field);
  }
  return ticks / static_cast<double>(::sysconf(_SC_CLK_TCK));
}

void kill_daemons() {
  const pid_t pid = g_running.load();
  if (pid > 0) ::kill(pid, SIGKILL);
}

}  // namespace pbfleet::bench
