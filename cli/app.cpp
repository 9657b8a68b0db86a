#include "cli/app.hpp"

#include <exception>
#include <ostream>

#include <CLI/CLI.hpp>

#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

constexpr std::string_view kFooter = R"(
Connection: the config file ($XDG_CONFIG_HOME/pbfleet/config, written by
`pbfleet connect`), then PBFLEET_URL / PBFLEET_TOKEN, then --server and
--token-file; later ones win.

Exit codes: 0 ok, 1 runtime or server error, 2 usage error,
            3 data rejected by validation.

Examples:
  pbfleet estimate --sg 1.225 --temp 41F --low -25C
  pbfleet import monday-round.csv
  pbfleet history NB-2023-0001
  pbfleet winter --low -30C --csv)";

void add_global_options(CLI::App& app, GlobalOptions& g) {
  app.add_option("--server", g.server, "Server URL, e.g. http://127.0.0.1:8470")->type_name("URL");
  app.add_option("--token-file", g.token_file, "Read the access token from the first line of FILE")
      ->type_name("FILE");
  app.add_option("--color", g.color, "Colour: auto (terminal only, honours NO_COLOR), always, never")
      ->check(CLI::IsMember({"auto", "always", "never"}))
      ->type_name("WHEN");
  app.add_flag("--ascii", g.ascii, "Draw tables and charts with ASCII only");
}

std::string usage_path(const CLI::App& app) {
  std::string path = app.get_name();
  for (const auto* sub = &app; !sub->get_subcommands().empty();) {
    sub = sub->get_subcommands().back();
    path += " " + sub->get_name();
  }
  return path;
}

int parse_and_run(CLI::App& app, const std::vector<std::string>& args, Context& ctx) {
  std::vector<const char*> argv{"pbfleet"};
  for (const auto& a : args) argv.push_back(a.c_str());
  try {
    app.parse(static_cast<int>(argv.size()), argv.data());
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e, ctx.out(), ctx.err());
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e, ctx.out(), ctx.err());
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e, ctx.out(), ctx.err());
  } catch (const CLI::ParseError& e) {
    ctx.fail(kExitUsage, e.what());
    ctx.err() << "Run '" << usage_path(app) << " --help' for usage.\n";
    return kExitUsage;
  }
  return ctx.exit_code;
}

}  // namespace

int run(const std::vector<std::string>& args, Io& io, Seams seams) {
  Context ctx(io, std::move(seams));
  CLI::App app{"pbfleet: winter health of a fleet's lead-acid starting batteries", "pbfleet"};
  app.fallthrough();  // global flags also after the subcommand
  app.require_subcommand(1);
  app.set_version_flag("--version", "pbfleet " PBFLEET_VERSION);
  app.footer(std::string(kFooter));
  add_global_options(app, ctx.global());
  for (const auto& spec : command_table()) {
    auto* command = app.add_subcommand(std::string(spec.name), std::string(spec.summary));
    spec.install(*command, ctx);
  }
  try {
    return parse_and_run(app, args, ctx);
  } catch (const std::exception& e) {
    return ctx.fail(kExitFailure, e.what());
  }
}

int run(int argc, char** argv) {
  Io io = process_io();
  std::vector<std::string> args(argv + 1, argv + argc);
  return run(args, io);
}

}  // namespace pbfleet::cli
