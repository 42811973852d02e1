// Small drawing conventions shared by every Canvas backend and every scene: the
// outline of each marker shape, the shape of each flag severity and reading kind,
// and the colour of a unit. Keeping them here makes the UI and the report agree.
#pragma once
#include <string>
#include <string_view>
#include <vector>

#include "app/plot/canvas.h"

namespace cairn::plot {

// The outline of a marker `size` wide (and high) centred at `c`, as polylines in
// canvas coordinates (y down): one closed polygon (first point == last point) for
// Circle (a 24-gon), Square, Triangle (apex up) and Diamond; two open strokes for
// Cross (an x) and Plus (a +), which have no inside to fill.
std::vector<std::vector<Pt>> marker_outline(Shape shape, Pt c, double size);
// Whether the shape encloses an area (everything but Cross and Plus).
bool marker_fillable(Shape shape);

// Flag severities told apart by shape as well as by word: note a circle, query a
// square, conflict a diamond, hazard a triangle (the warning-sign shape of
// ISO 3864-1). Unknown words get a Cross.
Shape severity_shape(std::string_view severity);

// Pole markers by planar reading kind ("bedding", "foliation", ... as storage names
// them) and line markers by linear reading kind ("lineation", "fold_axis", ...).
// Poles are drawn filled and lines open, so the two never look alike.
Shape pole_shape(std::string_view plane_kind);
Shape line_shape(std::string_view line_kind);

// A unit's colour: its own "#RRGGBB" when that parses, else the Okabe-Ito palette
// in order from its second colour (orange), the first (black) being kept for ink.
Rgba unit_colour(const std::string& own_hex, std::size_t index);

// Common inks.
inline constexpr Rgba kInk{0, 0, 0, 255};
inline constexpr Rgba kGridInk{190, 190, 190, 255};
inline constexpr Rgba kWhite{255, 255, 255, 255};

}  // namespace cairn::plot
