// Photos on the touch UI: thumbnails on the Station sheet (tap one to enlarge
// it, with a big Close photo button), and the Camp screen's Photos action
// (the same matching as `cairn photos`, a preview list, then Record N photos).
//
// Thumbnails are decoded and scaled once (app/core/photo_thumbs.h) and kept as
// OpenGL textures in memory for the session: no cache file is written beside
// or into the project.
#pragma once
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "app/core/photo_import.h"
#include "storage/records.h"

namespace cairn::ui {

class App;

struct PhotoTexture {
  unsigned texture = 0;  // OpenGL texture name (0: none)
  int width = 0, height = 0;
  std::string problem;  // why there is no picture
  bool content_matches = true;
};

// The session's pictures of photo files, by project, photo and size.
class PhotoTextures {
 public:
  PhotoTextures() = default;
  PhotoTextures(const PhotoTextures&) = delete;
  PhotoTextures& operator=(const PhotoTextures&) = delete;
  ~PhotoTextures() { clear(); }
  // The picture of PHOTO at most SIDE pixels on its longer side, loaded on first use.
  const PhotoTexture& get(const std::string& project_path, const store::Photo& photo, int side);
  void clear();  // frees the textures (before the OpenGL context goes)

 private:
  std::map<std::string, PhotoTexture> map_;
};

struct PhotosUi {
  PhotoTextures textures;
  std::string open;  // UUID of the enlarged photo ("" = none)
  // Camp screen: the form, the plan found and what was said.
  std::string folder = "photos", clock_offset, person;
  std::optional<core::PhotoPlan> plan;
  std::vector<std::string> lines;
  std::string error;
};

// Station sheet: the station's photos as thumbnails (tap to enlarge).
void station_thumbnails(App& a, const store::Station& s);
// Station sheet: the enlarged photo over the screen, when one is open.
void photo_overlay(App& a);
// Camp screen: the Photos section.
void camp_photos(App& a);

}  // namespace cairn::ui
