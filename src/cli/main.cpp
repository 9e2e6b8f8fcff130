// coilwright: a thin front end over the core library. Errors are typed and mapped to the
// exit codes documented in --help.
#include <cstdio>
#include <exception>
#include <string>
#include <string_view>

#include <fmt/format.h>

#include "commands.hpp"
#include "coilwright/error.hpp"
#include "coilwright/parallel.hpp"

int main(int argc, char** argv) {
  using namespace coilwright;
  CLI::App app{"coilwright: design, size and check coil systems for controlled magnetic fields."};
  app.footer(
      "Exit codes: 0 done; 1 internal error (please report); 2 bad input (config, CSV or command line);\n"
      "            3 results could not be written; 130 stopped by Ctrl-C after keeping the best so far.\n"
      "Run 'coilwright <command> --help' for a command's options and an example.");
  app.set_version_flag("--version", fmt::format("coilwright {} ({})", COILWRIGHT_VERSION, COILWRIGHT_GIT_REVISION));
  app.require_subcommand(1);
  cli::GlobalOptions global;
  app.add_flag("-q,--quiet", global.quiet, "No progress or notes on stderr");
  app.add_option("--threads", global.threads, "Worker threads (default: all cores)")->check(CLI::Range(0, 4096));
  app.parse_complete_callback([&global] { set_threads(global.threads); });

  cli::add_field_command(app, global);
  cli::add_evaluate_command(app, global);
  cli::add_design_command(app, global);
  cli::add_null_command(app, global);
  cli::add_compare_command(app, global);
  cli::add_calibrate_command(app, global);
  cli::add_tolerance_command(app, global);
  cli::add_report_command(app, global);
  cli::add_map_command(app, global);

  // CLI11 reports an unknown command as a missing one; name it and list the commands instead.
  for (int i = 1; i < argc; ++i) {
    const std::string_view a = argv[i];
    if (a == "--threads") {
      ++i;
      continue;
    }
    if (a.empty() || a.front() == '-') continue;
    std::string names;
    bool known = false;
    for (const CLI::App* sub : app.get_subcommands([](const CLI::App*) { return true; })) {
      known = known || sub->get_name() == a;
      names += (names.empty() ? "" : ", ") + sub->get_name();
    }
    if (!known) {
      fmt::print(stderr, "error: unknown command '{}'; accepted: {}\n", a, names);
      return exit_code::bad_input;
    }
    break;
  }

  try {
    app.parse(argc, argv);
  } catch (const CLI::CallForHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForAllHelp& e) {
    return app.exit(e);
  } catch (const CLI::CallForVersion& e) {
    return app.exit(e);
  } catch (const CLI::ParseError& e) {
    app.exit(e);
    return exit_code::bad_input;
  } catch (const InputError& e) {
    fmt::print(stderr, "error: {}\n", e.what());
    return exit_code::bad_input;
  } catch (const DomainError& e) {
    fmt::print(stderr, "error: {}\n", e.what());
    return exit_code::bad_input;
  } catch (const OutputError& e) {
    fmt::print(stderr, "error: {}\n", e.what());
    return exit_code::output;
  } catch (const Interrupted& e) {
    fmt::print(stderr, "{}\n", e.what());
    return exit_code::interrupted;
  } catch (const std::exception& e) {
    fmt::print(stderr, "internal error: {}\n", e.what());
    return exit_code::internal;
  }
  return exit_code::ok;
}
