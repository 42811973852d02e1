// One small drawing interface shared by the touch UI and the report: the UI
// implements it with Dear ImGui draw lists, the report writes SVG. Scene code
// (nets, plans, symbols) draws through it and so looks the same in both.
//
// Coordinates are canvas units (pixels in the UI, user units in SVG), x to the
// right and y DOWN, as both targets use.
#pragma once
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

namespace cairn::plot {

struct Rgba {
  std::uint8_t r = 0, g = 0, b = 0, a = 255;
};

struct Pt {
  double x = 0, y = 0;
};

struct Rect {
  double x = 0, y = 0, w = 0, h = 0;
};

// Marker shapes: severities and record kinds are told apart by shape and word,
// never by colour alone.
enum class Shape { Circle, Square, Triangle, Diamond, Cross, Plus };

enum class Anchor { Start, Middle, End };

class Canvas {
 public:
  virtual ~Canvas() = default;
  virtual void polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed = false) = 0;
  virtual void fill_polygon(const std::vector<Pt>& pts, Rgba fill) = 0;
  virtual void circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill = std::nullopt) = 0;
  virtual void marker(Pt centre, Shape shape, double size, Rgba colour, bool filled = true) = 0;
  // `at` is the top of the line of text; the baseline sits 0.8 * size below it
  // (both backends follow this, so labels land in the same place).
  virtual void text(Pt at, const std::string& s, Rgba colour, double size, Anchor anchor = Anchor::Start) = 0;
};

// Okabe & Ito (2008) colour-blind-safe palette, in their order; units take
// their colours from it unless the user picks others.
extern const Rgba kOkabeIto[8];
// "#RRGGBB" -> colour; nothing for bad text.
std::optional<Rgba> parse_hex_colour(const std::string& hex);

}  // namespace cairn::plot
