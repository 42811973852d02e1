// Reading a folder of photos and planning which station each belongs to
// (app/core/photo_match.h has the rules), for the `photos` verb and the Camp
// screen; then recording the plan's matches as photo references in one
// audited transaction (storage/photos.h).
//
// The folder is read, never written: JPEG files (.jpg/.jpeg, any case) in it
// and its sub-folders (at most kMaxPhotoDepth deep, kMaxPhotoFiles files;
// links are not followed). Each file is read whole once (at most
// formats::kMaxPhotoBytes) for its SHA-256 and EXIF. Paths are recorded
// relative to the project file's folder, so the folder must lie inside it.
#pragma once
#include <chrono>
#include <optional>
#include <string>
#include <vector>

#include "app/core/photo_match.h"
#include "formats/exif.h"
#include "geomath/result.h"
#include "storage/photos.h"
#include "storage/project.h"

namespace cairn::core {

constexpr int kMaxPhotoDepth = 4;
constexpr size_t kMaxPhotoFiles = 5000;

struct PhotoPlanOptions {
  std::optional<std::chrono::seconds> clock_offset;
  std::string clock_photo;  // a photo of the tablet's clock ("" = none) ...
  std::string shown;        // ... and the time it showed (ISO 8601)
  std::string person;       // initials ("" = the device's person, see plan_photos)
  std::optional<std::chrono::seconds> max_gap, lead;
  std::optional<double> max_distance;
};

enum class PhotoStatus { Match, Unmatched, Recorded, Unreadable };

struct PlannedPhoto {
  std::string path;    // relative to the project folder, '/' separated
  std::string sha256;  // "" when unreadable
  formats::PhotoExif exif;
  PhotoMatch match;  // station or reason
  PhotoStatus status = PhotoStatus::Unmatched;
  std::string recorded_as;  // Recorded: the path of the reference with the same content
};

struct PhotoPlan {
  std::string folder;                        // as given
  std::string person_uuid, person_initials;  // whose stations ("" = every station)
  std::chrono::seconds clock_offset{0};
  std::string clock_note;  // how the offset was found ("given", "from PHOTO: shown T, EXIF T")
  MatchRules rules;
  std::vector<PlannedPhoto> photos;  // in path order
  int count(PhotoStatus s) const;
};

// The plan for FOLDER. The person: PhotoPlanOptions::person when given (must
// be in the project); else the one observer of the stations this device
// recorded, else the one observer of all stations; several observers and no
// --person is refused, naming them. Fails (nothing read further) for a folder
// outside the project's folder, a bad clock photo or an unknown person.
Result<PhotoPlan> plan_photos(store::Project& p, const std::string& folder, const PhotoPlanOptions& o);

// Records every Match of PLAN (caption empty, time the corrected photo time)
// in one audited transaction; a photo whose content is already recorded is
// skipped.
store::PhotoBatch record_photos(store::Project& p, const PhotoPlan& plan);

std::string_view to_string(PhotoStatus s);

}  // namespace cairn::core
