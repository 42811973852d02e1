#include "storage/photos.h"

#include <set>

#include "formats/validate.h"
#include "storage/repository.h"
#include "storage/sqlite.h"

namespace cairn::store {

std::optional<Photo> find_photo_by_sha256(Project& p, const std::string& sha256) {
  Stmt s(p.db(), "SELECT uuid FROM photos WHERE sha256 = ? AND deleted IS NULL ORDER BY created, rowid LIMIT 1");
  s.bind(1, sha256);
  if (!s.step()) return std::nullopt;
  return get_photo(p, s.text(0));
}

PhotoBatch add_photos(Project& p, std::vector<Photo> photos) {
  PhotoBatch b;
  p.write([&] {
    std::set<std::string> seen;
    for (auto& ph : photos) {
      if (const auto broken = formats::check_photo_path(ph.path))
        throw ValidationError("path", broken->rule, broken->message);
      if (!seen.insert(ph.sha256).second || find_photo_by_sha256(p, ph.sha256)) {
        b.skipped.push_back(ph.path);
        continue;
      }
      add(p, ph);
      ++b.added;
    }
  });
  return b;
}

}  // namespace cairn::store
