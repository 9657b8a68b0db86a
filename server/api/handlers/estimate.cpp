// POST /v1/estimate: the CLI's offline estimate as a service. Nothing is
// stored; the body carries everything the models need.
#include "models/estimate.hpp"
#include "models/wire/reading.hpp"
#include "server/api/handlers/common.hpp"
#include "server/api/handlers/handlers.hpp"

namespace pbfleet::api::handlers {

namespace wire = models::wire;
using nlohmann::json;

namespace {

void read_cells(FieldReader& in, models::EstimateInput& e) {
  const json* cells = in.raw("cell_sg", false);
  if (!cells) return;
  if (!cells->is_array() || cells->empty() || cells->size() > std::size_t{wire::kMaxCells}) {
    in.invalid("cell_sg", "expected 1 to 24 numbers", "[1.265, 1.260, ...]");
    return;
  }
  for (std::size_t i = 0; i < cells->size(); ++i) {
    const json& v = (*cells)[i];
    if (!v.is_number() || v.get<double>() < wire::kMinSg || v.get<double>() > wire::kMaxSg) {
      in.invalid_item("cell_sg", i, "not a hydrometer SG", "1.000 to 1.400");
      continue;
    }
    e.cell_sg.push_back(models::SpecificGravity{v.get<double>()});
  }
}

void read_battery(FieldReader& in, models::EstimateInput& e) {
  auto chemistry = in.choice("chemistry", false, {"flooded", "efb", "agm", "gel"});
  auto cells = in.integer("cells", false, 1, wire::kMaxCells);
  e.spec = models::default_spec(chemistry ? *models::parse_chemistry(*chemistry)
                                          : models::Chemistry::flooded,
                                cells ? static_cast<int>(*cells) : 6);
  if (auto v = in.number("full_sg", false, 1.200, 1.340, "1.200 to 1.340"))
    e.spec.full_charge_sg = models::SpecificGravity{*v};
  if (auto v = in.number("rated_cca_a", false, 0.0, 3000.0, "0 to 3000 A"))
    e.spec.rated_cca = models::Amperes{*v};
}

void read_conditions(FieldReader& in, models::EstimateInput& e) {
  const std::string temp_range = "-60 to 80 C";
  if (auto v = in.number("ocv_v", false, 0.0, wire::kMaxOcvPerCellV * wire::kMaxCells, "0 to 60 V"))
    e.ocv = models::Volts{*v};
  if (auto v = in.number("electrolyte_temp_c", false, wire::kMinTempC, wire::kMaxTempC, temp_range))
    e.electrolyte = models::Celsius{*v};
  if (auto v = in.number("rest_h", false, 0.0, wire::kMaxRestH, "0 to 8784 h"))
    e.rest = models::Hours{*v};
  if (auto v = in.number("low_c", false, wire::kMinTempC, 20.0, "-60 to 20 C"))
    e.low = models::Celsius{*v};
  if (auto v = in.number("required_cca_a", false, 50.0, 3000.0, "50 to 3000 A"))
    e.required_cca = models::Amperes{*v};
  if (auto v = in.choice("engine", false, {"gasoline", "diesel"}))
    e.engine = models::parse_engine_kind(*v);
  if (auto v = in.number("displacement_l", false, 0.1, 30.0, "0.1 to 30 litres"))
    e.displacement_l = *v;
}

json output_json(const models::EstimateInput& in, const models::EstimateOutput& o) {
  auto opt = [](const auto& v) { return v ? json(*v) : json(nullptr); };
  return {{"chemistry", models::to_string(in.spec.chemistry)},
          {"cells", in.spec.cells},
          {"electrolyte_temp_c", in.electrolyte.value},
          {"corrected_sg", opt(o.corrected_sg)},
          {"corrected_cell_sg", o.corrected_cell_sg},
          {"acid_molality", opt(o.acid_molality)},
          {"acid_wt_percent", opt(o.acid_wt_percent)},
          {"cell_emf_v", opt(o.cell_emf_v)},
          {"ocv_model_v", opt(o.ocv_model_v)},
          {"soc_from_sg_percent", opt(o.soc_from_sg_percent)},
          {"table_soc_from_sg_percent", opt(o.table_soc_from_sg_percent)},
          {"soc_from_ocv_percent", opt(o.soc_from_ocv_percent)},
          {"table_soc_from_ocv_percent", opt(o.table_soc_from_ocv_percent)},
          {"ocv_settled", opt(o.ocv_settled)},
          {"soc_percent", o.soc_percent},
          {"soc_uncertainty_percent", o.soc_uncertainty_percent},
          {"disagreement", o.disagreement},
          {"freeze_point_c", opt(o.freeze_point_c)},
          {"low_c", in.low ? json(in.low->value) : json(nullptr)},
          {"freeze_margin_c", opt(o.freeze_margin_c)},
          {"cell_spread", opt(o.cell_spread)},
          {"weak_cell", opt(o.weak_cell)},
          {"available_cca", opt(o.available_cca)},
          {"required_cca_at_low", opt(o.required_cca_at_low)},
          {"crank_margin", opt(o.crank_margin)},
          {"flags", o.flags},
          {"notes", o.notes}};
}

}  // namespace

http::Response estimate(const Call& call) {
  auto input = decode_object<models::EstimateInput>(
      call, {}, [](FieldReader& in, models::EstimateInput& e) {
        read_cells(in, e);
        read_battery(in, e);
        read_conditions(in, e);
        if (e.cell_sg.empty() && !e.ocv && !in.has("cell_sg"))
          in.invalid("ocv_v", "give cell_sg, ocv_v or both", "ocv_v and/or cell_sg");
        if (e.engine && !e.displacement_l)
          in.invalid("displacement_l", "needed with engine", "0.1 to 30 litres");
        in.finish();
      });
  if (auto* refused = std::get_if<http::Response>(&input)) return std::move(*refused);
  const auto& in = std::get<models::EstimateInput>(input);
  auto out = models::estimate(in);
  if (!out) {
    const auto& e = out.error();
    return problem(ProblemKind::validation_failed, e.detail,
                   {{e.field.empty() ? "/" : pointer_to("", e.field), e.detail, e.allowed, {}}});
  }
  return json_response(200, output_json(in, *out));
}

}  // namespace pbfleet::api::handlers
