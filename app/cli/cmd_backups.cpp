// `cairn backups FILE`: the backups kept beside a project file
// (FILE.backups/, storage/project.h), oldest first, with their size, so that
// one can be picked for `cairn restore`.
#include <filesystem>
#include <ostream>
#include <stdexcept>

#include "app/cli/command.h"
#include "formats/utf8.h"
#include "storage/project.h"

namespace cairn::cli {
namespace {

struct BackupsArgs {
  std::string file;
};

int run(const BackupsArgs& a, std::ostream& out, std::ostream&) {
  const std::string& file = a.file;
  std::error_code ec;
  if (!std::filesystem::exists(file, ec)) throw std::runtime_error("no project file " + file);
  const auto backups = store::list_backups(file);
  if (backups.empty()) {
    out << "no backups of " << formats::terminal_safe(file) << " yet (they are made in " << file
        << ".backups/ with the first change of each session)\n";
    return 0;
  }
  out << backups.size() << (backups.size() == 1 ? " backup" : " backups") << " of " << formats::terminal_safe(file)
      << ", oldest first:\n";
  for (const auto& b : backups) {
    const auto size = std::filesystem::file_size(b, ec);
    out << "  " << formats::terminal_safe(b) << "  " << (ec ? 0 : (size + 1023) / 1024) << " KiB\n";
  }
  out << "restore one with: cairn restore " << formats::terminal_safe(file) << " BACKUP\n";
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<BackupsArgs>();
  positional(app, "FILE", a->file, "the project file");
  return [a](std::ostream& out, std::ostream& err) { return run(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"backups", "list the backups kept beside a project file", define});

}  // namespace cairn::cli
