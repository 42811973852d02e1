// `cairn survey init URL`: creates or upgrades the survey store (a PostgreSQL +
// PostGIS database, storage/survey/survey.h) at a libpq URL.
// `cairn survey crew URL ROLE --project NAME [--remove]`: puts a database role
// in (or takes it out of) the crew of a project.
// Passwords come from the libpq password file or PGPASSWORD, never from the URL.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "storage/survey/survey.h"

namespace cairn::cli {
namespace {

int run(const Args& in, std::ostream& out, std::ostream&) {
  Args args = in;
  if (args.empty()) throw std::invalid_argument("expected init or crew");
  const std::string sub = args[0];
  args.erase(args.begin());
  if (sub == "init") {
    reject_unknown_options(args);
    if (args.size() != 1) throw std::invalid_argument("expected URL");
    const auto rep = store::survey::init_store(args[0]);
    if (rep.from_version == 0) out << "Survey store set up";
    else if (rep.steps.empty()) out << "Survey store already up to date";
    else out << "Survey store upgraded from store version " << rep.from_version;
    out << " (store version " << rep.to_version << ", project files of schema " << rep.project_schema << ")\n";
    for (const auto& s : rep.steps) out << "  " << s << "\n";
    return 0;
  }
  if (sub == "crew") {
    const bool remove = take_flag(args, "--remove");
    const auto project = take_option(args, "--project");
    reject_unknown_options(args);
    if (args.size() != 2) throw std::invalid_argument("expected URL and ROLE");
    if (!project || project->empty()) throw std::invalid_argument("--project NAME is required");
    store::survey::set_crew(args[0], args[1], *project, remove);
    out << "Role \"" << args[1] << "\" " << (remove ? "taken out of" : "is now in") << " the crew of project \"" << *project
        << "\"\n";
    return 0;
  }
  throw std::invalid_argument("unknown survey action '" + sub + "' (init or crew)");
}

}  // namespace

CAIRN_COMMAND(Command{"survey", "cairn survey init URL | cairn survey crew URL ROLE --project NAME [--remove]",
                      "Set up the survey store (PostgreSQL + PostGIS) and its crews", run});

}  // namespace cairn::cli
