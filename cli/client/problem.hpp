// RFC 9457 problem details from pbfleetd, and how the CLI shows them.
#pragma once

#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace pbfleet::cli::client {

struct ProblemField {
  std::string field;          // "/0/cell_sg/3" or "cell_sg[3]"
  std::string detail;
  std::string allowed;        // may be empty
  std::optional<int> row;     // 1-based data row within the request, when given
};

struct Problem {
  int status = 0;
  std::string slug;           // last path segment of `type`: "validation-failed"
  std::string title;
  std::string detail;
  std::vector<ProblemField> errors;
};

// Reads an application/problem+json body. A body that is not problem JSON
// still gives a Problem with the status and the first line of the body as detail.
Problem parse_problem(int status, std::string_view body);

// For a person, on stderr: the title line, then one line per field error
// ("row 12  cell_sg[3]: ... (allowed 1.000 to 1.400)"). `row_offset` is
// added to row numbers, so a chunk's rows are shown as file rows.
std::string render_problem(const Problem& problem, int row_offset = 0);

// True when the server refused the data itself (422 validation, 409 conflict):
// exit code 3. Anything else is a runtime or server error: exit code 1.
bool is_data_rejection(const Problem& problem);

}  // namespace pbfleet::cli::client
