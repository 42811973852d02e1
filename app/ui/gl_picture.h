// A drawing kept as an OpenGL texture: a net of 50 000 poles is drawn into a
// texture once (through an offscreen framebuffer) when its data, size or theme
// change, and each frame then only shows the texture, so a frame costs almost
// nothing however much the picture holds.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include <imgui.h>

#include "app/plot/recording_canvas.h"
#include "app/ui/soft_raster.h"
#include "app/ui/theme.h"

namespace cairn::ui {

class GlPicture {
 public:
  GlPicture() = default;
  GlPicture(const GlPicture&) = delete;
  GlPicture& operator=(const GlPicture&) = delete;
  ~GlPicture();

  // Draws the recording (canvas units = pixels, origin at the picture's
  // top-left) into a texture of w x h points on `background`. False when this
  // OpenGL cannot render to a texture; then draw the recording directly instead.
  bool render(const plot::RecordingCanvas& drawing, int w, int h, ThemeKind theme, ImFont* font, ImU32 background);
  // The same, from pixels already drawn (`pixels`) when there are some, else render().
  bool show_drawing(const plot::RecordingCanvas& drawing, const std::optional<RgbaImage>& pixels, int w, int h,
                    ThemeKind theme, ImFont* font, ImU32 background);
  // Puts pixels drawn elsewhere (soft_raster.h, on a worker) into the texture,
  // as a picture of w x h points; `texts` are the drawing's texts.
  void upload(const RgbaImage& image, int w, int h, const std::vector<std::string>& texts);
  bool ready() const { return texture_ != 0; }
  // Shows the texture at `pos` on the draw list.
  void show(ImDrawList* list, ImVec2 pos) const;
  // Shows it stretched over the rectangle from `min` to `max` (a picture of an
  // older view, moved and scaled to the current one).
  void show(ImDrawList* list, ImVec2 min, ImVec2 max) const;
  // The texts of the drawing, for event scripts.
  const std::vector<std::string>& texts() const { return texts_; }

 private:
  void bind_texture();  // made if need be, linear filtering, clamped to the edge
  unsigned texture_ = 0, framebuffer_ = 0;
  int texture_w_ = 0, texture_h_ = 0;  // the texture's storage, in pixels (0: none yet)
  int w_ = 0, h_ = 0;                  // points
  bool rows_up_ = false;               // rows bottom to top (rendered by OpenGL) rather than top to bottom (uploaded)
  std::vector<std::string> texts_;
};

}  // namespace cairn::ui
