// Safety cautions shown beside any advice that can hurt someone (charging,
// equalising, load testing). The wording is ours; it always defers to the
// maker's instructions, local codes and licensed practice.
#pragma once

#include <string_view>

namespace pbfleet::analytics {

// Shown with every recharge recommendation.
inline constexpr std::string_view kChargeCaution =
    "Charging gives off hydrogen and oxygen: charge in a well-ventilated place, keep sparks, "
    "flames and smoking away, switch the charger off before connecting or disconnecting it, wear "
    "eye protection and acid-resistant gloves, and never charge a frozen battery. Follow the "
    "battery and charger makers' instructions and local codes.";

// Shown with every equalising recommendation (flooded batteries only).
inline constexpr std::string_view kEqualiseCaution =
    "Equalising is a deliberate overcharge for flooded batteries only, never AGM or gel. It gives "
    "off hydrogen and oxygen heavily: ventilate well, keep sparks, flames and smoking away, wear "
    "eye protection, a face "
    "shield and acid-resistant gloves, watch electrolyte temperature and level, and keep water at "
    "hand for acid splashes. Follow the battery maker's instructions, local codes and licensed "
    "practice; if in doubt, leave it to a qualified technician.";

// Shown with every load-test recommendation.
inline constexpr std::string_view kLoadTestCaution =
    "A load test draws hundreds of amperes: connect and disconnect with the tester off, keep sparks "
    "away from the vents (hydrogen), wear eye protection, and follow the tester maker's "
    "instructions.";

}  // namespace pbfleet::analytics
