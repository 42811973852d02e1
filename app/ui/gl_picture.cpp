#include "app/ui/gl_picture.h"

#include <algorithm>
#include <cstdint>
#include <utility>

#include <SDL.h>
#include <SDL_opengl.h>
#include <backends/imgui_impl_opengl3.h>

#include "app/ui/imgui_canvas.h"

namespace cairn::ui {

namespace {

// Framebuffer objects (OpenGL 3.0 core), loaded through SDL.
struct FboApi {
  PFNGLGENFRAMEBUFFERSPROC gen = nullptr;
  PFNGLDELETEFRAMEBUFFERSPROC del = nullptr;
  PFNGLBINDFRAMEBUFFERPROC bind = nullptr;
  PFNGLFRAMEBUFFERTEXTURE2DPROC texture2d = nullptr;
  PFNGLCHECKFRAMEBUFFERSTATUSPROC status = nullptr;
  bool ok() const { return gen && del && bind && texture2d && status; }
};

const FboApi& fbo() {
  static const FboApi api = [] {
    FboApi a;
    a.gen = reinterpret_cast<PFNGLGENFRAMEBUFFERSPROC>(SDL_GL_GetProcAddress("glGenFramebuffers"));
    a.del = reinterpret_cast<PFNGLDELETEFRAMEBUFFERSPROC>(SDL_GL_GetProcAddress("glDeleteFramebuffers"));
    a.bind = reinterpret_cast<PFNGLBINDFRAMEBUFFERPROC>(SDL_GL_GetProcAddress("glBindFramebuffer"));
    a.texture2d = reinterpret_cast<PFNGLFRAMEBUFFERTEXTURE2DPROC>(SDL_GL_GetProcAddress("glFramebufferTexture2D"));
    a.status = reinterpret_cast<PFNGLCHECKFRAMEBUFFERSTATUSPROC>(SDL_GL_GetProcAddress("glCheckFramebufferStatus"));
    return a;
  }();
  return api;
}

}  // namespace

GlPicture::~GlPicture() {
  if (texture_) glDeleteTextures(1, &texture_);
  reset(bands_, 0, 0);
  reset(spare_, 0, 0);
  if (framebuffer_ && fbo().ok()) fbo().del(1, &framebuffer_);
}

bool GlPicture::render(const plot::RecordingCanvas& drawing, int w, int h, ThemeKind theme, ImFont* font,
                       ImU32 background) {
  const FboApi& f = fbo();
  if (!f.ok() || w <= 0 || h <= 0) return false;
  const ImVec2 scale = ImGui::GetIO().DisplayFramebufferScale;
  const int pw = static_cast<int>(w * scale.x), ph = static_cast<int>(h * scale.y);

  // The drawing as Dear ImGui geometry, in a draw list of its own.
  ImDrawList list(ImGui::GetDrawListSharedData());
  list._ResetForNewFrame();
  list.Flags = ImDrawListFlags_AntiAliasedLines | ImDrawListFlags_AntiAliasedLinesUseTex |
               ImDrawListFlags_AntiAliasedFill | ImDrawListFlags_AllowVtxOffset;
  list.PushTextureID(ImGui::GetIO().Fonts->TexID);
  list.PushClipRect(ImVec2(0, 0), ImVec2(static_cast<float>(w), static_cast<float>(h)));
  ImGuiCanvas canvas(&list, font, theme);
  drawing.replay(canvas);
  texts_ = drawing.texts();

  if (!texture_ || w != w_ || h != h_) {
    bind_texture();
    glTexImage2D(GL_TEXTURE_2D, 0, GL_RGBA, pw, ph, 0, GL_RGBA, GL_UNSIGNED_BYTE, nullptr);
    if (!framebuffer_) f.gen(1, &framebuffer_);
  }
  w_ = w;
  h_ = h;
  rows_up_ = true;
  banded_ = false;
  GLint previous = 0;
  glGetIntegerv(GL_FRAMEBUFFER_BINDING, &previous);
  f.bind(GL_FRAMEBUFFER, framebuffer_);
  f.texture2d(GL_FRAMEBUFFER, GL_COLOR_ATTACHMENT0, GL_TEXTURE_2D, texture_, 0);
  const bool complete = f.status(GL_FRAMEBUFFER) == GL_FRAMEBUFFER_COMPLETE;
  if (complete) {
    glViewport(0, 0, pw, ph);
    // The screen's own background, opaque, so that edges blend as they would on screen.
    const ImVec4 bg = ImGui::ColorConvertU32ToFloat4(background);
    glClearColor(bg.x, bg.y, bg.z, 1.0f);
    glClear(GL_COLOR_BUFFER_BIT);
    ImDrawList* lists[] = {&list};
    ImDrawData data;
    data.Valid = true;
    data.CmdLists = lists;
    data.CmdListsCount = 1;
    data.TotalVtxCount = list.VtxBuffer.Size;
    data.TotalIdxCount = list.IdxBuffer.Size;
    data.DisplayPos = ImVec2(0, 0);
    data.DisplaySize = ImVec2(static_cast<float>(w), static_cast<float>(h));
    data.FramebufferScale = scale;
    ImGui_ImplOpenGL3_RenderDrawData(&data);
  }
  f.bind(GL_FRAMEBUFFER, static_cast<GLuint>(previous));
  if (!complete) {
    glDeleteTextures(1, &texture_);
    texture_ = 0;
  }
  return complete;
}

void GlPicture::show(ImDrawList* list, ImVec2 pos) const {
  show(list, pos, ImVec2(pos.x + static_cast<float>(w_), pos.y + static_cast<float>(h_)));
}

void GlPicture::show(ImDrawList* list, ImVec2 min, ImVec2 max) const {
  if (banded_) {
    if (!bands_.complete()) return;
    const float height = max.y - min.y;
    for (size_t i = 0; i < bands_.tex.size(); ++i) {
      const int y0 = static_cast<int>(i) * kBandRows, y1 = std::min(bands_.h, y0 + kBandRows);
      list->AddImage(reinterpret_cast<ImTextureID>(static_cast<std::intptr_t>(bands_.tex[i])),
                     ImVec2(min.x, min.y + height * static_cast<float>(y0) / static_cast<float>(bands_.h)),
                     ImVec2(max.x, min.y + height * static_cast<float>(y1) / static_cast<float>(bands_.h)));
    }
    return;
  }
  if (!texture_) return;
  // A rendered texture's rows run bottom to top (OpenGL), so its v is flipped.
  list->AddImage(reinterpret_cast<ImTextureID>(static_cast<std::intptr_t>(texture_)), min, max,
                 ImVec2(0, rows_up_ ? 1.0f : 0.0f), ImVec2(1, rows_up_ ? 0.0f : 1.0f));
}

bool GlPicture::show_drawing(const plot::RecordingCanvas& drawing, const std::optional<RgbaImage>& pixels, int w, int h,
                             ThemeKind theme, ImFont* font, ImU32 background) {
  if (!pixels) return render(drawing, w, h, theme, font, background);
  upload(*pixels, w, h, drawing.texts());
  return true;
}

void GlPicture::bind_texture() {
  if (!texture_) glGenTextures(1, &texture_);
  glBindTexture(GL_TEXTURE_2D, texture_);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
}

void GlPicture::reset(Bands& b, int w, int h) {
  for (unsigned t : b.tex)
    if (t) glDeleteTextures(1, &t);
  b.tex.assign(w > 0 && h > 0 ? static_cast<size_t>((h + kBandRows - 1) / kBandRows) : 0, 0);
  b.w = w;
  b.h = h;
  b.made = 0;
}

void GlPicture::make_one(Bands& b) {
  if (b.made >= b.tex.size()) return;
  const int rows = std::min(kBandRows, b.h - static_cast<int>(b.made) * kBandRows);
  unsigned& t = b.tex[b.made];
  glGenTextures(1, &t);
  glBindTexture(GL_TEXTURE_2D, t);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MIN_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_MAG_FILTER, GL_LINEAR);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_S, GL_CLAMP_TO_EDGE);
  glTexParameteri(GL_TEXTURE_2D, GL_TEXTURE_WRAP_T, GL_CLAMP_TO_EDGE);
  glTexImage2D(GL_TEXTURE_2D, 0, GL_RGBA, b.w, rows, 0, GL_RGBA, GL_UNSIGNED_BYTE, nullptr);
  ++b.made;
}

