// The `cairn` command's verbs. Each verb lives in its own file and registers
// itself with CAIRN_COMMAND, so adding a verb touches no other file.
#pragma once
#include <functional>
#include <optional>
#include <iosfwd>
#include <string>
#include <vector>

namespace cairn::cli {

using Args = std::vector<std::string>;

struct Command {
  std::string name;     // the verb, e.g. "fit"
  std::string usage;    // one line: "cairn fit POINTS.csv [--interval M] [--json]"
  std::string summary;  // one line for `cairn help`
  std::function<int(const Args& args, std::ostream& out, std::ostream& err)> run;
};

bool register_command(Command c);
const std::vector<Command>& commands();
const Command* find_command(const std::string& name);

// Small helpers shared by the verbs' argument parsing.
// Removes "--flag" from args; true when it was there.
bool take_flag(Args& args, const std::string& flag);
// Removes "--opt VALUE" (or "--opt=VALUE") from args; returns VALUE when present.
// Throws std::invalid_argument when the option is there without a value.
std::optional<std::string> take_option(Args& args, const std::string& opt);
// Throws std::invalid_argument naming the first left-over "--something".
void reject_unknown_options(const Args& args);

}  // namespace cairn::cli

#define CAIRN_CONCAT2(a, b) a##b
#define CAIRN_CONCAT(a, b) CAIRN_CONCAT2(a, b)
#define CAIRN_COMMAND(...) \
  static const bool CAIRN_CONCAT(cairn_command_, __LINE__) = ::cairn::cli::register_command(__VA_ARGS__)
