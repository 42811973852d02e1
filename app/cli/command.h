// The `cairn` command's verbs. Each verb lives in its own file and registers
// itself with CAIRN_COMMAND, so adding a verb touches no other file.
//
// A verb declares its arguments once, with CLI11 (Debian's libcli11-dev), and
// the usage text is generated from those declarations:
//
//   struct ExportArgs { std::string file, out; bool json = false; };
//   Runner define_export(CLI::App& app) {
//     auto a = std::make_shared<ExportArgs>();
//     positional(app, "FILE", a->file, "the project file");
//     flag(app, "--json", a->json, "print a JSON summary");
//     return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
//   }
//   CAIRN_COMMAND(Command{"export", "export to ...", define_export});
//
// Rules every verb gets from these helpers: an option or flag given twice is
// an error; an option's value may not itself be an option ("--interval --json");
// numbers go through the one number reader (geomath/decimal.h); an unknown
// option or a surplus argument is named.
#pragma once
#include <CLI/CLI.hpp>
#include <functional>
#include <iosfwd>
#include <optional>
#include <string>
#include <vector>

namespace cairn::cli {

using Args = std::vector<std::string>;
using Runner = std::function<int(std::ostream& out, std::ostream& err)>;

struct Command {
  std::string name;     // the verb, e.g. "fit"
  std::string summary;  // one line for `cairn help`
  // Declares the verb's arguments on APP, bound to state the returned runner reads.
  std::function<Runner(CLI::App& app)> define;
};

bool register_command(Command c);
const std::vector<Command>& commands();
const Command* find_command(const std::string& name);

// Parses ARGS for C and runs it. Bad arguments: the error and the generated
// usage on ERR, exit status 2; "--help": the usage on OUT, status 0. A verb
// that throws std::invalid_argument also exits 2 with its usage; any other
// exception exits 1 with its message.
int run_command(const Command& c, const Args& args, std::ostream& out, std::ostream& err);
// The usage text generated from C's declarations.
std::string usage_of(const Command& c);

// Declaring arguments (see the rules above).
CLI::Option* positional(CLI::App& app, const std::string& name, std::string& target, const std::string& help,
                        bool required = true);
CLI::Option* positionals(CLI::App& app, const std::string& name, std::vector<std::string>& target,
                         const std::string& help);
CLI::Option* flag(CLI::App& app, const std::string& name, bool& target, const std::string& help);
CLI::Option* option(CLI::App& app, const std::string& name, std::optional<std::string>& target,
                    const std::string& help);
// A decimal number in [LO, HI]; TARGET keeps its value when the option is absent.
CLI::Option* number(CLI::App& app, const std::string& name, std::optional<double>& target, double lo, double hi,
                    const std::string& help);
// One of CHOICES.
CLI::Option* choice(CLI::App& app, const std::string& name, std::optional<std::string>& target,
                    const std::vector<std::string>& choices, const std::string& help);

}  // namespace cairn::cli

#define CAIRN_CONCAT2(a, b) a##b
#define CAIRN_CONCAT(a, b) CAIRN_CONCAT2(a, b)
#define CAIRN_COMMAND(...) \
  static const bool CAIRN_CONCAT(cairn_command_, __LINE__) = ::cairn::cli::register_command(__VA_ARGS__)
