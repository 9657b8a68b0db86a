// `pbfleet battery add|list|show|fit|retire`: the batteries themselves.
#include <optional>

#include "cli/commands/remote.hpp"
#include "cli/commands/table.hpp"

namespace pbfleet::cli {
namespace {

using client::Json;
using client::url_encode;

struct BatteryAddFlags {
  std::string serial;
  std::string chemistry = "flooded";
  double nominal_v = 12;
  std::optional<double> rated_cca_a;
  std::optional<double> reserve_capacity_min;
  std::optional<double> capacity_ah;
  std::optional<double> full_sg;
  std::optional<std::string> installed_on;
  std::optional<long> vehicle_id;
  OutputFlags output;
};

template <class T>
void put(Json& body, const char* key, const std::optional<T>& value) {
  if (value) body[key] = *value;
}

Json battery_body(const BatteryAddFlags& f) {
  Json body{{"serial", f.serial}, {"chemistry", f.chemistry}, {"nominal_v", f.nominal_v}};
  put(body, "rated_cca_a", f.rated_cca_a);
  put(body, "reserve_capacity_min", f.reserve_capacity_min);
  put(body, "capacity_ah", f.capacity_ah);
  put(body, "full_charge_sg", f.full_sg);
  put(body, "installed_on", f.installed_on);
  put(body, "vehicle_id", f.vehicle_id);
  return body;
}

// POSTs `body` to `path` and prints the answer as one object.
int post_and_show(Context& ctx, const std::string& path, const Json& body, OutputMode mode) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->post(path, body);
  if (!reply.ok) return ctx.fail(reply);
  print_object(ctx, reply.json, mode);
  return kExitOk;
}

struct BatteryListFlags {
  std::string depot;
  std::string status;
  std::string chemistry;
  OutputFlags output;
};

int run_list(const BatteryListFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto list = fetch_all(*api, "/v1/batteries", {{"depot_id", f.depot}, {"status", f.status}, {"chemistry", f.chemistry}});
  if (list.failure) return ctx.fail(*list.failure);
  print_list(ctx, list.items, f.output.mode(),
             {"serial", "chemistry", "nominal_v", "rated_cca_a", "full_charge_sg", "installed_on", "vehicle_id",
              "status"});
  return kExitOk;
}

struct SerialFlags {
  std::string serial;
  long vehicle_id = 0;
  std::string reason;
  OutputFlags output;
};

int run_show(const SerialFlags& f, Context& ctx) {
  int code = kExitOk;
  auto api = api_or_fail(ctx, code);
  if (!api) return code;
  auto reply = api->get("/v1/batteries/" + url_encode(f.serial));
  if (!reply.ok) return ctx.fail(reply);
  print_object(ctx, reply.json, f.output.mode());
  return kExitOk;
}

void add_add(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<BatteryAddFlags>();
  auto* add = cmd.add_subcommand("add", "Register a battery");
  add->add_option("serial", f->serial, "Serial number on the case")->required();
  add->add_option("--chemistry", f->chemistry, "flooded, efb, agm or gel")
      ->check(CLI::IsMember({"flooded", "efb", "agm", "gel"}))->capture_default_str();
  add->add_option("--volts", f->nominal_v, "Nominal voltage (12 for six cells)")->capture_default_str();
  add->add_option("--rated-cca", f->rated_cca_a, "Rated cold cranking current (A)")->type_name("A");
  add->add_option("--reserve-min", f->reserve_capacity_min, "Reserve capacity (minutes)")->type_name("MIN");
  add->add_option("--capacity-ah", f->capacity_ah, "Capacity at the 20 h rate (Ah)")->type_name("AH");
  add->add_option("--full-sg", f->full_sg, "SG when fully charged, at 25 C")->type_name("SG");
  add->add_option("--installed", f->installed_on, "Date it went into service (YYYY-MM-DD)")->type_name("DATE");
  add->add_option("--vehicle", f->vehicle_id, "Vehicle id it is fitted to")->type_name("ID");
  add_output_flags(*add, f->output, false);
  add->footer(example("pbfleet battery add NB-2023-0001 --rated-cca 800 --reserve-min 160 --installed 2023-10-02 --vehicle 3"));
  add->callback([f, &ctx] { ctx.exit_code = post_and_show(ctx, "/v1/batteries", battery_body(*f), f->output.mode()); });
}

void add_list(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<BatteryListFlags>();
  auto* list = cmd.add_subcommand("list", "List batteries");
  list->add_option("--depot", f->depot, "Only this depot (id)")->type_name("ID");
  list->add_option("--status", f->status, "in_service or retired")->check(CLI::IsMember({"in_service", "retired"}));
  list->add_option("--chemistry", f->chemistry, "flooded, efb, agm or gel")
      ->check(CLI::IsMember({"flooded", "efb", "agm", "gel"}));
  add_output_flags(*list, f->output, true);
  list->footer(example("pbfleet battery list --depot 1 --status in_service"));
  list->callback([f, &ctx] { ctx.exit_code = run_list(*f, ctx); });
}

void add_serial_commands(CLI::App& cmd, Context& ctx) {
  auto s = std::make_shared<SerialFlags>();
  auto* show = cmd.add_subcommand("show", "Show one battery");
  show->add_option("serial", s->serial, "Battery serial")->required();
  add_output_flags(*show, s->output, false);
  show->footer(example("pbfleet battery show NB-2023-0001"));
  show->callback([s, &ctx] { ctx.exit_code = run_show(*s, ctx); });

  auto f = std::make_shared<SerialFlags>();
  auto* fit = cmd.add_subcommand("fit", "Fit a battery to a vehicle");
  fit->add_option("serial", f->serial, "Battery serial")->required();
  fit->add_option("--vehicle", f->vehicle_id, "Vehicle id")->required()->type_name("ID");
  add_output_flags(*fit, f->output, false);
  fit->footer(example("pbfleet battery fit NB-2023-0001 --vehicle 7"));
  fit->callback([f, &ctx] {
    ctx.exit_code = post_and_show(ctx, "/v1/batteries/" + url_encode(f->serial) + "/fit",
                                  Json{{"vehicle_id", f->vehicle_id}}, f->output.mode());
  });

  auto r = std::make_shared<SerialFlags>();
  auto* retire = cmd.add_subcommand("retire", "Take a battery out of service for good");
  retire->add_option("serial", r->serial, "Battery serial")->required();
  retire->add_option("--reason", r->reason, "Why, in a few words")->required();
  add_output_flags(*retire, r->output, false);
  retire->footer(example("pbfleet battery retire NB-2019-0114 --reason \"cell 4 shorted\""));
  retire->callback([r, &ctx] {
    ctx.exit_code = post_and_show(ctx, "/v1/batteries/" + url_encode(r->serial) + "/retire",
                                  Json{{"reason", r->reason}}, r->output.mode());
  });
}

}  // namespace

void install_battery(CLI::App& cmd, Context& ctx) {
  cmd.require_subcommand(1);
  cmd.footer(example("pbfleet battery add NB-2023-0001 --rated-cca 800 --vehicle 3\n"
                     "pbfleet battery fit NB-2023-0001 --vehicle 7"));
  add_add(cmd, ctx);
  add_list(cmd, ctx);
  add_serial_commands(cmd, ctx);
}

}  // namespace pbfleet::cli
