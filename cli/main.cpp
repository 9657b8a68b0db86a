// pbfleet: the crew's, the manager's and the technician's terminal.
// Everything lives in pbfleet_cli_lib; see app.hpp for the command tree.
#include "cli/app.hpp"

int main(int argc, char** argv) { return pbfleet::cli::run(argc, argv); }
