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
  // Puts pixels drawn elsewhere (soft_raster.h, on a worker) into its
  // textures (bands of rows, below), as a picture of w x h points; `texts`
  // are the drawing's texts.
  void upload(const RgbaImage& image, int w, int h, const std::vector<std::string>& texts);
  bool ready() const { return banded_ ? bands_.complete() : texture_ != 0; }
  // A picture of pw x ph pixels is being drawn on a worker: called every frame
  // meanwhile, this makes the textures for it one band a frame, so that the
  // frame it arrives in only copies it in (upload()).
  void prepare(int pw, int ph);
  // Shows the texture at `pos` on the draw list.
  void show(ImDrawList* list, ImVec2 pos) const;
  // Shows it stretched over the rectangle from `min` to `max` (a picture of an
  // older view, moved and scaled to the current one).
  void show(ImDrawList* list, ImVec2 min, ImVec2 max) const;
  // The texts of the drawing, for event scripts.
  const std::vector<std::string>& texts() const { return texts_; }

 private:
  void bind_texture();  // made if need be, linear filtering, clamped to the edge

  // A picture from pixels is kept as horizontal bands of kBandRows rows, each
  // a texture of its own: a texture's storage is allocated, and under llvmpipe
  // faulted in, all at once (5-9 ms in one frame for a net of 868x627 on the
  // bench machine), and bands let prepare() spread that over frames.
  static constexpr int kBandRows = 64;
  struct Bands {
    std::vector<unsigned> tex;
    int w = 0, h = 0;  // pixels
    size_t made = 0;   // textures made so far, from the top
    bool complete() const { return w > 0 && made == tex.size(); }
  };
  static void reset(Bands& b, int w, int h);  // deletes its textures; `tex` sized for w x h, none made
  static void make_one(Bands& b);             // the next band's texture, storage without contents
  Bands bands_, spare_;                       // shown; made ready for the next picture
  bool banded_ = false;                       // what show() shows: bands_ (uploaded) or texture_ (rendered)
  unsigned texture_ = 0, framebuffer_ = 0;
  int w_ = 0, h_ = 0;     // points
  bool rows_up_ = false;  // rows bottom to top (rendered by OpenGL) rather than top to bottom (uploaded)
  std::vector<std::string> texts_;
};

}  // namespace cairn::ui
