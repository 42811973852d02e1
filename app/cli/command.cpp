#include "app/cli/command.h"

#include <algorithm>
#include <ostream>
#include <sstream>
#include <stdexcept>

#include "geomath/decimal.h"

namespace cairn::cli {

namespace {

std::vector<Command>& registry() {
  static std::vector<Command> r;
  return r;
}

// A value that is itself an option ("--json") means the option's value was
// left out: say so instead of taking the next option as the value.
const CLI::Validator kNotAnOption(
    [](std::string& v) { return v.rfind("--", 0) == 0 ? "needs a value, not the option " + v : std::string(); }, "",
    "value");

CLI::Option* once(CLI::Option* o) { return o->multi_option_policy(CLI::MultiOptionPolicy::Throw); }

std::string fmt_number(double v) {
  std::ostringstream s;
  s << v;
  return s.str();
}

// CLI11's messages, said the way the rest of Cairn says things.
std::string plain_message(const CLI::ParseError& e) {
  std::string m = e.what();
  const auto at_most = m.find(": At Most 1 required but received");
  if (at_most != std::string::npos) return m.substr(0, at_most) + " given more than once";
  if (m.rfind("The following argument was not expected: ", 0) == 0) {
    const std::string what = m.substr(41);
    return (what.rfind("-", 0) == 0 ? "unknown option " : "unexpected argument ") + what;
  }
  return m;
}

std::unique_ptr<CLI::App> make_app(const Command& c, Runner* runner) {
  auto app = std::make_unique<CLI::App>(c.summary, "cairn " + c.name);
  app->set_help_flag("-h,--help", "show this help");
  app->allow_extras(false);
  Runner r = c.define(*app);
  if (runner) *runner = std::move(r);
  return app;
}

}  // namespace

bool register_command(Command c) {
  registry().push_back(std::move(c));
  std::sort(registry().begin(), registry().end(), [](const Command& a, const Command& b) { return a.name < b.name; });
  return true;
}

const std::vector<Command>& commands() { return registry(); }

const Command* find_command(const std::string& name) {
  for (const auto& c : registry())
    if (c.name == name) return &c;
  return nullptr;
}

std::string usage_of(const Command& c) { return make_app(c, nullptr)->help(); }

int run_command(const Command& c, const Args& args, std::ostream& out, std::ostream& err) {
  Runner runner;
  auto app = make_app(c, &runner);
  // CLI11 takes the arguments last-first.
  std::vector<std::string> reversed(args.rbegin(), args.rend());
  try {
    app->parse(reversed);
  } catch (const CLI::CallForHelp&) {
    out << app->help();
    return 0;
  } catch (const CLI::ParseError& e) {
    err << "cairn " << c.name << ": " << plain_message(e) << "\n" << app->help();
    return 2;
  }
  try {
    return runner(out, err);
  } catch (const std::invalid_argument& e) {
    err << "cairn " << c.name << ": " << e.what() << "\n" << app->help();
    return 2;
  } catch (const std::exception& e) {
    err << "cairn " << c.name << ": " << e.what() << "\n";
    return 1;
  }
}

CLI::Option* positional(CLI::App& app, const std::string& name, std::string& target, const std::string& help,
                        bool required) {
  auto* o = app.add_option(name, target, help);
  return required ? o->required() : o;
}

CLI::Option* positionals(CLI::App& app, const std::string& name, std::vector<std::string>& target,
                         const std::string& help) {
  return app.add_option(name, target, help);
}

CLI::Option* flag(CLI::App& app, const std::string& name, bool& target, const std::string& help) {
  return once(app.add_flag(name, target, help));
}

CLI::Option* option(CLI::App& app, const std::string& name, std::optional<std::string>& target,
                    const std::string& help) {
  return once(app.add_option_function<std::string>(
                     name, [&target](const std::string& v) { target = v; }, help)
                  ->check(kNotAnOption));
}

CLI::Option* number(CLI::App& app, const std::string& name, std::optional<double>& target, double lo, double hi,
                    const std::string& help) {
  const std::string range = fmt_number(lo) + " to " + fmt_number(hi);
  CLI::Validator decimal(
      [lo, hi, range](std::string& v) -> std::string {
        const auto d = geo::parse_decimal(v);
        if (!d) return "'" + v + "' is not a number";
        if (!(*d >= lo && *d <= hi)) return v + " is outside " + range;
        return {};
      },
      "", "decimal");
  return once(app.add_option_function<std::string>(
                     name, [&target](const std::string& v) { target = geo::parse_decimal(v); }, help)
                  ->check(kNotAnOption)
                  ->check(decimal)
                  ->type_name("NUMBER (" + range + ")"));
}

CLI::Option* choice(CLI::App& app, const std::string& name, std::optional<std::string>& target,
                    const std::vector<std::string>& choices, const std::string& help) {
  return option(app, name, target, help)->check(CLI::IsMember(choices));
}

}  // namespace cairn::cli
