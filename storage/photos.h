// Photo references recorded as one batch (the `photos` verb and the Camp
// screen): every new reference added with its audit row inside ONE
// transaction, so a batch is recorded whole or not at all; a photo whose
// content (SHA-256) is already recorded in a live reference is skipped.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "storage/project.h"
#include "storage/records.h"

namespace cairn::store {

struct PhotoBatch {
  int added = 0;
  std::vector<std::string> skipped;  // paths of photos whose SHA-256 was already recorded
};

// Adds PHOTOS (each validated as add() does) in one transaction; throws and
// writes nothing when any of them is refused.
PhotoBatch add_photos(Project& p, std::vector<Photo> photos);

// The live photo reference with this content, if any.
std::optional<Photo> find_photo_by_sha256(Project& p, const std::string& sha256);

}  // namespace cairn::store
