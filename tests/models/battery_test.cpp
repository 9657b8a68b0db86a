#include "models/battery.hpp"  // first: the header stands alone

#include <initializer_list>

#include <doctest/doctest.h>

using namespace pbfleet::models;

TEST_CASE("chemistry names parse case-insensitively and round-trip") {
  for (const auto chem : {Chemistry::flooded, Chemistry::efb, Chemistry::agm, Chemistry::gel}) {
    CHECK(parse_chemistry(to_string(chem)) == chem);
  }
  CHECK(parse_chemistry("AGM") == Chemistry::agm);
  CHECK(parse_chemistry("Flooded") == Chemistry::flooded);
  CHECK_FALSE(parse_chemistry("lithium").has_value());
  CHECK_FALSE(parse_chemistry("").has_value());
}

TEST_CASE("cell count follows from the nominal voltage at 2 V per cell") {
  CHECK(cells_for_nominal_voltage(Volts{2.0}).value() == 1);
  CHECK(cells_for_nominal_voltage(Volts{4.0}).value() == 2);
  CHECK(cells_for_nominal_voltage(Volts{6.0}).value() == 3);
  CHECK(cells_for_nominal_voltage(Volts{12.0}).value() == 6);
  CHECK(cells_for_nominal_voltage(Volts{24.0}).value() == 12);
}

TEST_CASE("a nominal voltage that is not whole cells is an error naming the range") {
  for (const double v : {0.0, 13.0, 12.6, -12.0, 50.0}) {
    const auto cells = cells_for_nominal_voltage(Volts{v});
    REQUIRE_FALSE(cells.ok());
    CHECK(cells.error().field == "nominal_v");
    CHECK(cells.error().allowed.find("2 to 48 V") != std::string::npos);
  }
}

TEST_CASE("flooded defaults are the Army SG table's end points") {
  // US Army TM 5-4210-230-14&P-1 SG column: 1.265 full, 1.120 discharged.
  const auto spec = default_spec(Chemistry::flooded);
  CHECK(spec.full_charge_sg.value == 1.265);
  CHECK(spec.discharged_sg.value == 1.120);
  CHECK(spec.cells == 6);
  CHECK(spec.rated_cca.value == 0.0);
  CHECK(default_spec(Chemistry::efb).full_charge_sg.value == 1.265);
}

TEST_CASE("AGM and gel default to denser acid than flooded") {
  // Common practice (no traceable source): AGM/gel about 1.300 full, 1.150 discharged.
  for (const auto chem : {Chemistry::agm, Chemistry::gel}) {
    const auto spec = default_spec(chem, 12);
    CHECK(spec.full_charge_sg.value == 1.300);
    CHECK(spec.discharged_sg.value == 1.150);
    CHECK(spec.cells == 12);
    CHECK(spec.chemistry == chem);
  }
}
