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

int run(const Args& in, std::ostream& out, std::ostream& err) {
  Args args = in;
  reject_unknown_options(args);
  if (args.size() != 2) throw std::invalid_argument("expected FILE and BACKUP");
  auto project = open_project(args[0], false, err);
  const std::string kept = store::restore_from_backup(project, args[1]);
  out << "restored " << formats::terminal_safe(args[1]) << " into " << formats::terminal_safe(args[0])
      << "; the state it replaced is kept in " << formats::terminal_safe(kept) << "\n";
  return 0;
}

}  // namespace

CAIRN_COMMAND(Command{"restore", "cairn restore FILE BACKUP",
                      "put a backup back into a project file (its present state is kept as a backup first)", run});

}  // namespace cairn::cli
