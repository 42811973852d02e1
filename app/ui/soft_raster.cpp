#include "app/ui/soft_raster.h"

#include <algorithm>
#include <cmath>

#include "app/ui/imgui_canvas.h"

namespace cairn::ui {

RasterSetup RasterSetup::from_context(ImFont* font, ThemeKind theme, ImU32 background) {
  RasterSetup s;
  s.shared = *ImGui::GetDrawListSharedData();
  s.font = font;
  ImGuiIO& io = ImGui::GetIO();
  s.font_texture = io.Fonts->TexID;
  unsigned char* px = nullptr;
  io.Fonts->GetTexDataAsRGBA32(&px, &s.atlas_w, &s.atlas_h);  // made once by the renderer; kept by the atlas
  s.atlas = px;
  s.theme = theme;
  s.background = background;
  s.scale = io.DisplayFramebufferScale;
  return s;
}

namespace {

struct Rgba {
  float r, g, b, a;  // 0..255
};

Rgba unpack(ImU32 c) {
  return {static_cast<float>(c & 0xFF), static_cast<float>((c >> 8) & 0xFF), static_cast<float>((c >> 16) & 0xFF),
          static_cast<float>((c >> 24) & 0xFF)};
}

// The atlas at (u, v) with bilinear filtering and clamping to the edge, 0..1 a channel.
Rgba sample(const RasterSetup& s, float u, float v) {
  const float x = u * static_cast<float>(s.atlas_w) - 0.5f, y = v * static_cast<float>(s.atlas_h) - 0.5f;
  const float fx = std::floor(x), fy = std::floor(y);
  const float tx = x - fx, ty = y - fy;
  auto at = [&](int i, int j) {
    i = std::clamp(i, 0, s.atlas_w - 1);
    j = std::clamp(j, 0, s.atlas_h - 1);
    const unsigned char* p =
        s.atlas + (static_cast<size_t>(j) * static_cast<size_t>(s.atlas_w) + static_cast<size_t>(i)) * 4;
    return Rgba{p[0] / 255.0f, p[1] / 255.0f, p[2] / 255.0f, p[3] / 255.0f};
  };
  const int i = static_cast<int>(fx), j = static_cast<int>(fy);
  const Rgba a = at(i, j), b = at(i + 1, j), c = at(i, j + 1), d = at(i + 1, j + 1);
  auto mix = [&](float p, float q, float r, float t) {
    return (p * (1 - tx) + q * tx) * (1 - ty) + (r * (1 - tx) + t * tx) * ty;
  };
  return {mix(a.r, b.r, c.r, d.r), mix(a.g, b.g, c.g, d.g), mix(a.b, b.b, c.b, d.b), mix(a.a, b.a, c.a, d.a)};
}

struct Vert {
  float x, y, u, v;
  Rgba c;
};

// Whether a point exactly on the edge from (x0, y0) to (x1, y1) belongs to the
// triangle: of the two triangles sharing an edge (which run along it in
// opposite directions) exactly one takes it.
bool owns_edge(float x0, float y0, float x1, float y1) {
  const float dy = y1 - y0, dx = x1 - x0;
  return dy > 0 || (dy == 0 && dx < 0);
}

void triangle(Vert a, Vert b, Vert c, int cx0, int cy0, int cx1, int cy1, const RasterSetup& s, RgbaImage& out) {
  float area = (b.x - a.x) * (c.y - a.y) - (b.y - a.y) * (c.x - a.x);
  if (!(std::fabs(area) > 1e-12f)) return;
  if (area < 0) {
    std::swap(b, c);
    area = -area;
  }
  const int x0 = std::max(cx0, static_cast<int>(std::floor(std::min({a.x, b.x, c.x}))));
  const int x1 = std::min(cx1 - 1, static_cast<int>(std::ceil(std::max({a.x, b.x, c.x}))));
  const int y0 = std::max(cy0, static_cast<int>(std::floor(std::min({a.y, b.y, c.y}))));
  const int y1 = std::min(cy1 - 1, static_cast<int>(std::ceil(std::max({a.y, b.y, c.y}))));
  if (x0 > x1 || y0 > y1) return;
  const bool own_ab = owns_edge(a.x, a.y, b.x, b.y), own_bc = owns_edge(b.x, b.y, c.x, c.y),
             own_ca = owns_edge(c.x, c.y, a.x, a.y);
  const ImVec2 white = s.shared.TexUvWhitePixel;
  const bool textured =
      !(a.u == white.x && a.v == white.y && b.u == white.x && b.v == white.y && c.u == white.x && c.v == white.y);
  const float inv = 1.0f / area;
  for (int y = y0; y <= y1; ++y) {
    const float py = static_cast<float>(y) + 0.5f;
    for (int x = x0; x <= x1; ++x) {
      const float px = static_cast<float>(x) + 0.5f;
      // Edge functions: each is twice the area of the triangle the pixel centre
      // makes with one edge; all non-negative inside.
      const float e_bc = (c.x - b.x) * (py - b.y) - (c.y - b.y) * (px - b.x);
      const float e_ca = (a.x - c.x) * (py - c.y) - (a.y - c.y) * (px - c.x);
      const float e_ab = (b.x - a.x) * (py - a.y) - (b.y - a.y) * (px - a.x);
      if (e_bc < 0 || e_ca < 0 || e_ab < 0) continue;
      if ((e_bc == 0 && !own_bc) || (e_ca == 0 && !own_ca) || (e_ab == 0 && !own_ab)) continue;
      const float wa = e_bc * inv, wb = e_ca * inv, wc = e_ab * inv;
      Rgba col{wa * a.c.r + wb * b.c.r + wc * c.c.r, wa * a.c.g + wb * b.c.g + wc * c.c.g,
               wa * a.c.b + wb * b.c.b + wc * c.c.b, wa * a.c.a + wb * b.c.a + wc * c.c.a};
      if (textured && s.atlas) {
        const Rgba t = sample(s, wa * a.u + wb * b.u + wc * c.u, wa * a.v + wb * b.v + wc * c.v);
        col = {col.r * t.r, col.g * t.g, col.b * t.b, col.a * t.a};
      }
      const float alpha = std::clamp(col.a / 255.0f, 0.0f, 1.0f);
      if (alpha <= 0) continue;
      std::uint8_t* d = &out.px[(static_cast<size_t>(y) * static_cast<size_t>(out.w) + static_cast<size_t>(x)) * 4];
      for (int k = 0; k < 3; ++k) {
        const float src = k == 0 ? col.r : k == 1 ? col.g : col.b;
        const float v = src * alpha + static_cast<float>(d[k]) * (1 - alpha);
        d[k] = static_cast<std::uint8_t>(std::clamp(std::lround(v), 0L, 255L));
      }
      d[3] = 255;
    }
  }
}

}  // namespace

void rasterize(const ImDrawList& list, const RasterSetup& s, int w, int h, RgbaImage& out) {
  out.w = std::max(1, static_cast<int>(static_cast<float>(w) * s.scale.x));
  out.h = std::max(1, static_cast<int>(static_cast<float>(h) * s.scale.y));
  out.px.assign(static_cast<size_t>(out.w) * static_cast<size_t>(out.h) * 4, 0);
  const Rgba bg = unpack(s.background);
  for (size_t i = 0; i < out.px.size(); i += 4) {
    out.px[i] = static_cast<std::uint8_t>(bg.r);
    out.px[i + 1] = static_cast<std::uint8_t>(bg.g);
    out.px[i + 2] = static_cast<std::uint8_t>(bg.b);
    out.px[i + 3] = 255;
  }
  const ImDrawVert* vtx = list.VtxBuffer.Data;
  const ImDrawIdx* idx = list.IdxBuffer.Data;
  auto vert = [&](const ImDrawVert& v) {
    return Vert{v.pos.x * s.scale.x, v.pos.y * s.scale.y, v.uv.x, v.uv.y, unpack(v.col)};
  };
  for (const ImDrawCmd& cmd : list.CmdBuffer) {
    if (cmd.UserCallback || cmd.ElemCount == 0) continue;
    // The scissor rectangle, in pixels, as Dear ImGui's renderer sets it.
    const int cx0 = std::max(0, static_cast<int>(cmd.ClipRect.x * s.scale.x));
    const int cy0 = std::max(0, static_cast<int>(cmd.ClipRect.y * s.scale.y));
    const int cx1 = std::min(out.w, static_cast<int>(cmd.ClipRect.z * s.scale.x));
    const int cy1 = std::min(out.h, static_cast<int>(cmd.ClipRect.w * s.scale.y));
    if (cx0 >= cx1 || cy0 >= cy1) continue;
    for (unsigned i = 0; i + 2 < cmd.ElemCount; i += 3) {
      const size_t at = cmd.IdxOffset + i;
      triangle(vert(vtx[cmd.VtxOffset + idx[at]]), vert(vtx[cmd.VtxOffset + idx[at + 1]]),
               vert(vtx[cmd.VtxOffset + idx[at + 2]]), cx0, cy0, cx1, cy1, s, out);
    }
  }
}

RgbaImage draw_in_pixels(const plot::RecordingCanvas& drawing, int w, int h, const RasterSetup& s) {
  // The same geometry GlPicture::render hands to OpenGL.
  ImDrawList list(&s.shared);
  list._ResetForNewFrame();
  list.Flags = ImDrawListFlags_AntiAliasedLines | ImDrawListFlags_AntiAliasedLinesUseTex |
               ImDrawListFlags_AntiAliasedFill | ImDrawListFlags_AllowVtxOffset;
  list.PushTextureID(s.font_texture);
  list.PushClipRect(ImVec2(0, 0), ImVec2(static_cast<float>(w), static_cast<float>(h)));
  ImGuiCanvas canvas(&list, s.font, s.theme, ImGuiCanvas::Texts::Unrecorded);  // on a worker
  drawing.replay(canvas);
  RgbaImage out;
  rasterize(list, s, w, h, out);
  return out;
}

}  // namespace cairn::ui
