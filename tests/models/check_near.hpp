// Tolerance check with both numbers in the failure message.
#pragma once

#include <cmath>

#include <doctest/doctest.h>

// |actual - expected| <= tolerance; every use states why the tolerance is what it is.
#define CHECK_NEAR(actual, expected, tolerance)                                         \
  CHECK_MESSAGE(std::abs((actual) - (expected)) <= (tolerance),                         \
                "actual " << (actual) << ", expected " << (expected) << " +/- " << (tolerance))
