#include "app/plot/recording_canvas.h"

namespace cairn::plot {

void RecordingCanvas::polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed) {
  DrawOp o;
  o.kind = DrawOp::Polyline;
  o.pts = pts;
  o.colour = stroke;
  o.width = width;
  o.closed = closed;
  ops_.push_back(std::move(o));
}

void RecordingCanvas::fill_polygon(const std::vector<Pt>& pts, Rgba fill) {
  DrawOp o;
  o.kind = DrawOp::Fill;
  o.pts = pts;
  o.colour = fill;
  ops_.push_back(std::move(o));
}

void RecordingCanvas::circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill) {
  DrawOp o;
  o.kind = DrawOp::Circle;
  o.pts = {centre};
  o.colour = stroke;
  o.width = width;
  o.size = radius;
  o.fill = fill;
  ops_.push_back(std::move(o));
}

void RecordingCanvas::marker(Pt centre, Shape shape, double size, Rgba colour, bool filled) {
  DrawOp o;
  o.kind = DrawOp::Marker;
  o.pts = {centre};
  o.shape = shape;
  o.size = size;
  o.colour = colour;
  o.filled = filled;
  ops_.push_back(std::move(o));
}

void RecordingCanvas::text(Pt at, const std::string& s, Rgba colour, double size, Anchor anchor) {
  DrawOp o;
  o.kind = DrawOp::Text;
  o.pts = {at};
  o.text = s;
  o.colour = colour;
  o.size = size;
  o.anchor = anchor;
  ops_.push_back(std::move(o));
  texts_.push_back(s);
}

void RecordingCanvas::replay(Canvas& out, double dx, double dy) const {
  auto mv = [&](Pt p) { return Pt{p.x + dx, p.y + dy}; };
  std::vector<Pt> buf;
  for (const auto& o : ops_) {
    switch (o.kind) {
      case DrawOp::Polyline:
      case DrawOp::Fill:
        buf.resize(o.pts.size());
        for (size_t i = 0; i < o.pts.size(); ++i) buf[i] = mv(o.pts[i]);
        if (o.kind == DrawOp::Polyline)
          out.polyline(buf, o.colour, o.width, o.closed);
        else
          out.fill_polygon(buf, o.colour);
        break;
      case DrawOp::Circle: out.circle(mv(o.pts[0]), o.size, o.colour, o.width, o.fill); break;
      case DrawOp::Marker: out.marker(mv(o.pts[0]), o.shape, o.size, o.colour, o.filled); break;
      case DrawOp::Text: out.text(mv(o.pts[0]), o.text, o.colour, o.size, o.anchor); break;
    }
  }
}

}  // namespace cairn::plot
