// lidbox command line: the only code that parses arguments, prints or exits.
// Exit codes: 0 success, 1 internal error (a bug), 2 bad input or usage.
#include <signal.h>
#include <unistd.h>
#include <CLI/CLI.hpp>

#include <cstdlib>
#include <iostream>

#include "evaluate_command.hpp"
#include "grid_command.hpp"
#include "lidbox/base/caution.hpp"
#include "lidbox/base/error.hpp"
#include "lidbox/base/output_folder.hpp"
#include "metdump_command.hpp"
#include "observe_command.hpp"
#include "outlook_command.hpp"
#include "run_command.hpp"

int main(int argc, char** argv) {
  CLI::App app{std::string("lidbox ") + LIDBOX_VERSION +
               ": hour-by-hour box balance of an urban airshed (mixing height, wind, emissions, "
               "residual layer) with its mass budget, standard averages and episodes.\n" +
               lidbox::kScreeningCaution};
  app.set_version_flag("--version", std::string("lidbox ") + LIDBOX_VERSION);
  app.require_subcommand(1);
  int exit_code = 0;
  // Test hook (tests/cli/test_publish_kill.py): the process kills itself after the given step of
  // publishing a run's outputs, as a crash or an operator's kill -9 would.
  if (const char* k = std::getenv("LIDBOX_TEST_KILL_AFTER_PUBLISH_STEP")) {
    const std::size_t step = std::strtoul(k, nullptr, 10);
    lidbox::set_publish_test_hook([step](std::size_t s) {
      if (s == step) ::kill(::getpid(), SIGKILL);
    });
  }
  lidbox::cli::add_run_command(app, exit_code);
  lidbox::cli::add_observe_command(app, exit_code);
  lidbox::cli::add_met_dump_command(app, exit_code);
  lidbox::cli::add_outlook_command(app, exit_code);
  lidbox::cli::add_evaluate_command(app, exit_code);
  lidbox::cli::add_grid_command(app, exit_code);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    return code == 0 ? 0 : 2;
  } catch (const lidbox::InputError& e) {
    std::cerr << "lidbox: error: " << e.what() << '\n';
    return 2;
  } catch (const lidbox::InternalError& e) {
    std::cerr << "lidbox: " << e.what() << " (please report this)\n";
    return 1;
  } catch (const std::exception& e) {
    std::cerr << "lidbox: internal error: " << e.what() << " (please report this)\n";
    return 1;
  }
  return exit_code;
}