void GlPicture::prepare(int pw, int ph) {
  if (pw <= 0 || ph <= 0) return;
  if (bands_.complete() && bands_.w == pw && bands_.h == ph) return;  // the picture goes into the bands shown
  if (spare_.w != pw || spare_.h != ph) reset(spare_, pw, ph);
  make_one(spare_);
}

void GlPicture::upload(const RgbaImage& image, int w, int h, const std::vector<std::string>& texts) {
  if (image.w <= 0 || image.h <= 0 || image.px.size() < static_cast<size_t>(image.w) * static_cast<size_t>(image.h) * 4)
    return;
  // Into the bands shown when the size is theirs (new data, the same screen),
  // else into the spare ones prepare() made over the frames the build took
  // (the bands shown become the spare ones), else into bands made now.
  if (!(bands_.complete() && bands_.w == image.w && bands_.h == image.h)) {
    if (spare_.complete() && spare_.w == image.w && spare_.h == image.h) {
      std::swap(bands_, spare_);
    } else {
      reset(bands_, image.w, image.h);
      while (!bands_.complete()) make_one(bands_);
    }
  }
  glPixelStorei(GL_UNPACK_ALIGNMENT, 1);
  glPixelStorei(GL_UNPACK_ROW_LENGTH, 0);
  for (size_t i = 0; i < bands_.tex.size(); ++i) {
    const int y0 = static_cast<int>(i) * kBandRows, rows = std::min(kBandRows, image.h - y0);
    glBindTexture(GL_TEXTURE_2D, bands_.tex[i]);
    glTexSubImage2D(GL_TEXTURE_2D, 0, 0, 0, image.w, rows, GL_RGBA, GL_UNSIGNED_BYTE,
                    image.px.data() + static_cast<size_t>(y0) * static_cast<size_t>(image.w) * 4);
  }
  if (texture_) {  // a rendered picture before: its texture is not needed now
    glDeleteTextures(1, &texture_);
    texture_ = 0;
  }
  banded_ = true;
  w_ = w;
  h_ = h;
  rows_up_ = false;
  texts_ = texts;
}

}  // namespace cairn::ui
