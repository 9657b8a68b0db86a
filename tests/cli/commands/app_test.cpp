#include "cli/app.hpp"

#include <doctest/doctest.h>

#include "cli/commands/table.hpp"
#include "tests/cli/fake_server.hpp"

using namespace pbfleet::cli;

TEST_CASE("--help and --version print to stdout and exit 0") {
  testing::Terminal help;
  CHECK(help.run({"--help"}) == 0);
  CHECK(help.out.str().find("Exit codes") != std::string::npos);
  CHECK(help.err.str().empty());
  testing::Terminal version;
  CHECK(version.run({"--version"}) == 0);
  CHECK(version.out.str().rfind("pbfleet ", 0) == 0);
}

TEST_CASE("every command in the table has help with an example") {
  for (const auto& spec : command_table()) {
    testing::Terminal term;
    CAPTURE(spec.name);
    CHECK(term.run({std::string(spec.name), "--help"}) == 0);
    CHECK(term.out.str().find("Example") != std::string::npos);
  }
}

TEST_CASE("usage errors exit 2 with the message on stderr and nothing on stdout") {
  for (std::vector<std::string> args : {std::vector<std::string>{}, {"frobnicate"}, {"estimate", "--sg"},
                                        {"estimate"}, {"battery"}, {"battery", "fit", "NB-1"},
                                        {"overdue", "--days", "0"}, {"--color", "pink", "estimate", "--sg", "1.2"}}) {
    testing::Terminal term;
    CAPTURE(args.size());
    CHECK(term.run(args) == kExitUsage);
    CHECK(term.out.str().empty());
    CHECK(term.err.str().find("error") != std::string::npos);
  }
}

TEST_CASE("a list given to --sg points to --cell-sg, for log and estimate alike") {
  for (std::vector<std::string> args : {std::vector<std::string>{"estimate", "--sg", "1.231,1.236"},
                                        {"log", "NB-1", "--sg", "1.231,1.236", "--ocv", "12.4"}}) {
    testing::Terminal term;
    CAPTURE(args.front());
    CHECK(term.run(args) == kExitUsage);
    CHECK(term.out.str().empty());
    CHECK(term.err.str().find("--sg: takes one SG for the battery; for one per cell use --cell-sg") !=
          std::string::npos);
  }
}

TEST_CASE("global flags are accepted after the subcommand too") {
  testing::Terminal term;
  CHECK(term.run({"estimate", "--sg", "1.250", "--ascii", "--color", "never"}) == 0);
}
