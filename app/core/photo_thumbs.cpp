#include "app/core/photo_thumbs.h"

#include <filesystem>

#include "formats/exif.h"
#include "formats/limits.h"
#include "formats/sha256.h"
#include "formats/validate.h"

namespace cairn::core {

Result<Thumbnail> load_thumbnail(const std::string& project_path, const store::Photo& photo, int max_side) {
  using R = Result<Thumbnail>;
  if (const auto broken = formats::check_photo_path(photo.path)) return R::failure(broken->message);
  const auto file = std::filesystem::absolute(project_path).parent_path() / photo.path;
  std::error_code ec;
  if (!std::filesystem::is_regular_file(file, ec))
    return R::failure("photo file " + photo.path + " is missing beside the project file");
  const auto bytes = formats::read_file_limited(file.string(), formats::kMaxPhotoBytes);
  if (!bytes) return R::failure(bytes.error());
  const auto pic = formats::decode_jpeg(*bytes, photo.path);
  if (!pic) return R::failure(pic.error());
  Thumbnail t;
  t.picture = formats::scale_to_fit(*pic, max_side);
  t.content_matches = photo.sha256.empty() || formats::sha256_hex(*bytes) == photo.sha256;
  return t;
}

}  // namespace cairn::core
