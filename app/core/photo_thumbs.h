// A photo reference's thumbnail: the file beside the project (its path is
// checked by the photo-path rule, so nothing outside the project folder is
// read), read once within formats::kMaxPhotoBytes, its SHA-256 compared with
// the recorded one, decoded and scaled (formats/image.h). Shared by the
// Station sheet (which caches the result for the session) and the report.
#pragma once
#include <string>

#include "formats/image.h"
#include "geomath/result.h"
#include "storage/records.h"

namespace cairn::core {

// Longest side of a thumbnail in pixels.
constexpr int kThumbnailSide = 256;

struct Thumbnail {
  formats::Picture picture;
  bool content_matches = true;  // false: the file's SHA-256 is not the recorded one
};

// The thumbnail of PHOTO of the project file PROJECT_PATH, at most MAX_SIDE
// pixels on its longer side. Fails with the reason (file missing, not a JPEG, ...).
Result<Thumbnail> load_thumbnail(const std::string& project_path, const store::Photo& photo,
                                 int max_side = kThumbnailSide);

}  // namespace cairn::core
