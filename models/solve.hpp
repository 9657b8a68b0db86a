// Bracketed root finding for monotone models (internal to models/).
//
// The inverse models (SG from weight percent, molality from EMF) invert
// increasing functions. A bracket is required: the solver never leaves it,
// so it cannot wander off the tables the way an unbracketed Newton step can.
#pragma once

#include <functional>
#include <optional>

namespace pbfleet::models::detail {

// x in [lo, hi] with f(x) == target for an increasing f, by the Illinois
// variant of regula falsi (Dowell & Jarratt, BIT 11 (1971) 168-174), which
// keeps the bracket and converges superlinearly. Stops when the bracket is
// narrower than x_tolerance. nullopt when target lies outside [f(lo), f(hi)].
// REQUIRES: lo < hi, f increasing on [lo, hi].
[[nodiscard]] std::optional<double> solve_increasing(const std::function<double(double)>& f,
                                                     double lo, double hi, double target,
                                                     double x_tolerance = 1e-12);

}  // namespace pbfleet::models::detail
