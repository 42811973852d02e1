// A Canvas that records what is drawn on it, to draw it again later on another
// Canvas (moved by an offset). The touch UI builds a net or a plan once, when
// the project or the view changes, and replays the record every frame; tests
// read the record to see what a scene drew.
#pragma once
#include <string>
#include <vector>

#include "app/plot/canvas.h"

namespace cairn::plot {

struct DrawOp {
  enum Kind { Polyline, Fill, Circle, Marker, Text } kind = Polyline;
  std::vector<Pt> pts;       // Polyline, Fill; Circle/Marker/Text: pts[0] is the place
  Rgba colour;               // stroke (or fill for Fill, Marker and Text)
  std::optional<Rgba> fill;  // Circle
  double width = 1;          // stroke width; Circle: radius in `size`
  double size = 0;           // Circle radius, Marker size, Text size
  bool closed = false;       // Polyline
  bool filled = false;       // Marker
  Shape shape = Shape::Circle;
  Anchor anchor = Anchor::Start;
  std::string text;
};

class RecordingCanvas : public Canvas {
 public:
  void polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed = false) override;
  void fill_polygon(const std::vector<Pt>& pts, Rgba fill) override;
  void circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill = std::nullopt) override;
  void marker(Pt centre, Shape shape, double size, Rgba colour, bool filled = true) override;
  void text(Pt at, const std::string& s, Rgba colour, double size, Anchor anchor = Anchor::Start) override;

  const std::vector<DrawOp>& ops() const { return ops_; }
  // The texts drawn, in order (what a screen reports as shown without walking
  // every operation of a season's drawing).
  const std::vector<std::string>& texts() const { return texts_; }
  void clear() {
    ops_.clear();
    texts_.clear();
  }
  // Draws every recorded operation on `out`, moved by (dx, dy).
  void replay(Canvas& out, double dx = 0, double dy = 0) const;

 private:
  std::vector<DrawOp> ops_;
  std::vector<std::string> texts_;
};

}  // namespace cairn::plot
