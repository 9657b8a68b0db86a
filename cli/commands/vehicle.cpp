// `pbfleet vehicle add|list`: vehicles batteries are fitted to, with the
// engine's cranking need.
#include <optional>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

struct VehicleAddFlags {
  std::string code;
  long depot_id = 0;
  std::optional<std::string> engine;
  std::optional<double> displacement_l;
  std::optional<double> required_cca_a;
  OutputFlags output;
};

client::Json vehicle_body(const VehicleAddFlags& f) {
  client::Json body{{"code", f.code}, {"depot_id", f.depot_id}};
  if (f.engine) body["engine"] = *f.engine;
  if (f.displacement_l) body["displacement_l"] = *f.displacement_l;
  if (f.required_cca_a) body["required_cca_a"] = *f.required_cca_a;
  return body;
}

int run_vehicle_add(const VehicleAddFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->post("/v1/vehicles", vehicle_body(f));
  if (!reply.ok) return ctx.fail(reply);
  print_object(ctx, reply.json, f.output.mode());
  return kExitOk;
}

struct VehicleListFlags {
  std::string depot;
  OutputFlags output;
};

int run_vehicle_list(const VehicleListFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto list = fetch_all(*api, "/v1/vehicles", {{"depot_id", f.depot}});
  if (list.failure) return ctx.fail(*list.failure);
  print_list(ctx, list.items, f.output.mode(), {"id", "code", "depot_id", "engine", "displacement_l", "required_cca_a"});
  return kExitOk;
}

}  // namespace

void install_vehicle(CLI::App& cmd, Context& ctx) {
  cmd.require_subcommand(1);
  cmd.footer(example("pbfleet vehicle add TR-104 --depot 1 --engine diesel --displacement-l 7.7"));

  auto a = std::make_shared<VehicleAddFlags>();
  auto* add = cmd.add_subcommand("add", "Register a vehicle");
  add->add_option("code", a->code, "Fleet code painted on the vehicle")->required();
  add->add_option("--depot", a->depot_id, "Depot id")->required()->type_name("ID");
  add->add_option("--engine", a->engine, "gasoline or diesel")
                     ->check(CLI::IsMember({"gasoline", "diesel"}))->type_name("KIND");
  add->add_option("--displacement-l", a->displacement_l, "Engine displacement in litres")->type_name("L");
  add->add_option("--required-cca", a->required_cca_a, "Cranking need at -18 C, when known (A); overrides the estimate from the engine")->type_name("A");
  add_output_flags(*add, a->output, false);
  add->footer(example("pbfleet vehicle add VAN-12 --depot 2 --engine gasoline --displacement-l 2.0\n"
                      "pbfleet vehicle add PLOUGH-3 --depot 3 --engine diesel --required-cca 1000"));
  add->callback([a, &ctx] { ctx.exit_code = run_vehicle_add(*a, ctx); });

  auto l = std::make_shared<VehicleListFlags>();
  auto* list = cmd.add_subcommand("list", "List vehicles");
  list->add_option("--depot", l->depot, "Only this depot (id)")->type_name("ID");
  add_output_flags(*list, l->output, true);
  list->footer(example("pbfleet vehicle list --depot 1"));
  list->callback([l, &ctx] { ctx.exit_code = run_vehicle_list(*l, ctx); });
}

}  // namespace pbfleet::cli
