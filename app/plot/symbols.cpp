#include "app/plot/symbols.h"

#include <cmath>

namespace cairn::plot {

namespace {
constexpr double kPi = 3.14159265358979323846;

std::vector<Pt> closed(std::vector<Pt> p) {
  p.push_back(p.front());
  return p;
}
}  // namespace

std::vector<std::vector<Pt>> marker_outline(Shape shape, Pt c, double size) {
  const double h = size / 2;
  switch (shape) {
    case Shape::Circle: {
      std::vector<Pt> p;
      for (int i = 0; i < 24; ++i) {
        const double a = 2 * kPi * i / 24;
        p.push_back({c.x + h * std::cos(a), c.y + h * std::sin(a)});
      }
      return {closed(p)};
    }
    case Shape::Square:
      return {closed({{c.x - h, c.y - h}, {c.x + h, c.y - h}, {c.x + h, c.y + h}, {c.x - h, c.y + h}})};
    case Shape::Triangle: {
      // Equilateral, apex up, centred on its bounding box so it sits where a circle would.
      const double hh = size * std::sqrt(3.0) / 4;  // half its height
      return {closed({{c.x, c.y - hh}, {c.x + h, c.y + hh}, {c.x - h, c.y + hh}})};
    }
    case Shape::Diamond: return {closed({{c.x, c.y - h}, {c.x + h, c.y}, {c.x, c.y + h}, {c.x - h, c.y}})};
    case Shape::Cross: return {{{c.x - h, c.y - h}, {c.x + h, c.y + h}}, {{c.x - h, c.y + h}, {c.x + h, c.y - h}}};
    case Shape::Plus: return {{{c.x - h, c.y}, {c.x + h, c.y}}, {{c.x, c.y - h}, {c.x, c.y + h}}};
  }
  return {};
}

bool marker_fillable(Shape shape) { return shape != Shape::Cross && shape != Shape::Plus; }

Shape severity_shape(std::string_view s) {
  if (s == "note") return Shape::Circle;
  if (s == "query") return Shape::Square;
  if (s == "conflict") return Shape::Diamond;
  if (s == "hazard") return Shape::Triangle;
  return Shape::Cross;
}

Shape pole_shape(std::string_view k) {
  if (k == "bedding" || k == "contact") return Shape::Circle;
  if (k == "foliation") return Shape::Square;
  if (k == "cleavage") return Shape::Diamond;
  if (k == "joint") return Shape::Triangle;
  if (k == "fault") return Shape::Cross;
  return Shape::Plus;  // vein, slope and anything new
}

Shape line_shape(std::string_view k) {
  if (k == "lineation") return Shape::Triangle;
  if (k == "fold_axis") return Shape::Square;
  if (k == "slickenline") return Shape::Diamond;
  return Shape::Circle;  // intersection and anything new
}

Rgba unit_colour(const std::string& own_hex, std::size_t index) {
  if (auto c = parse_hex_colour(own_hex)) return *c;
  return kOkabeIto[1 + index % 7];
}

}  // namespace cairn::plot
