// lidbox command line: the only code that parses arguments, prints or exits.
#include <CLI/CLI.hpp>
#include <iostream>

int main(int argc, char** argv) {
  CLI::App app{"lidbox: hourly box model of an urban airshed"};
  app.set_version_flag("--version", std::string("lidbox ") + LIDBOX_VERSION);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  }
  return 0;
}
