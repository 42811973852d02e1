// A drawing kept as an OpenGL texture: a net of 50 000 poles is drawn into a
// texture once (through an offscreen framebuffer) when its data, size or theme
// change, and each frame then only shows the texture, so a frame costs almost
// nothing however much the picture holds.
#pragma once
#include <string>
#include <vector>

#include <imgui.h>

#include "app/plot/recording_canvas.h"
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
  bool ready() const { return texture_ != 0; }
  // Shows the texture at `pos` on the draw list.
  void show(ImDrawList* list, ImVec2 pos) const;
  // The texts of the drawing, for event scripts.
  const std::vector<std::string>& texts() const { return texts_; }

 private:
  unsigned texture_ = 0, framebuffer_ = 0;
  int w_ = 0, h_ = 0;  // points
  std::vector<std::string> texts_;
};

}  // namespace cairn::ui
