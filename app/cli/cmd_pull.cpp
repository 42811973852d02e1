// `cairn pull URL OUT.cairn --project NAME [--bbox W,S,E,N] [--since DATE] [--json]`:
// makes a working project file from the survey store (storage/survey/survey.h),
// for a new tablet or a new season; it publishes back without duplicates.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/json.h"
#include "storage/survey/survey.h"

namespace cairn::cli {
namespace {

int run(const Args& in, std::ostream& out, std::ostream&) {
  Args args = in;
  const bool json = take_flag(args, "--json");
  store::survey::PullOptions o;
  const auto project = take_option(args, "--project");
  const auto bbox = take_option(args, "--bbox");
  o.since = take_option(args, "--since");
  reject_unknown_options(args);
  if (args.size() != 2) throw std::invalid_argument("expected URL and OUT");
  if (!project || project->empty()) throw std::invalid_argument("--project NAME is required");
  o.project = *project;
  if (bbox) {
    auto b = store::survey::parse_bbox(*bbox);
    if (!b) throw std::invalid_argument(b.error());
    o.bbox = *b;
  }
  const auto rep = store::survey::pull(args[0], args[1], o);
  if (json) {
    JsonWriter j(out);
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

}  // namespace

CAIRN_COMMAND(Command{"pull", "cairn pull URL OUT.cairn --project NAME [--bbox W,S,E,N] [--since DATE] [--json]",
                      "Make a working project file from the survey store", run});

}  // namespace cairn::cli
