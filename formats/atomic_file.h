// Replacing a file all at once, so that a crash or a power cut leaves either the
// old file or the new one, never half of either. The new content goes to a
// temporary file beside the target (same folder, so the rename stays on one file
// system; a TempPath of formats/temp_files.h, so that it is removed on any exit
// and, after a SIGKILL, at the next start), is flushed to disk with fsync,
// renamed over the target, and the folder is fsynced so the rename itself is durable (POSIX.1-2017: rename() replaces
// the target atomically; fsync() of the file, then of its folder, makes the data
// and the new folder entry durable).
#pragma once
#include <functional>
#include <string>
#include <string_view>

namespace cairn::formats {

// Flushes a file or a folder to disk (fsync). Throws std::runtime_error naming PATH.
void sync_to_disk(const std::string& path);

// Moves the finished file TMP to PATH durably: TMP is flushed to disk, renamed
// over PATH (same folder or at least the same file system), and PATH's folder is
// flushed so the new entry survives a power cut. Throws std::runtime_error naming
// PATH; TMP is left in place on failure (its owner removes it).
void move_into_place(const std::string& tmp, const std::string& path);

// Writes TEXT to PATH atomically. Throws std::runtime_error naming PATH and the
// cause; the temporary file is removed on failure.
void write_file_atomically(const std::string& path, std::string_view text);

// Makes PATH atomically with a writer that fills a temporary file beside it
// (FILL gets the temporary path; e.g. an SQLite database written there). On
// success the temporary file is synced and renamed over PATH; on any failure it
// (and SQLite's -journal/-wal/-shm beside it) is removed and the error rethrown
// as std::runtime_error naming PATH. The temporary file is registered with
// formats/temp_files.h (removed on exit and on SIGTERM), and leftovers of a
// killed run that wrote PATH are removed before a new one starts.
void replace_file_atomically(const std::string& path, const std::function<void(const std::string& tmp)>& fill);

}  // namespace cairn::formats
