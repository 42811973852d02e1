// `cairn survey init URL`: creates or upgrades the survey store (a PostgreSQL +
// PostGIS database, app/survey/survey.h) at a libpq URL.
// `cairn survey crew URL ROLE --project NAME [--remove]`: puts a database role
// in (or takes it out of) the crew of a project.
// Passwords come from the libpq password file or PGPASSWORD, never from the URL.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/survey/survey.h"

namespace cairn::cli {
namespace {

struct SurveyArgs {
  std::string action, url, role;
  std::optional<std::string> project;
  bool remove = false;
};

int run(const SurveyArgs& a, std::ostream& out, std::ostream&) {
  if (a.action == "init") {
    const auto rep = store::survey::init_store(a.url);
    if (rep.from_version == 0)
      out << "Survey store set up";
    else if (rep.steps.empty())
      out << "Survey store already up to date";
    else
      out << "Survey store upgraded from store version " << rep.from_version;
    out << " (store version " << rep.to_version << ", project files of schema " << rep.project_schema << ")\n";
    for (const auto& s : rep.steps) out << "  " << s << "\n";
    return 0;
  }
  if (a.action == "crew") {
    if (!a.project || a.project->empty()) throw std::invalid_argument("--project NAME is required");
    store::survey::set_crew(a.url, a.role, *a.project, a.remove);
    out << "Role \"" << a.role << "\" " << (a.remove ? "taken out of" : "is now in") << " the crew of project \""
        << *a.project << "\"\n";
    return 0;
  }
  throw std::invalid_argument("expected an action: init or crew");
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<SurveyArgs>();
  app.require_subcommand(1);
  auto* init = app.add_subcommand("init", "create or upgrade the survey store's schema and roles");
  positional(*init, "URL", a->url, "libpq connection URL, postgresql://user@host:port/db (no password in it)");
  init->callback([a] { a->action = "init"; });
  auto* crew = app.add_subcommand("crew", "make a database role a member of a project's crew (or take it out)");
  positional(*crew, "URL", a->url, "libpq connection URL");
  positional(*crew, "ROLE", a->role, "the database role");
  option(*crew, "--project", a->project, "the project's name (required)")->required();
  flag(*crew, "--remove", a->remove, "take the role out of the crew");
  crew->callback([a] { a->action = "crew"; });
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"survey", "set up the survey store (PostgreSQL + PostGIS) and its crews", define});

}  // namespace cairn::cli
