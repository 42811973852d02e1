// Limits on what Cairn reads from a file, so that no file can make a reader
// crash, crawl or take all memory (storage/SCHEMA.md, "Limits"). Each limit
// gives a clear error naming the file and the limit.
#pragma once
#include <cstddef>
#include <string>

#include "geomath/result.h"

namespace cairn::formats {

// Largest CSV or GPX file an import reads (64 MiB: about a million rows of
// readings, far beyond a field season of one crew).
constexpr size_t kMaxImportBytes = size_t{64} << 20;
// Most data rows of one CSV import and waypoints of one GPX import.
constexpr size_t kMaxImportRows = 500000;
// Longest single CSV field or XML text (1 MiB: notes are short).
constexpr size_t kMaxFieldBytes = size_t{1} << 20;
// Deepest element nesting of an XML file (GPX needs 4) and most attributes on one element.
constexpr int kMaxXmlDepth = 64;
constexpr int kMaxXmlAttributes = 64;

// The bytes of the file PATH, read in pieces, refused as soon as they pass
// MAX bytes ("PATH: the file is larger than 64 MiB, the most Cairn imports; ...")
// so that /dev/zero or a huge file cannot fill the memory.
Result<std::string> read_file_limited(const std::string& path, size_t max = kMaxImportBytes);

// "64 MiB", "500000" for messages.
std::string size_text(size_t bytes);

}  // namespace cairn::formats
