#include "cli/format/progress.hpp"

#include <sstream>

#include <doctest/doctest.h>

using namespace pbfleet::cli::format;

TEST_CASE("progress line shows the bar, the count and the percentage") {
  CHECK(progress_line(0, 4000, 10, false, "rows") == "[..........] 0/4000 rows   0%");
  CHECK(progress_line(1500, 4000, 10, false, "rows") == "[###.......] 1500/4000 rows  37%");
  CHECK(progress_line(4000, 4000, 10, false, "rows") == "[##########] 4000/4000 rows 100%");
}

TEST_CASE("Unicode progress bar fills partial cells in eighths") {
  // 1/16 of 10 cells = 5 eighths of the first cell.
  CHECK(progress_line(1, 16, 10, true, "rows").rfind("[▋         ]", 0) == 0);
}

TEST_CASE("a disabled progress bar writes nothing at all") {
  std::ostringstream err;
  {
    ProgressBar bar(&err, /*enabled=*/false, false, 100, "rows");
    bar.update(50);
    bar.update(100);
  }
  CHECK(err.str().empty());
}

TEST_CASE("an enabled progress bar redraws in place and ends its line") {
  std::ostringstream err;
  {
    ProgressBar bar(&err, true, false, 2, "rows");
    bar.update(1);
    bar.update(2);
  }
  auto s = err.str();
  CHECK(s.find("\r[") == 0);
  CHECK(s.find("2/2 rows 100%") != std::string::npos);
  CHECK(s.back() == '\n');
}
