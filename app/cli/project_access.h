// How the `cairn` verbs open a project file: with the World Magnetic Model as
// the source of declination for magnetic readings, and a note on stderr when
// the file had to be opened read-only.
#pragma once
#include <iosfwd>
#include <string>

#include "storage/project.h"

namespace cairn::cli {

// Options for opening a project from the command line. Writing opens take a
// rolling backup; the device is the one recorded in the file (the command line
// runs on the machine that holds the file).
store::OpenOptions cli_open_options(bool read_only);

// The World Magnetic Model as a declination provider for storage.
store::DeclinationProvider wmm_declination();

// Opens FILE; prints the reason to `err` when it came up read-only against our wish.
store::Project open_project(const std::string& file, bool read_only, std::ostream& err);

// Whole text of a file; throws std::runtime_error naming it when unreadable.
std::string read_text_file(const std::string& path);

}  // namespace cairn::cli
