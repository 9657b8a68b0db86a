#include "cli/commands/estimate.hpp"

#include <array>
#include <cmath>
#include <cstdlib>

#include "cli/commands/context.hpp"
#include "cli/commands/render.hpp"
#include "cli/commands/sg_flags.hpp"
#include "cli/commands/table.hpp"
#include "models/wire/precision.hpp"
#include "models/wire/reading.hpp"

namespace pbfleet::cli {
namespace {

using client::Json;
using models::Error;

using models::wire::kDerivedDecimals;
using models::wire::kSgDecimals;
using models::wire::kVoltDecimals;
using models::wire::rounded;

constexpr std::array<std::pair<std::string_view, std::string_view>, 19> kFieldFlags = {{
    {"electrolyte_temp_f", "--temp"}, {"ambient_temp_c", "--ambient"}, {"ambient_temp_f", "--ambient"},
    {"load_test_a", "--load-test-a"}, {"load_test_end_v", "--load-test-end-v"}, {"taken_at", "--at"},
    {"reading_id", "--id"},
    {"cell_sg", "--sg/--cell-sg"},     {"ocv_v", "--ocv"},          {"electrolyte_temp_c", "--temp"},
    {"chemistry", "--chemistry"},     {"cells", "--cells"},        {"full_sg", "--full-sg"},
    {"rest_h", "--rest-hours"},       {"rated_cca_a", "--rated-cca"}, {"low_c", "--low"},
    {"required_cca_a", "--required-cca"}, {"engine", "--engine"}, {"displacement_l", "--displacement-l"},
}};

Json number_or_null(const std::optional<double>& x, int decimals) {
  return x ? Json(rounded(*x, decimals)) : Json();
}

models::Result<models::Celsius> temperature(const std::string& text, std::string_view flag) {
  auto t = models::wire::parse_temperature(text, flag);
  if (!t) return t.error();
  return t->value;
}

models::Result<bool> fill_engine(const EstimateFlags& f, models::EstimateInput& in) {
  if (!f.engine) return true;
  auto kind = models::parse_engine_kind(*f.engine);
  if (!kind) return Error{"--engine", "unknown engine '" + *f.engine + "'", "gasoline, diesel"};
  if (!f.displacement_l) return Error{"--displacement-l", "needed with --engine", "litres, e.g. 2.0"};
  in.engine = kind;
  in.displacement_l = f.displacement_l;
  return true;
}

void fill_cells(const EstimateFlags& f, models::EstimateInput& in) {
  if (f.sg) in.cell_sg.push_back({*f.sg});
  for (double v : f.cell_sg) in.cell_sg.push_back({v});
}

}  // namespace

std::string flag_for_field(std::string_view field, std::size_t sg_values) {
  auto base = field.substr(0, field.find('['));
  if (base == "cell_sg" && sg_values <= 1) return "--sg";
  if (base == "cell_sg" && field.size() > base.size() + 2) {
    int index = std::atoi(std::string(field.substr(base.size() + 1)).c_str());
    return "--cell-sg (cell " + std::to_string(index + 1) + ")";
  }
  for (const auto& [wire, flag] : kFieldFlags) {
    if (wire == base) return std::string(flag) + std::string(field.substr(base.size()));
  }
  return std::string(field);
}

models::Result<models::EstimateInput> estimate_input(const EstimateFlags& f) {
  auto chemistry = models::parse_chemistry(f.chemistry);
  if (!chemistry) return Error{"--chemistry", "unknown chemistry '" + f.chemistry + "'", "flooded, efb, agm, gel"};
  if (f.cells < 1 || f.cells > models::wire::kMaxCells) {
    return Error{"--cells", std::to_string(f.cells) + " cells", "1 to " + std::to_string(models::wire::kMaxCells)};
  }
  models::EstimateInput in;
  in.spec = models::default_spec(*chemistry, f.cells);
  if (f.full_sg) in.spec.full_charge_sg = {*f.full_sg};
  if (f.rated_cca_a) in.spec.rated_cca = {*f.rated_cca_a};
  fill_cells(f, in);
  if (in.cell_sg.size() > 1 && static_cast<int>(in.cell_sg.size()) != f.cells) {
    return Error{"--cell-sg", std::to_string(in.cell_sg.size()) + " values for a " + std::to_string(f.cells) + "-cell battery",
                 "one value per cell (" + std::to_string(f.cells) + "), or --cells to match"};
  }
  if (f.ocv_v) in.ocv = models::Volts{*f.ocv_v};
  auto t = temperature(f.temp, "--temp");
  if (!t) return t.error();
  in.electrolyte = *t;
  if (f.low) {
    auto low = temperature(*f.low, "--low");
    if (!low) return low.error();
    in.low = *low;
  }
  if (f.rest_h) in.rest = models::Hours{*f.rest_h};
  if (f.required_cca_a) in.required_cca = models::Amperes{*f.required_cca_a};
  auto engine = fill_engine(f, in);
  if (!engine) return engine.error();
  return in;
}

Json estimate_json(const models::EstimateInput& in, const models::EstimateOutput& o) {
  Json j = Json::object();
  j["chemistry"] = std::string(models::to_string(in.spec.chemistry));
  j["cells"] = in.spec.cells;
  j["electrolyte_temp_c"] = rounded(in.electrolyte.value, kDerivedDecimals);
  j["corrected_sg"] = number_or_null(o.corrected_sg, kSgDecimals);
  j["acid_molality"] = number_or_null(o.acid_molality, kDerivedDecimals);
  j["acid_wt_percent"] = number_or_null(o.acid_wt_percent, kDerivedDecimals);
  j["cell_emf_v"] = number_or_null(o.cell_emf_v, kVoltDecimals);
  j["ocv_model_v"] = number_or_null(o.ocv_model_v, kVoltDecimals);
  j["soc_from_sg_percent"] = number_or_null(o.soc_from_sg_percent, kDerivedDecimals);
  j["table_soc_from_sg_percent"] = number_or_null(o.table_soc_from_sg_percent, kDerivedDecimals);
  if (in.ocv) {
    j["soc_from_ocv_percent"] = number_or_null(o.soc_from_ocv_percent, kDerivedDecimals);
    j["table_soc_from_ocv_percent"] = number_or_null(o.table_soc_from_ocv_percent, kDerivedDecimals);
    j["ocv_settled"] = o.ocv_settled ? Json(*o.ocv_settled) : Json();
  }
  j["soc_percent"] = rounded(o.soc_percent, kDerivedDecimals);
  j["soc_uncertainty_percent"] = rounded(o.soc_uncertainty_percent, kDerivedDecimals);
  j["disagreement"] = o.disagreement;
  j["freeze_point_c"] = number_or_null(o.freeze_point_c, kDerivedDecimals);
  if (in.low) {
    j["low_c"] = rounded(in.low->value, kDerivedDecimals);
    j["freeze_margin_c"] = number_or_null(o.freeze_margin_c, kDerivedDecimals);
  }
  if (in.cell_sg.size() >= 2) {
    Json cells = Json::array();
    for (double v : o.corrected_cell_sg) cells.push_back(rounded(v, kSgDecimals));
    j["corrected_cell_sg"] = std::move(cells);
    j["cell_spread"] = number_or_null(o.cell_spread, kSgDecimals);
    j["weak_cell"] = o.weak_cell ? Json(*o.weak_cell) : Json();
  }
  if (in.spec.rated_cca.value > 0 && in.low) {
    j["available_cca"] = number_or_null(o.available_cca, 1);
    j["required_cca_at_low"] = number_or_null(o.required_cca_at_low, 1);
    j["crank_margin"] = number_or_null(o.crank_margin, kDerivedDecimals);
  }
  j["flags"] = o.flags;
  j["notes"] = o.notes;
  return j;
}

int run_estimate(const EstimateFlags& flags, OutputMode mode, Context& ctx) {
  if (!flags.sg && flags.cell_sg.empty() && !flags.ocv_v) {
    return ctx.fail(kExitUsage, "give --sg, --cell-sg or --ocv (see pbfleet estimate --help)");
  }
  auto input = estimate_input(flags);
  if (!input) return ctx.fail(kExitRejected, describe(input.error()));
  auto output = models::estimate(*input);
  if (!output) {
    auto e = output.error();
    e.field = flag_for_field(e.field, input->cell_sg.size());
    return ctx.fail(kExitRejected, describe(e));
  }
  if (mode == OutputMode::json) {
    ctx.out() << estimate_json(*input, *output).dump(2) << '\n';
  } else {
    ctx.out() << estimate_text(*input, *output, ctx.out_style().unicode);
  }
  return kExitOk;
}

void install_estimate(CLI::App& cmd, Context& ctx) {
  auto f = std::make_shared<EstimateFlags>();
  auto out = std::make_shared<OutputFlags>();
  auto* sg = cmd.add_option("--sg", f->sg, "Hydrometer SG as read (one value for the battery)")
                 ->type_name("SG")
                 ->check(one_sg_value());
  auto* cells = cmd.add_option("--cell-sg", f->cell_sg, "Hydrometer SG per cell, cell 1 first: 1.265,1.260,...")
                    ->delimiter(',')
                    ->type_name("SG,SG,...");
  sg->excludes(cells);
  cmd.add_option("--ocv", f->ocv_v, "Open-circuit voltage of the battery")->type_name("VOLTS");
  cmd.add_option("--temp", f->temp, "Electrolyte temperature: 25C, 77F, or a bare number (Celsius)")
      ->type_name("TEMP")->capture_default_str();
  cmd.add_option("--chemistry", f->chemistry, "flooded, efb, agm or gel")->capture_default_str();
  cmd.add_option("--cells", f->cells, "Cells in series (6 for 12 V)")->capture_default_str();
  cmd.add_option("--full-sg", f->full_sg, "SG of this battery when fully charged (at 25 C)")->type_name("SG");
  cmd.add_option("--rest-hours", f->rest_h, "Hours the battery rested before the OCV")->type_name("HOURS");
  cmd.add_option("--rated-cca", f->rated_cca_a, "Rated cold cranking current (A)")->type_name("A");
  cmd.add_option("--low", f->low, "Cold temperature to judge cranking and freezing at, e.g. -25C")->type_name("TEMP");
  auto* req = cmd.add_option("--required-cca", f->required_cca_a, "Engine's cranking need at -18 C (A)")->type_name("A");
  auto* engine = cmd.add_option("--engine", f->engine, "gasoline or diesel (with --displacement-l)")->type_name("KIND");
  cmd.add_option("--displacement-l", f->displacement_l, "Engine displacement in litres")->type_name("L");
  req->excludes(engine);
  add_output_flags(cmd, *out, false);
  cmd.footer(example("pbfleet estimate --cell-sg 1.250,1.245,1.250,1.190,1.250,1.245 --temp 41F\n"
                     "pbfleet estimate --sg 1.225 --ocv 12.45 --rest-hours 12 --temp 5C \\\n"
                     "    --rated-cca 800 --low -25C --engine diesel --displacement-l 7.7 --json"));
  cmd.callback([f, out, &ctx] { ctx.exit_code = run_estimate(*f, out->mode(), ctx); });
}

}  // namespace pbfleet::cli
