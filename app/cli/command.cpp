#include "app/cli/command.h"

#include <algorithm>
#include <stdexcept>

namespace cairn::cli {

static std::vector<Command>& registry() {
  static std::vector<Command> r;
  return r;
}

bool register_command(Command c) {
  registry().push_back(std::move(c));
  std::sort(registry().begin(), registry().end(),
            [](const Command& a, const Command& b) { return a.name < b.name; });
  return true;
}

const std::vector<Command>& commands() { return registry(); }

const Command* find_command(const std::string& name) {
  for (const auto& c : registry())
    if (c.name == name) return &c;
  return nullptr;
}

bool take_flag(Args& args, const std::string& flag) {
  auto it = std::find(args.begin(), args.end(), flag);
  if (it == args.end()) return false;
  args.erase(it);
  return true;
}

std::optional<std::string> take_option(Args& args, const std::string& opt) {
  for (size_t i = 0; i < args.size(); ++i) {
    if (args[i] == opt) {
      if (i + 1 >= args.size()) throw std::invalid_argument(opt + " needs a value");
      std::string v = args[i + 1];
      args.erase(args.begin() + static_cast<long>(i), args.begin() + static_cast<long>(i) + 2);
      return v;
    }
    if (args[i].rfind(opt + "=", 0) == 0) {
      std::string v = args[i].substr(opt.size() + 1);
      args.erase(args.begin() + static_cast<long>(i));
      return v;
    }
  }
  return std::nullopt;
}

void reject_unknown_options(const Args& args) {
  for (const auto& a : args)
    if (a.size() > 2 && a[0] == '-' && a[1] == '-')
      throw std::invalid_argument("unknown option " + a);
}

}  // namespace cairn::cli
