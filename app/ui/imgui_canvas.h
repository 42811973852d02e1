// The shared drawing interface (app/plot/canvas.h) on a Dear ImGui draw list,
// so nets and plans look the same on screen as in the report.
#pragma once
#include <imgui.h>

#include "app/plot/canvas.h"
#include "app/ui/theme.h"

namespace cairn::ui {

class ImGuiCanvas : public plot::Canvas {
 public:
  // Draws on `list` with `font` (text sizes are pixels); colours pass through
  // theme_colour(theme, ...), so print colours become night colours. Texts
  // drawn go into the frame's record (widgets.h: what event scripts read),
  // except on a worker (Texts::Unrecorded), where the UI thread records the
  // picture's texts when it shows it.
  enum class Texts { Recorded, Unrecorded };
  ImGuiCanvas(ImDrawList* list, ImFont* font, ThemeKind theme, Texts texts = Texts::Recorded)
      : list_(list), font_(font), theme_(theme), texts_(texts) {}

  void polyline(const std::vector<plot::Pt>& pts, plot::Rgba stroke, double width, bool closed = false) override;
  void fill_polygon(const std::vector<plot::Pt>& pts, plot::Rgba fill) override;
  void circle(plot::Pt centre, double radius, plot::Rgba stroke, double width,
              std::optional<plot::Rgba> fill = std::nullopt) override;
  void marker(plot::Pt centre, plot::Shape shape, double size, plot::Rgba colour, bool filled = true) override;
  void text(plot::Pt at, const std::string& s, plot::Rgba colour, double size,
            plot::Anchor anchor = plot::Anchor::Start) override;

 private:
  ImU32 col(plot::Rgba c) const { return to_u32(theme_colour(theme_, c)); }
  ImDrawList* list_;
  ImFont* font_;
  ThemeKind theme_;
  Texts texts_;
  ImVector<ImVec2> buf_;
};

}  // namespace cairn::ui
