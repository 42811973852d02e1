#include "app/ui/theme.h"

#include <algorithm>
#include <cmath>
#include <stdexcept>

#include "app/cli/assets.h"

namespace cairn::ui {

namespace {

struct Rgb8 {
  int r, g, b;
};

ImVec4 rgb(int r, int g, int b, float a = 1.0f) { return ImVec4(r / 255.0f, g / 255.0f, b / 255.0f, a); }
ImU32 u32(int r, int g, int b, int a = 255) { return IM_COL32(r, g, b, a); }

}  // namespace

Metrics metrics_for_dpi(double dpi) {
  Metrics m;
  m.dpi = (dpi >= 50 && dpi <= 1000) ? dpi : 96;
  // Tap targets of at least 12 mm: gloved fingers on a wet screen need more than
  // the 7-10 mm usual for bare fingers (common practice, no published source).
  m.tap = std::ceil(12.0f * m.px_per_mm());
  // Body text about 4.3 mm high (about 12 pt at arm's length in sun); never below 18 px.
  m.font = std::max(18.0f, std::round(m.tap * 0.5f));
  m.gap = std::max(6.0f, std::round(m.tap * 0.15f));
  return m;
}

Fonts load_fonts(const Metrics& m) {
  ImGuiIO& io = ImGui::GetIO();
  io.Fonts->Clear();
  const std::string regular = cli::asset_path("fonts/DejaVuSans.ttf");
  const std::string bold = cli::asset_path("fonts/DejaVuSans-Bold.ttf");
  if (regular.empty() || bold.empty())
    throw std::runtime_error("the font fonts/DejaVuSans.ttf (and -Bold) is missing from the assets");
  // Latin-1, Greek (alpha, kappa, sigma, pi, beta), punctuation (dashes, ellipsis),
  // arrows, math (plus-minus lives in Latin-1; minus, infinity), technical symbols
  // (the erase key), block elements (the caret), shapes and the warning sign.
  static const ImWchar ranges[] = {0x0020, 0x00FF, 0x0370, 0x03FF, 0x2010, 0x2027, 0x2190, 0x21FF, 0x2212,
                                   0x2212, 0x221E, 0x221E, 0x2264, 0x2265, 0x2300, 0x23FF, 0x2580, 0x259F,
                                   0x25A0, 0x25FF, 0x26A0, 0x26A0, 0x2713, 0x2717, 0};
  ImFontConfig cfg;
  cfg.OversampleH = 2;
  cfg.OversampleV = 1;
  Fonts f;
  f.body = io.Fonts->AddFontFromFileTTF(regular.c_str(), m.font, &cfg, ranges);
  f.bold = io.Fonts->AddFontFromFileTTF(bold.c_str(), m.font, &cfg, ranges);
  f.big = io.Fonts->AddFontFromFileTTF(bold.c_str(), std::round(m.font * 1.45f), &cfg, ranges);
  f.small = io.Fonts->AddFontFromFileTTF(regular.c_str(), std::max(14.0f, std::round(m.font * 0.78f)), &cfg, ranges);
  if (!f.body || !f.bold || !f.big || !f.small) throw std::runtime_error("could not load the font " + regular);
  io.FontDefault = f.body;
  return f;
}

Palette apply_theme(ThemeKind kind, const Metrics& m) {
  ImGuiStyle& s = ImGui::GetStyle();
  s = ImGuiStyle();
  s.WindowPadding = ImVec2(m.gap, m.gap);
  s.FramePadding = ImVec2(m.gap * 1.2f, (m.tap - m.font) / 2);  // a framed widget is one tap high
  s.ItemSpacing = ImVec2(m.gap, m.gap);
  s.ItemInnerSpacing = ImVec2(m.gap, m.gap * 0.6f);
  s.TouchExtraPadding = ImVec2(2, 2);
  s.IndentSpacing = m.tap * 0.6f;
  s.ScrollbarSize = std::round(m.tap * 0.55f);
  s.GrabMinSize = m.tap * 0.5f;
  s.WindowRounding = 0;
  s.ChildRounding = 0;
  s.FrameRounding = 4;
  s.PopupRounding = 4;
  s.ScrollbarRounding = 4;
  s.GrabRounding = 4;
  s.FrameBorderSize = 2;
  s.WindowBorderSize = 0;
  s.ChildBorderSize = 1;
  s.PopupBorderSize = 2;

  // Each theme is a handful of inks; ImGui's colours and the palette come from them.
  struct Scheme {
    Rgb8 ink, dim, paper, panel, face, pressed, edge, scroll_bg, grab, field_active, accent, accent_text;
    Rgb8 error, error_bg, ok, caution_bg, caution_text, caution_border;
    float modal_dim;
  };
  // Outdoor: black on white with heavy borders, the most readable in direct sun.
  // The accent is Okabe-Ito blue (5.1:1 against white text); a caution is
  // Okabe-Ito yellow with black text, a warning sign's colours.
  static const Scheme outdoor{
      {0, 0, 0},   {80, 80, 80},    {255, 255, 255}, {244, 244, 244}, {232, 232, 232}, {170, 170, 170},
      {0, 0, 0},   {240, 240, 240}, {90, 90, 90},    {245, 245, 220}, {0, 114, 178},   {255, 255, 255},
      {160, 0, 0}, {255, 228, 225}, {0, 105, 75},    {240, 228, 66},  {0, 0, 0},       {0, 0, 0},
      0.45f};
  // Night: dim red-amber on black, little blue light.
  static const Scheme night{{205, 135, 100}, {140, 95, 72},   {8, 6, 5},      {20, 14, 11},  {40, 26, 20},
                            {90, 45, 30},    {130, 75, 55},   {15, 10, 8},    {130, 75, 55}, {35, 22, 16},
                            {120, 45, 25},   {240, 190, 160}, {255, 110, 80}, {60, 14, 8},   {150, 170, 90},
                            {70, 55, 8},     {240, 210, 120}, {220, 170, 60}, 0.6f};
  const Scheme& k = kind == ThemeKind::Outdoor ? outdoor : night;
  auto v4 = [](Rgb8 c, float a = 1.0f) { return rgb(c.r, c.g, c.b, a); };
  ImVec4* c = s.Colors;
  c[ImGuiCol_Text] = v4(k.ink);
  c[ImGuiCol_TextDisabled] = v4(k.dim);
  c[ImGuiCol_WindowBg] = c[ImGuiCol_ChildBg] = c[ImGuiCol_PopupBg] = v4(k.paper);
  c[ImGuiCol_Border] = v4(k.edge);
  c[ImGuiCol_BorderShadow] = rgb(0, 0, 0, 0);
  // Nothing changes on hover alone: hovered colours equal the plain ones.
  c[ImGuiCol_FrameBg] = c[ImGuiCol_FrameBgHovered] = v4(k.paper);
  c[ImGuiCol_FrameBgActive] = v4(k.field_active);
  c[ImGuiCol_Button] = c[ImGuiCol_ButtonHovered] = c[ImGuiCol_Header] = c[ImGuiCol_HeaderHovered] = v4(k.face);
  c[ImGuiCol_ButtonActive] = c[ImGuiCol_HeaderActive] = v4(k.pressed);
  c[ImGuiCol_ScrollbarBg] = v4(k.scroll_bg);
  c[ImGuiCol_ScrollbarGrab] = c[ImGuiCol_ScrollbarGrabHovered] = v4(k.grab);
  c[ImGuiCol_ScrollbarGrabActive] = c[ImGuiCol_CheckMark] = c[ImGuiCol_SliderGrab] = c[ImGuiCol_SliderGrabActive] =
      v4(k.ink);
  c[ImGuiCol_Separator] = c[ImGuiCol_TableBorderStrong] = v4(k.edge);
  c[ImGuiCol_TableBorderLight] = c[ImGuiCol_TableRowBgAlt] = v4(k.panel);
  c[ImGuiCol_PlotHistogram] = c[ImGuiCol_NavHighlight] = v4(k.accent);
  c[ImGuiCol_TextSelectedBg] = v4(k.accent, 0.5f);
  c[ImGuiCol_ModalWindowDimBg] = rgb(0, 0, 0, k.modal_dim);

  auto u = [](Rgb8 c) { return u32(c.r, c.g, c.b); };
  Palette p{};
  p.text = u(k.ink);
  p.text_dim = u(k.dim);
  p.background = u(k.paper);
  p.panel = u(k.panel);
  p.border = u(k.edge);
  p.accent = u(k.accent);
  p.accent_text = u(k.accent_text);
  p.error = u(k.error);
  p.error_bg = u(k.error_bg);
  p.ok = u(k.ok);
  p.caution_bg = u(k.caution_bg);
  p.caution_text = u(k.caution_text);
  p.caution_border = u(k.caution_border);
  return p;
}

plot::Rgba theme_colour(ThemeKind kind, plot::Rgba c) {
  if (kind == ThemeKind::Outdoor) return c;
  // HSL lightness inversion keeping hue and saturation, then dimmed and warmed.
  const double r = c.r / 255.0, g = c.g / 255.0, b = c.b / 255.0;
  const double mx = std::max({r, g, b}), mn = std::min({r, g, b});
  double h = 0, s = 0;
  const double l = (mx + mn) / 2;
  if (mx > mn) {
    const double d = mx - mn;
    s = l > 0.5 ? d / (2 - mx - mn) : d / (mx + mn);
    if (mx == r)
      h = (g - b) / d + (g < b ? 6 : 0);
    else if (mx == g)
      h = (b - r) / d + 2;
    else
      h = (r - g) / d + 4;
    h /= 6;
  }
  const double l2 = (1 - l) * 0.75 + 0.02;
  auto hue = [](double p, double q, double t) {
    if (t < 0) t += 1;
    if (t > 1) t -= 1;
    if (t < 1.0 / 6) return p + (q - p) * 6 * t;
    if (t < 0.5) return q;
    if (t < 2.0 / 3) return p + (q - p) * (2.0 / 3 - t) * 6;
    return p;
  };
  double r2 = l2, g2 = l2, b2 = l2;
  if (s > 0) {
    const double q = l2 < 0.5 ? l2 * (1 + s) : l2 + s - l2 * s;
    const double p = 2 * l2 - q;
    r2 = hue(p, q, h + 1.0 / 3);
    g2 = hue(p, q, h);
    b2 = hue(p, q, h - 1.0 / 3);
  } else {
    // Greys become the night ink's red-amber.
    r2 = l2;
    g2 = l2 * 0.66;
    b2 = l2 * 0.49;
  }
  auto byte = [](double v) { return static_cast<std::uint8_t>(std::clamp(v, 0.0, 1.0) * 255 + 0.5); };
  return {byte(r2), byte(g2), byte(b2), c.a};
}

ImU32 to_u32(plot::Rgba c) { return IM_COL32(c.r, c.g, c.b, c.a); }

}  // namespace cairn::ui
