// `cairn list FILE KIND`: prints a project's records as CSV in the columns
// `cairn import` takes, so a user can look without an SQL client.
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "storage/import.h"

namespace cairn::cli {
namespace {

struct ListArgs {
  std::string file, kind;
};

int run(const ListArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file, a.kind};
  const auto kind = store::parse_import_kind(args[1]);
  if (!kind)
    throw std::invalid_argument("KIND '" + args[1] +
                                "' is not one of: units, contacts, stations, planes, lines, points");
  auto project = open_project(args[0], true, err);
  out << store::list_csv(project, *kind);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<ListArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "KIND", a->kind, "units, contacts, stations, planes, lines or points");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"list", "print the units, contacts, stations, planes, lines or points of a project as CSV",
                      define});

}  // namespace cairn::cli
