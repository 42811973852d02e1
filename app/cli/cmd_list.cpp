// `cairn list FILE KIND`: prints a project's records as CSV in the columns
// `cairn import` takes, so a user can look without an SQL client.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "storage/import.h"

namespace cairn::cli {
namespace {

int run(const Args& in, std::ostream& out, std::ostream& err) {
  Args args = in;
  reject_unknown_options(args);
  if (args.size() != 2) throw std::invalid_argument("expected FILE KIND");
  const auto kind = store::parse_import_kind(args[1]);
  if (!kind)
    throw std::invalid_argument("KIND '" + args[1] + "' is not one of: units, contacts, stations, planes, lines, points");
  auto project = open_project(args[0], true, err);
  out << store::list_csv(project, *kind);
  return 0;
}

}  // namespace

CAIRN_COMMAND(Command{"list", "cairn list FILE KIND",
                      "print the units, contacts, stations, planes, lines or points of a project as CSV", run});

}  // namespace cairn::cli
