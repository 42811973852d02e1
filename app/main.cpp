// The `cairn` command: a field logbook for structural geologists.
#include <iostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/display.h"

using cairn::cli::Args;

static void print_help(std::ostream& os) {
  os << "cairn: an offline field logbook for structural geologists\n\nUsage:\n";
  for (const auto& c : cairn::cli::commands()) os << "  " << c.usage << "\n";
  os << "\nRun 'cairn help VERB' for one verb.\n";
}

int main(int argc, char** argv) {
  Args args(argv + 1, argv + argc);
  if (args.empty()) {
    // With a display, no arguments opens the touch UI (when built); otherwise help.
    if (const auto* gui = cairn::cli::find_command("gui"); gui && cairn::cli::have_display()) return gui->run({}, std::cout, std::cerr);
    print_help(std::cout);
    return 0;
  }
  std::string verb = args.front();
  args.erase(args.begin());
  if (verb == "help" || verb == "--help" || verb == "-h") {
    if (!args.empty()) {
      if (const auto* c = cairn::cli::find_command(args.front())) {
        std::cout << c->usage << "\n  " << c->summary << "\n";
        return 0;
      }
    }
    print_help(std::cout);
    return 0;
  }
  const auto* cmd = cairn::cli::find_command(verb);
  if (!cmd) {
    std::cerr << "cairn: unknown verb '" << verb << "'\n";
    print_help(std::cerr);
    return 2;
  }
  try {
    return cmd->run(args, std::cout, std::cerr);
  } catch (const std::invalid_argument& e) {
    std::cerr << "cairn " << verb << ": " << e.what() << "\nusage: " << cmd->usage << "\n";
    return 2;
  } catch (const std::exception& e) {
    std::cerr << "cairn " << verb << ": " << e.what() << "\n";
    return 1;
  }
}
