// `pbfleet estimate` for a person: one quantity per line, with units, then
// flags, notes and any recommendation with its safety caution.
#include <fmt/format.h>

#include "cli/commands/estimate.hpp"
#include "models/analytics/safety.hpp"

namespace pbfleet::cli {
namespace {

// Below this SOC a starting battery wants a full charge before the cold
// (common practice; the same threshold analytics uses for undercharge).
constexpr double kRechargeBelowSocPercent = 75.0;

struct Units {
  std::string deg;  // "°C" or " C"
  std::string pm;   // "±" or "+/-"
};

std::string line(std::string_view label, const std::string& value) {
  return fmt::format("  {:<22}{}\n", label, value);
}

std::string temp(double c, const Units& u) { return fmt::format("{:.1f}{}", c, u.deg); }

std::string sg_lines(const models::EstimateInput& in, const models::EstimateOutput& o, const Units& u) {
  if (!o.corrected_sg) return "";
  std::string s = line("Corrected SG (25" + u.deg + ")", fmt::format("{:.3f}", *o.corrected_sg));
  if (o.corrected_cell_sg.size() > 1) {
    std::string cells;
    for (double v : o.corrected_cell_sg) cells += fmt::format("{}{:.3f}", cells.empty() ? "" : " ", v);
    s += line("  per cell", cells);
  }
  if (o.acid_molality && o.acid_wt_percent) {
    s += line("Acid", fmt::format("{:.2f} mol/kg, {:.1f} % H2SO4 by weight", *o.acid_molality, *o.acid_wt_percent));
  }
  if (o.cell_emf_v && o.ocv_model_v) {
    s += line("EMF (Nernst model)", fmt::format("{:.3f} V per cell, {:.2f} V for {} cells at {}", *o.cell_emf_v,
                                                *o.ocv_model_v, in.spec.cells, temp(in.electrolyte.value, u)));
  }
  if (o.soc_from_sg_percent) {
    std::string table = o.table_soc_from_sg_percent ? fmt::format("  (table: {:.0f} %)", *o.table_soc_from_sg_percent) : "";
    s += line("SOC from SG", fmt::format("{:.0f} %{}", *o.soc_from_sg_percent, table));
  }
  return s;
}

std::string ocv_lines(const models::EstimateInput& in, const models::EstimateOutput& o) {
  if (!in.ocv) return "";
  std::string value = fmt::format("{:.2f} V", in.ocv->value);
  if (o.soc_from_ocv_percent) value += fmt::format(" -> {:.0f} %", *o.soc_from_ocv_percent);
  if (o.table_soc_from_ocv_percent) value += fmt::format("  (table: {:.0f} %)", *o.table_soc_from_ocv_percent);
  if (o.ocv_settled && !*o.ocv_settled) value += "  not settled";
  return line("SOC from OCV", value);
}

std::string cold_lines(const models::EstimateInput& in, const models::EstimateOutput& o, const Units& u) {
  std::string s;
  if (o.freeze_point_c) {
    std::string margin;
    if (in.low && o.freeze_margin_c) {
      margin = fmt::format("  ({:.0f}{} {} the low of {})", std::abs(*o.freeze_margin_c), u.deg,
                           *o.freeze_margin_c >= 0 ? "below" : "ABOVE", temp(in.low->value, u));
    }
    s += line("Freezing point", temp(*o.freeze_point_c, u) + margin);
  }
  if (o.cell_spread) {
    std::string weak = o.weak_cell ? fmt::format("  weak cell: {}", *o.weak_cell) : "  no weak cell";
    s += line("Cell spread", fmt::format("{:.3f}{}", *o.cell_spread, weak));
  }
  if (o.available_cca && in.low) {
    std::string value = fmt::format("{:.0f} A available", *o.available_cca);
    if (o.required_cca_at_low) value += fmt::format(", {:.0f} A needed", *o.required_cca_at_low);
    if (o.crank_margin) value += fmt::format(", margin {:.2f}", *o.crank_margin);
    s += line("Cranking at " + temp(in.low->value, u), value);
  }
  return s;
}

bool is_caution(const std::string& note) { return note.rfind("Safety:", 0) == 0; }

// Notes for a person; safety notes go last, in their own paragraph. When the
// battery needs a charge and the models gave no caution, ours is added.
std::string notes(const models::EstimateOutput& o) {
  std::string s;
  std::string cautions;
  for (const auto& n : o.notes) {
    if (is_caution(n)) cautions += "\n" + n + "\n";
    else s += "Note: " + n + "\n";
  }
  if (cautions.empty() && o.soc_percent < kRechargeBelowSocPercent) {
    s += fmt::format("Note: Charge is below {:.0f} %: recharge before the cold.\n", kRechargeBelowSocPercent);
    cautions = "\nSafety: " + std::string(analytics::kChargeCaution) + "\n";
  }
  return s + cautions;
}

}  // namespace

std::string estimate_text(const models::EstimateInput& in, const models::EstimateOutput& o, bool unicode) {
  Units u{unicode ? "°C" : " C", unicode ? "±" : "+/-"};
  std::string s = fmt::format("Estimate for a {} {}-cell battery, electrolyte at {}\n\n",
                              models::to_string(in.spec.chemistry), in.spec.cells, temp(in.electrolyte.value, u));
  s += sg_lines(in, o, u);
  s += ocv_lines(in, o);
  s += line("State of charge", fmt::format("{:.0f} % {} {:.0f}{}", o.soc_percent, u.pm, o.soc_uncertainty_percent,
                                           o.disagreement ? "  (SG and OCV disagree)" : ""));
  s += cold_lines(in, o, u);
  if (!o.flags.empty()) s += "\nFlags: " + fmt::format("{}", fmt::join(o.flags, ", ")) + "\n";
  return s + notes(o);
}

}  // namespace pbfleet::cli
