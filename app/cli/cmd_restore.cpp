// `cairn restore FILE BACKUP`: puts a backup's contents back into a project
// file, after keeping the file's present state as a backup of its own
// (storage/project.h, restore_from_backup).
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "app/cli/project_access.h"
#include "formats/utf8.h"
#include "storage/project.h"

namespace cairn::cli {
namespace {

struct RestoreArgs {
  std::string file, backup;
};

int run(const RestoreArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file, a.backup};
  auto project = open_project(args[0], false, err);
  const std::string kept = store::restore_from_backup(project, args[1]);
  out << "restored " << formats::terminal_safe(args[1]) << " into " << formats::terminal_safe(args[0])
      << "; the state it replaced is kept in " << formats::terminal_safe(kept) << "\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<RestoreArgs>();
  positional(app, "FILE", a->file, "the project file");
  positional(app, "BACKUP", a->backup, "the backup to put back (see cairn backups FILE)");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"restore", "put a backup back into a project file (its present state is kept as a backup first)",
                      define});

}  // namespace cairn::cli
