// `pbfleet depot add|list`: the yards where batteries are read.
#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli {
namespace {

struct DepotAddFlags {
  std::string name;
  std::string time_zone;
  std::string design_low;
  OutputFlags output;
};

int run_depot_add(const DepotAddFlags& f, Context& ctx) {
  client::Json body{{"name", f.name}, {"time_zone", f.time_zone}};
  auto low = models::wire::parse_temperature(f.design_low, "--design-low");
  if (!low) return ctx.fail(kExitRejected, describe(low.error()));
  body["design_low_c"] = low->value.value;
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->post("/v1/depots", body);
  if (!reply.ok) return ctx.fail(reply);
  print_object(ctx, reply.json, f.output.mode());
  return kExitOk;
}

int run_depot_list(const OutputFlags& output, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto list = fetch_all(*api, "/v1/depots", {});
  if (list.failure) return ctx.fail(*list.failure);
  print_list(ctx, list.items, output.mode(), {"id", "name", "time_zone", "design_low_c"});
  return kExitOk;
}

}  // namespace

void install_depot(CLI::App& cmd, Context& ctx) {
  cmd.require_subcommand(1);
  cmd.footer(example("pbfleet depot add \"North Yard\" --time-zone Europe/Oslo --design-low -25C\npbfleet depot list"));

  auto add_flags = std::make_shared<DepotAddFlags>();
  auto* add = cmd.add_subcommand("add", "Register a depot");
  add->add_option("name", add_flags->name, "Depot name")->required();
  add->add_option("--time-zone", add_flags->time_zone, "IANA time zone, e.g. Europe/Oslo")->required()->type_name("ZONE");
  add->add_option("--design-low", add_flags->design_low, "Coldest temperature to plan for, e.g. -25C")
      ->required()->type_name("TEMP");
  add_output_flags(*add, add_flags->output, false);
  add->footer(example("pbfleet depot add \"Ridge Pass\" --time-zone Europe/Oslo --design-low -32C"));
  add->callback([add_flags, &ctx] { ctx.exit_code = run_depot_add(*add_flags, ctx); });

  auto list_flags = std::make_shared<OutputFlags>();
  auto* list = cmd.add_subcommand("list", "List depots");
  add_output_flags(*list, *list_flags, true);
  list->footer(example("pbfleet depot list --csv"));
  list->callback([list_flags, &ctx] { ctx.exit_code = run_depot_list(*list_flags, ctx); });
}

}  // namespace pbfleet::cli
