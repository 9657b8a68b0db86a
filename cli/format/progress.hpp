// A progress bar on stderr for long imports. Drawn only when stderr is a
// terminal; silent otherwise, so logs and pipes stay clean.
#pragma once

#include <cstddef>
#include <iosfwd>
#include <string>

namespace pbfleet::cli::format {

// One frame: "[#######      ] 1500/4000 rows  37%". `bar_width` cells inside
// the brackets; Unicode eighth blocks when `unicode`, '#' otherwise.
// REQUIRES: total > 0, done <= total.
std::string progress_line(std::size_t done, std::size_t total, int bar_width, bool unicode,
                          const std::string& unit);

class ProgressBar {
 public:
  // Draws nothing at all unless `enabled` (stderr is a TTY).
  ProgressBar(std::ostream* err, bool enabled, bool unicode, std::size_t total, std::string unit);
  ~ProgressBar();
  ProgressBar(const ProgressBar&) = delete;
  ProgressBar& operator=(const ProgressBar&) = delete;

  void update(std::size_t done);  // redraws the line in place
  void finish();                  // ends the line; idempotent

 private:
  std::ostream* err_;
  bool enabled_;
  bool unicode_;
  std::size_t total_;
  std::string unit_;
  bool drawn_ = false;
};

}  // namespace pbfleet::cli::format
