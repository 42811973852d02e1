// A recording drawn into pixels on the CPU, on any thread: the geometry Dear
// ImGui makes of it (an ImDrawList of textured, coloured triangles) filled
// pixel by pixel, as OpenGL would with the blending Dear ImGui's OpenGL 3
// renderer sets. The Net and the Plan of a large project are drawn this way on
// a worker thread, so that the UI thread only uploads the finished pixels (a
// season's plan is millions of vertices: over a second of the UI thread's time
// through Mesa's llvmpipe).
//
// The rules are OpenGL's (The OpenGL Graphics System 3.2, section 3.6,
// polygon rasterisation: a pixel belongs to a triangle when its centre is
// inside, edges shared by two triangles going to one of them; section 3.8.8,
// bilinear texture filtering; section 4.1.8, blending with
// SRC_ALPHA / ONE_MINUS_SRC_ALPHA). The tests compare the result with Mesa's
// rendering of the same geometry.
#pragma once
#include <cstdint>
#include <string>
#include <vector>

#include <imgui.h>
#include <imgui_internal.h>

#include "app/plot/recording_canvas.h"
#include "app/ui/theme.h"

namespace cairn::ui {

// RGBA, 8 bits a channel, rows top to bottom, opaque.
struct RgbaImage {
  int w = 0, h = 0;
  std::vector<std::uint8_t> px;
};

// What drawing a recording needs from the UI thread's Dear ImGui, copied there
// (the worker must not read the live context): the draw-list tables, the font
// and the font atlas's pixels (read only; the atlas is never rebuilt while the
// UI runs).
struct RasterSetup {
  ImDrawListSharedData shared;
  ImFont* font = nullptr;
  ImTextureID font_texture = nullptr;
  const unsigned char* atlas = nullptr;  // RGBA32
  int atlas_w = 0, atlas_h = 0;
  ThemeKind theme = ThemeKind::Outdoor;
  ImU32 background = 0;
  ImVec2 scale{1, 1};  // framebuffer pixels per point
  // From the current Dear ImGui context (call on the UI thread).
  static RasterSetup from_context(ImFont* font, ThemeKind theme, ImU32 background);
};

// Fills `out` with `background` (w x h pixels) and draws the triangles of
// `list` over it; positions are in points, multiplied by `scale`.
void rasterize(const ImDrawList& list, const RasterSetup& s, int w, int h, RgbaImage& out);

// A recording (canvas units = points, origin top-left) drawn on a w x h point
// picture: its Dear ImGui geometry, then rasterize().
RgbaImage draw_in_pixels(const plot::RecordingCanvas& drawing, int w, int h, const RasterSetup& s);

}  // namespace cairn::ui
