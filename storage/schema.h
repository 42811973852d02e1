// The project file's schema and its forward migrations.
//
// The schema version lives in PRAGMA user_version (SQLite documentation,
// "PRAGMA user_version"); a Cairn file also carries PRAGMA application_id =
// kApplicationId so that other SQLite files are not mistaken for projects.
// A new file is made by running the version-1 script and then every migration,
// so the migrations run on every create and are never left untested.
// The tables are described, with the reason for each, in storage/SCHEMA.md.
#pragma once
#include <cstdint>
#include <string>

namespace cairn::store {

class Db;

// The schema version this build writes and reads.
constexpr int kSchemaVersion = 8;
// "CARN" in ASCII, the value of PRAGMA application_id in every project file.
constexpr int32_t kApplicationId = 0x4341524E;

// Creates the schema in an empty database and brings it to kSchemaVersion.
// The caller holds the transaction.
void create_schema(Db& db);

// Runs the migrations from `from` (1 <= from < kSchemaVersion) to
// kSchemaVersion and sets user_version. The caller holds the transaction.
void migrate(Db& db, int from);

// The tables whose rows are records (have uuid, created, updated, device, deleted).
const char* const* record_tables();  // nullptr-terminated

}  // namespace cairn::store
