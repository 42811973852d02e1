// `cairn list FILE KIND` streamed: the CSV of list_csv (storage/import.h),
// byte for byte, written to a stream row by row as the records are read, so
// that memory does not grow with the season.
#pragma once
#include <ostream>

#include "storage/import.h"

namespace cairn::store {

// Writes what list_csv(p, kind) returns to OUT, one record at a time.
// PROGRESS, when given, is called every 1000 rows and at the end with (rows
// written, rows in all). Throws std::runtime_error when OUT fails.
void write_list_csv(Project& p, ImportKind kind, std::ostream& out, const ImportProgress& progress = {});

}  // namespace cairn::store
