// lidbox command line: the only code that parses arguments, prints or exits.
#include <CLI/CLI.hpp>
#include <iostream>

#include "observe_command.hpp"

int main(int argc, char** argv) {
  CLI::App app{"lidbox: hourly box model of an urban airshed"};
  app.set_version_flag("--version", std::string("lidbox ") + LIDBOX_VERSION);
  int exit_code = 0;
  // Temporary wiring in the standards branch; the lead owns main.cpp.
  lidbox::cli::add_observe_command(app, exit_code);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  }
  return exit_code;
}
