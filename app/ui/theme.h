// Sizes and colours of the touch UI: tap targets sized in millimetres on the
// actual display, the shipped DejaVu Sans font, and two themes: a high-contrast
// outdoor theme (black on white, for sun) and a dim night theme (low red-amber
// light on black, to keep night vision).
#pragma once
#include <string>

#include <imgui.h>

#include "app/plot/canvas.h"

namespace cairn::ui {

// Physical sizes on this display.
struct Metrics {
  double dpi = 96;  // dots per inch of the display (SDL_GetDisplayDPI, else 96)
  float tap = 46;   // pixels of the smallest tap target: 12 mm
  float font = 23;  // pixels of body text
  float gap = 8;    // pixels between targets
  float px_per_mm() const { return static_cast<float>(dpi / 25.4); }
};

// The smallest tap target (12 mm) for a display of `dpi` dots per inch, and
// the text sizes that go with it.
Metrics metrics_for_dpi(double dpi);

enum class ThemeKind { Outdoor, Night };

// Colours the screens draw with themselves (beyond ImGui's style).
struct Palette {
  ImU32 text, text_dim, background, panel, border;
  ImU32 accent, accent_text;                       // selected chips, primary buttons
  ImU32 error, error_bg;                           // invalid input
  ImU32 ok;                                        // an agreeing reading
  ImU32 caution_bg, caution_text, caution_border;  // hazard cautions
};

struct Fonts {
  ImFont* body = nullptr;
  ImFont* bold = nullptr;
  ImFont* big = nullptr;    // keypad and the attitude being typed
  ImFont* small = nullptr;  // labels on nets and plans
};

// Loads DejaVu Sans (regular and bold) from the assets at the sizes of `m`,
// with Latin-1, Greek, arrows and the symbols the screens use. Throws
// std::runtime_error naming the file when the font is missing.
Fonts load_fonts(const Metrics& m);

// Applies a theme to ImGui's style (sizes from `m`) and returns its palette.
Palette apply_theme(ThemeKind kind, const Metrics& m);

// Colour transform for scene drawings (nets, plans), which are drawn in
// print colours: identity outdoors; at night lightness is inverted and dimmed
// with the hue kept, so units keep their colours.
plot::Rgba theme_colour(ThemeKind kind, plot::Rgba c);

ImU32 to_u32(plot::Rgba c);

}  // namespace cairn::ui
