// Hydrometer SG on the command line (log and estimate): --sg for one value
// for the battery, --cell-sg for one per cell.
#pragma once

#include <CLI/CLI.hpp>

#include <string>

namespace pbfleet::cli {

// For --sg: a list there is a slip for --cell-sg, and is named as one
// rather than left to the number parser ("Could not convert").
inline CLI::Validator one_sg_value() {
  return CLI::Validator(
      [](std::string& text) -> std::string {
        if (text.find(',') == std::string::npos) return {};
        return "takes one SG for the battery; for one per cell use --cell-sg " + text;
      },
      "SG", "one SG value");
}

}  // namespace pbfleet::cli
