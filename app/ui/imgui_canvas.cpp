#include "app/ui/imgui_canvas.h"

#include <cfloat>
#include <cmath>

#include "app/plot/symbols.h"
#include "app/ui/widgets.h"

namespace cairn::ui {

using plot::Pt;
using plot::Rgba;

namespace {
ImVec2 v(Pt p) { return ImVec2(static_cast<float>(p.x), static_cast<float>(p.y)); }
}  // namespace

void ImGuiCanvas::polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed) {
  if (pts.size() < 2) return;
  buf_.resize(static_cast<int>(pts.size()));
  for (size_t i = 0; i < pts.size(); ++i) buf_[static_cast<int>(i)] = v(pts[i]);
  list_->AddPolyline(buf_.Data, buf_.Size, col(stroke), closed ? ImDrawFlags_Closed : ImDrawFlags_None,
                     static_cast<float>(width));
}

void ImGuiCanvas::fill_polygon(const std::vector<Pt>& pts, Rgba fill) {
  // Dear ImGui 1.86 fills convex polygons only; the scenes fill triangles,
  // rectangles and other convex outlines.
  if (pts.size() < 3) return;
  buf_.resize(static_cast<int>(pts.size()));
  for (size_t i = 0; i < pts.size(); ++i) buf_[static_cast<int>(i)] = v(pts[i]);
  list_->AddConvexPolyFilled(buf_.Data, buf_.Size, col(fill));
}

void ImGuiCanvas::circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill) {
  const int segments = radius < 6 ? 10 : radius < 40 ? 24 : 0;  // 0: ImGui picks by size
  if (fill) list_->AddCircleFilled(v(centre), static_cast<float>(radius), col(*fill), segments);
  if (width > 0)
    list_->AddCircle(v(centre), static_cast<float>(radius), col(stroke), segments, static_cast<float>(width));
}

void ImGuiCanvas::marker(Pt c, plot::Shape shape, double size, Rgba colour, bool filled) {
  const ImU32 k = col(colour);
  const float h = static_cast<float>(size / 2);
  const ImVec2 p = v(c);
  const float w = std::max(1.0f, static_cast<float>(size) / 6);
  switch (shape) {
    case plot::Shape::Circle:
      if (filled)
        list_->AddCircleFilled(p, h, k, size < 10 ? 8 : 16);
      else
        list_->AddCircle(p, h, k, size < 10 ? 8 : 16, w);
      return;
    case plot::Shape::Square:
      if (filled)
        list_->AddRectFilled(ImVec2(p.x - h, p.y - h), ImVec2(p.x + h, p.y + h), k);
      else
        list_->AddRect(ImVec2(p.x - h, p.y - h), ImVec2(p.x + h, p.y + h), k, 0, 0, w);
      return;
    default: break;
  }
  // The other shapes take their outline from the shared symbol code.
  for (const auto& part : plot::marker_outline(shape, c, size)) {
    if (filled && plot::marker_fillable(shape))
      fill_polygon(part, colour);
    else
      polyline(part, colour, w, false);
  }
}

void ImGuiCanvas::text(Pt at, const std::string& s, Rgba colour, double size, plot::Anchor anchor) {
  if (s.empty()) return;
  const float fs = static_cast<float>(size);
  ImVec2 p = v(at);
  if (anchor != plot::Anchor::Start) {
    const ImVec2 ext = font_->CalcTextSizeA(fs, FLT_MAX, 0.0f, s.c_str());
    p.x -= anchor == plot::Anchor::Middle ? ext.x / 2 : ext.x;
  }
  list_->AddText(font_, fs, p, col(colour), s.c_str());
  if (texts_ == Texts::Recorded) this_frame().texts.push_back(s);  // what a picture says, for event scripts too
}

}  // namespace cairn::ui
