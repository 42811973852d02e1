// `cairn pull URL OUT.cairn --project NAME [--bbox W,S,E,N] [--since DATE] [--json]`:
// makes a working project file from the survey store (app/survey/survey.h),
// for a new tablet or a new season; it publishes back without duplicates.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "formats/json.h"
#include "app/survey/survey.h"

namespace cairn::cli {
namespace {

struct PullArgs {
  std::string url, out;
  bool json = false;
  std::optional<std::string> project, bbox, since;
};

int run(const PullArgs& a, std::ostream& out, std::ostream&) {
  const std::vector<std::string> args{a.url, a.out};
  const bool json = a.json;
  store::survey::PullOptions o;
  const auto& project = a.project;
  const auto& bbox = a.bbox;
  o.since = a.since;
  if (!project || project->empty()) throw std::invalid_argument("--project NAME is required");
  o.project = *project;
  if (bbox) {
    auto b = store::survey::parse_bbox(*bbox);
    if (!b) throw std::invalid_argument(b.error());
    o.bbox = *b;
  }
  const auto rep = store::survey::pull(args[0], args[1], o);
  if (json) {
    formats::JsonWriter j(out);
    j.begin_object();
    j.key("project").value(rep.project);
    j.key("path").value(rep.path);
    j.key("rows").begin_object();
    for (const auto& [t, n] : rep.rows) j.key(t).value(n);
    j.end_object();
    j.end_object();
    out << "\n";
    return 0;
  }
  out << "Pulled project \"" << rep.project << "\" into " << rep.path << "\n";
  for (const auto& [t, n] : rep.rows)
    if (n) out << "  " << t << ": " << n << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<PullArgs>();
  positional(app, "URL", a->url, "libpq connection URL of the survey store (no password in it)");
  positional(app, "OUT.cairn", a->out, "the working project file to make");
  option(app, "--project", a->project, "the project's name as given to cairn new --name (required)")->required();
  option(app, "--bbox", a->bbox, "W,S,E,N in decimal degrees: only the records inside");
  option(app, "--since", a->since, "only records changed since this ISO 8601 date or time");
  flag(app, "--json", a->json, "print JSON");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"pull", "make a working project file from the survey store", define});

}  // namespace cairn::cli
