// `cairn import FILE KIND PATH [--contact NAME]`: reads a CSV (or, for
// waypoints, a GPX 1.1 file) into a project, all or nothing.
#include <cerrno>
#include <cstdio>
#include <cstring>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "app/core/progress.h"
#include "formats/limits.h"
#include "formats/utf8.h"
#include "storage/import.h"
#ifdef __GLIBC__
#include <malloc.h>  // mallopt
#endif

namespace cairn::cli {
namespace {

const char* kKinds = "units, contacts, stations, planes, lines, points, waypoints";

struct ImportArgs {
  std::string file, kind, path;
  std::optional<std::string> contact;
  bool show_progress = false;
};

int run(const ImportArgs& a, std::ostream& out, std::ostream& err) {
  const auto& contact = a.contact;
  const std::string& file = a.file;
  const std::string& kind_name = a.kind;
  const std::string& path = a.path;
  const bool waypoints = kind_name == "waypoints";
  const auto kind = store::parse_import_kind(kind_name);
  if (!waypoints && !kind) throw std::invalid_argument("KIND '" + kind_name + "' is not one of: " + kKinds);
  if (contact && !waypoints) throw std::invalid_argument("--contact goes with KIND waypoints only");
  // A GPX file is read whole, at most kMaxImportBytes (formats/limits.h):
  // /dev/zero or a huge file is refused instead of filling the memory. A CSV
  // is read row by row, twice (store::import_csv_file), and never held whole.
  std::string text;
  if (waypoints) {
    auto read = formats::read_file_limited(path);
    if (!read) throw std::runtime_error(formats::terminal_safe(read.error()));
    text = std::move(read.value());
  } else if (std::FILE* f = std::fopen(path.c_str(), "rb")) {
    std::fclose(f);
  } else {
    throw std::runtime_error(formats::terminal_safe("cannot read " + path + ": " + std::strerror(errno)));
  }
#ifdef __GLIBC__
  // glibc gives the top of the heap back to the system as soon as 128 KiB lie
  // free there (mallopt(3), M_TRIM_THRESHOLD), and SQLite's statements free
  // and take such blocks row after row, so every row paid for fresh pages: a
  // sixth of an import's CPU in a profile (page faults under
  // sqlite3BtreeBeginTrans). Up to 32 MiB free stay in the process; the peak
  // memory is the same (measured: 51 and 52 MB for the 1/8 season's planes,
  // and 7.0 s -> 3.9-5.2 s of CPU). Only this verb's process is affected.
  mallopt(M_TRIM_THRESHOLD, 32 << 20);
#endif
  auto project = open_project(file, false, err);
  // The one progress line of app/core/progress.h (as list, export and report
  // show it): past 2 s, on a terminal or with --progress.
  core::ProgressLine line(err, "importing " + formats::terminal_safe(path), a.show_progress);
  size_t done = 0, total = 0;
  auto progress = [&](size_t d, size_t t) {
    done = d, total = t;
    line.update(d, t);
  };
  const store::ImportReport rep = waypoints ? store::import_gpx(project, text, path, contact.value_or(""))
                                            : store::import_csv_file(project, *kind, path, progress);
  line.finish(done, total);
  if (!rep.ok()) {
    for (const auto& e : rep.errors) err << formats::terminal_safe(e) << "\n";
    err << "nothing imported: " << rep.errors.size() << (rep.errors.size() == 1 ? " problem" : " problems") << " in "
        << path << "\n";
    return 1;
  }
  const std::string what = waypoints ? (contact ? "contact points" : "stations") : kind_name;
  out << "imported " << rep.added << " " << what << " from " << path;
  if (rep.skipped) out << " (" << rep.skipped << " already in the project)";
  if (rep.from_terrain) out << "; " << rep.from_terrain << " took their elevation from the terrain";
  out << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<ImportArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "KIND", a->kind, std::string("what the file holds: ") + kKinds);
  positional(app, "PATH", a->path, "the CSV file (or GPX file for waypoints)");
  option(app, "--contact", a->contact, "with KIND waypoints: the contact the points lie on");
  flag(app, "--progress", a->show_progress,
       "a progress line on stderr past 2 s even when stderr is not a terminal (CAIRN_PROGRESS_AFTER=SECONDS "
       "changes the 2 s)");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"import",
                      "import a CSV of units, contacts, stations, planes, lines or points, or GPX waypoints "
                      "(all or nothing)",
                      define});

}  // namespace cairn::cli
