// The `cairn` command: a field logbook for structural geologists.
#include <algorithm>
#include <iostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/display.h"

using cairn::cli::Args;

static void print_help(std::ostream& os) {
  os << "cairn: an offline field logbook for structural geologists\n\nVerbs:\n";
  size_t w = 0;
  for (const auto& c : cairn::cli::commands()) w = std::max(w, c.name.size());
  for (const auto& c : cairn::cli::commands())
    os << "  " << c.name << std::string(w + 2 - c.name.size(), ' ') << c.summary << "\n";
  os << "\nRun 'cairn help VERB' (or 'cairn VERB --help') for one verb's arguments.\n";
}

int main(int argc, char** argv) {
  Args args(argv + 1, argv + argc);
  if (args.empty()) {
    // With a display, no arguments opens the touch UI (when built); otherwise help.
    if (const auto* gui = cairn::cli::find_command("gui"); gui && cairn::cli::have_display())
      return cairn::cli::run_command(*gui, {}, std::cout, std::cerr);
    print_help(std::cout);
    return 0;
  }
  std::string verb = args.front();
  args.erase(args.begin());
  if (verb == "help" || verb == "--help" || verb == "-h") {
    if (!args.empty()) {
      if (const auto* c = cairn::cli::find_command(args.front())) {
        std::cout << cairn::cli::usage_of(*c);
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
  return cairn::cli::run_command(*cmd, args, std::cout, std::cerr);
}
