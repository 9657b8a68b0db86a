#include "tests/support/pg_cluster.hpp"

#include <arpa/inet.h>
#include <fcntl.h>
#include <grp.h>
#include <netinet/in.h>
#include <pwd.h>
#include <signal.h>
#include <sys/prctl.h>
#include <sys/socket.h>
#include <sys/wait.h>
#include <unistd.h>

#include <libpq-fe.h>

#include <chrono>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <stdexcept>
#include <thread>
#include <vector>

namespace pbfleet::testing {
namespace {

constexpr const char* kUser = "pbfleet";       // the cluster's superuser
constexpr const char* kRunAs = "nobody";       // when started as root
constexpr auto kStartLimit = std::chrono::seconds{60};
constexpr auto kStopLimit = std::chrono::seconds{30};

struct Account {
  bool switch_user = false;
  uid_t uid = 0;
  gid_t gid = 0;
};

Account account() {
  Account a;
  if (::geteuid() != 0) return a;
  const passwd* pw = ::getpwnam(kRunAs);
  if (pw == nullptr) throw std::runtime_error(std::string("no user '") + kRunAs + "' to run PostgreSQL as");
  a.switch_user = true;
  a.uid = pw->pw_uid;
  a.gid = pw->pw_gid;
  return a;
}

// fork + exec `args` as the unprivileged account, output to `log`.
// With `die_with_parent`, the child gets SIGINT when this thread dies.
pid_t spawn(const std::vector<std::string>& args, const std::filesystem::path& log,
            bool die_with_parent) {
  const Account who = account();
  std::vector<char*> argv;
  for (const auto& a : args) argv.push_back(const_cast<char*>(a.c_str()));
  argv.push_back(nullptr);
  const pid_t pid = ::fork();
  if (pid < 0) throw std::runtime_error("fork failed");
  if (pid == 0) {
    const int fd = ::open(log.c_str(), O_WRONLY | O_CREAT | O_APPEND | O_CLOEXEC, 0644);
    if (fd >= 0) {
      ::dup2(fd, 1);
      ::dup2(fd, 2);
    }
    const int null = ::open("/dev/null", O_RDONLY | O_CLOEXEC);
    if (null >= 0) ::dup2(null, 0);
    if (who.switch_user) {
      if (::setgroups(0, nullptr) != 0 || ::setgid(who.gid) != 0 || ::setuid(who.uid) != 0) _exit(126);
    }
    ::setsid();
    if (die_with_parent) ::prctl(PR_SET_PDEATHSIG, SIGINT);  // after setuid, which clears it
    ::execv(argv[0], argv.data());
    _exit(127);
  }
  return pid;
}

int wait_exit(pid_t pid) {
  int status = 0;
  while (::waitpid(pid, &status, 0) < 0 && errno == EINTR) {
  }
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

std::string tail_of(const std::filesystem::path& file) {
  std::ifstream in(file);
  std::stringstream all;
  all << in.rdbuf();
  std::string text = all.str();
  return text.size() > 2000 ? text.substr(text.size() - 2000) : text;
}

std::uint16_t free_port() {
  const int s = ::socket(AF_INET, SOCK_STREAM | SOCK_CLOEXEC, 0);
  sockaddr_in addr{};
  addr.sin_family = AF_INET;
  addr.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
  addr.sin_port = 0;
  socklen_t len = sizeof addr;
  if (s < 0 || ::bind(s, reinterpret_cast<sockaddr*>(&addr), sizeof addr) != 0 ||
      ::getsockname(s, reinterpret_cast<sockaddr*>(&addr), &len) != 0) {
    if (s >= 0) ::close(s);
    throw std::runtime_error("cannot find a free port on 127.0.0.1");
  }
  ::close(s);
  return ntohs(addr.sin_port);
}

void give_to_account(const std::filesystem::path& path) {
  const Account who = account();
  if (who.switch_user && ::chown(path.c_str(), who.uid, who.gid) != 0)
    throw std::runtime_error("cannot hand " + path.string() + " to " + kRunAs);
}

// Runs one statement on the cluster's maintenance database.
void admin_exec(std::uint16_t port, const std::string& sql) {
  const std::string conninfo =
      "host=127.0.0.1 port=" + std::to_string(port) + " user=" + kUser + " dbname=postgres";
  PGconn* c = PQconnectdb(conninfo.c_str());
  if (PQstatus(c) != CONNECTION_OK) {
    std::string error = PQerrorMessage(c);
    PQfinish(c);
    throw std::runtime_error("cannot connect to the test cluster: " + error);
  }
  PGresult* r = PQexec(c, sql.c_str());
  const bool ok = PQresultStatus(r) == PGRES_COMMAND_OK || PQresultStatus(r) == PGRES_TUPLES_OK;
  std::string error = ok ? "" : PQerrorMessage(c);
  PQclear(r);
  PQfinish(c);
  if (!ok) throw std::runtime_error(sql + ": " + error);
}

}  // namespace

std::filesystem::path PgCluster::bin_dir() {
  if (const char* dir = std::getenv("PBFLEET_PG_BIN"); dir && *dir) return dir;
  return "/usr/lib/postgresql/15/bin";
}

PgCluster::PgCluster(PgClusterOptions options) : options_(options) {
  std::string pattern = (std::filesystem::temp_directory_path() / "pbfleet-pg-XXXXXX").string();
  if (::mkdtemp(pattern.data()) == nullptr) throw std::runtime_error("mkdtemp failed");
  dir_ = pattern;
  give_to_account(dir_);
  const auto initdb = bin_dir() / "initdb";
  if (!std::filesystem::exists(initdb)) {
    throw std::runtime_error(initdb.string() +
                             " is missing: run deploy/setup (installs postgresql-15) or set "
                             "PBFLEET_PG_BIN");
  }
  const auto log = dir_ / "initdb.log";
  const pid_t pid = spawn({initdb.string(), "-D", (dir_ / "data").string(), "-U", kUser, "-A",
                           "trust", "-E", "UTF8", "--locale=C", "--no-sync", "--no-instructions"},
                          log, false);
  if (wait_exit(pid) != 0) throw std::runtime_error("initdb failed:\n" + tail_of(log));
  start();
}

void PgCluster::start() {
  const auto log = dir_ / "server.log";
  for (int attempt = 0; attempt < 3; ++attempt) {
    port_ = free_port();
    pid_ = spawn({(bin_dir() / "postgres").string(), "-D", (dir_ / "data").string(), "-p",
                  std::to_string(port_), "-c", "listen_addresses=127.0.0.1", "-c",
                  "unix_socket_directories=" + dir_.string(), "-c",
                  std::string("fsync=") + (options_.fsync ? "on" : "off"), "-c",
                  "max_connections=100", "-c", "shared_buffers=64MB"},
                 log, true);
    const std::string conninfo = "host=127.0.0.1 port=" + std::to_string(port_) + " user=" +
                                 kUser + " dbname=postgres connect_timeout=2";
    const auto until = std::chrono::steady_clock::now() + kStartLimit;
    while (std::chrono::steady_clock::now() < until) {
      if (PQping(conninfo.c_str()) == PQPING_OK) return;
      int status = 0;
      if (::waitpid(pid_, &status, WNOHANG) == pid_) {  // exited (e.g. port taken)
        pid_ = -1;
        break;
      }
      std::this_thread::sleep_for(std::chrono::milliseconds{50});
    }
    if (pid_ > 0) stop();
  }
  throw std::runtime_error("PostgreSQL did not start:\n" + tail_of(log));
}

void PgCluster::stop() {
  if (pid_ <= 0) return;
  ::kill(pid_, SIGINT);  // fast shutdown: roll back open transactions, checkpoint, exit
  const auto until = std::chrono::steady_clock::now() + kStopLimit;
  int status = 0;
  while (::waitpid(pid_, &status, WNOHANG) == 0) {
    if (std::chrono::steady_clock::now() > until) {
      ::kill(pid_, SIGQUIT);  // immediate shutdown
      ::waitpid(pid_, &status, 0);
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds{20});
  }
  pid_ = -1;
}

PgCluster::~PgCluster() {
  stop();
  if (std::getenv("PBFLEET_KEEP_TEST_DIRS") == nullptr) {
    std::error_code ignored;
    std::filesystem::remove_all(dir_, ignored);
  }
}

std::string PgCluster::uri(const std::string& database) const {
  return std::string("postgresql://") + kUser + "@127.0.0.1:" + std::to_string(port_) + "/" +
         database;
}

std::string PgCluster::create_database(const std::string& name) {
  admin_exec(port_, "CREATE DATABASE " + name);
  return uri(name);
}

std::string PgCluster::fresh_database() {
  return create_database("t" + std::to_string(::getpid()) + "_" + std::to_string(++next_database_));
}

std::uint16_t unused_local_port() { return free_port(); }

PgCluster& shared_pg_cluster() {
  static PgCluster cluster;
  return cluster;
}

}  // namespace pbfleet::testing
