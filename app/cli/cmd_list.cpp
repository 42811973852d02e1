// `cairn list FILE KIND`: prints a project's records as CSV in the columns
// `cairn import` takes, so a user can look without an SQL client. Rows are
// written as they are read (storage/listing.h), and a long listing shows a
// progress line on stderr (app/core/progress.h: past 2 s, on a terminal or
// with --progress).
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "app/core/progress.h"
#include "formats/utf8.h"
#include "storage/listing.h"

namespace cairn::cli {
namespace {

struct ListArgs {
  std::string file, kind;
  bool show_progress = false;
};

int run(const ListArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file, a.kind};
  const auto kind = store::parse_import_kind(args[1]);
  if (!kind)
    throw std::invalid_argument("KIND '" + args[1] +
                                "' is not one of: units, contacts, stations, planes, lines, points");
  auto project = open_project(args[0], true, err);
  core::ProgressLine line(err, "listing " + formats::terminal_safe(args[1]), a.show_progress);
  size_t done = 0, total = 0;
  store::write_list_csv(project, *kind, out, [&](size_t d, size_t t) {
    done = d, total = t;
    line.update(d, t);
  });
  line.finish(done, total);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<ListArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "KIND", a->kind, "units, contacts, stations, planes, lines or points");
  flag(app, "--progress", a->show_progress,
       "a progress line on stderr past 2 s even when stderr is not a terminal (CAIRN_PROGRESS_AFTER=SECONDS "
       "changes the 2 s)");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"list", "print the units, contacts, stations, planes, lines or points of a project as CSV",
                      define});

}  // namespace cairn::cli
