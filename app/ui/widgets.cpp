#include "app/ui/widgets.h"
#include "geomath/decimal.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>
#include <thread>

#include <imgui_internal.h>

namespace cairn::ui {

namespace {

FrameRecord g_frames[2];
int g_current = 0;
std::thread::id g_ui_thread;  // set by mark_ui_thread
Look g_look;

void record_target(const std::string& label, bool enabled) {
  // Only what can be seen (not scrolled or clipped away) can be tapped.
  if (!ImGui::IsItemVisible()) return;
  this_frame().targets.push_back({label, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), enabled});
}

ImVec4 to_vec4(ImU32 c) { return ImGui::ColorConvertU32ToFloat4(c); }

// A label's text width in the current font (several lines: the widest).
float text_width(const std::string& label) {
  return ImGui::CalcTextSize(visible_label(label).c_str(), nullptr, true).x;
}

// The room a framed widget of the last item's width leaves for its label.
float label_room() { return ImGui::GetItemRectSize().x - 2 * ImGui::GetStyle().FramePadding.x; }

std::string px(float v) { return geo::format_decimal("%.1f", static_cast<double>(v)); }

}  // namespace

void record_box(const std::string& what, float text_w, float room_w) {
  if (!ImGui::IsItemVisible()) return;
  const ImGuiWindow* w = ImGui::GetCurrentWindow();
  const bool scrolls = !(w->Flags & ImGuiWindowFlags_NoScrollbar);
  this_frame().boxes.push_back({what, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), w->InnerClipRect.Min,
                                w->InnerClipRect.Max, scrolls, text_w, room_w});
}

std::vector<std::string> layout_problems(const FrameRecord& f, ImVec2 display) {
  // Half a pixel of slack for rounding (ImGui places items at whole pixels).
  const float eps = 0.5f;
  std::vector<std::string> out;
  for (const Box& b : f.boxes) {
    const std::string name = "'" + visible_label(b.what) + "' at (" + px(b.min.x) + "," + px(b.min.y) + ")-(" +
                             px(b.max.x) + "," + px(b.max.y) + ")";
    // What shows of the box: its part inside the region that clips it.
    const ImVec2 lo(std::max(b.min.x, b.clip_min.x), std::max(b.min.y, b.clip_min.y));
    const ImVec2 hi(std::min(b.max.x, b.clip_max.x), std::min(b.max.y, b.clip_max.y));
    if (lo.x < -eps || lo.y < -eps || hi.x > display.x + eps || hi.y > display.y + eps)
      out.push_back(name + " lies outside the " + px(display.x) + "x" + px(display.y) + " window");
    else if (b.min.x < b.clip_min.x - eps || b.max.x > b.clip_max.x + eps)
      out.push_back(name + " is cut by the side of its region (x " + px(b.clip_min.x) + " to " + px(b.clip_max.x) +
                    ")");
    else if (!b.scrolls && (b.min.y < b.clip_min.y - eps || b.max.y > b.clip_max.y + eps))
      out.push_back(name + " is cut by the top or bottom of a region that does not scroll (y " + px(b.clip_min.y) +
                    " to " + px(b.clip_max.y) + ")");
    if (b.room_w > 0 && b.text_w > b.room_w + eps)
      out.push_back(name + ": label " + px(b.text_w) + " px wide in a widget with room for " + px(b.room_w) + " px");
  }
  return out;
}

void mark_ui_thread() { g_ui_thread = std::this_thread::get_id(); }

FrameRecord& this_frame() {
  if (g_ui_thread != std::thread::id() && std::this_thread::get_id() != g_ui_thread)
    throw std::logic_error("the frame's record was written from a thread that is not the UI's");
  return g_frames[g_current];
}
const FrameRecord& last_frame() { return g_frames[1 - g_current]; }
void finish_frame_record() {
  g_current = 1 - g_current;
  g_frames[g_current].targets.clear();
  g_frames[g_current].texts.clear();
  g_frames[g_current].boxes.clear();
}

std::string visible_label(const std::string& label) {
  const auto p = label.find("##");
  return p == std::string::npos ? label : label.substr(0, p);
}

Look& look() { return g_look; }

void also_label(const std::string& label) { record_target(label, true); }

float label_width(const std::string& label) {
  const std::string v = visible_label(label);
  const float w = ImGui::CalcTextSize(v.c_str(), nullptr, true).x + ImGui::GetStyle().FramePadding.x * 2;
  return std::max(w, g_look.m.tap);
}

void same_line_if_fits(float next_width) {
  const float right = ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x;
  const float x = ImGui::GetItemRectMax().x + ImGui::GetStyle().ItemSpacing.x;
  if (x + next_width <= right) ImGui::SameLine();
}

void wrap_if_past_edge(float next_width) {
  const ImGuiWindow* win = ImGui::GetCurrentWindow();
  const float line_start = win->Pos.x + win->DC.Indent.x + win->DC.ColumnsOffset.x;
  const float right = ImGui::GetWindowPos().x + ImGui::GetWindowContentRegionMax().x;
  if (win->DC.CursorPos.x > line_start + 1 && win->DC.CursorPos.x + next_width > right + 0.5f) ImGui::NewLine();
}

std::string fit_to_width(const std::string& s, float width) {
  if (ImGui::CalcTextSize(s.c_str()).x <= width) return s;
  const std::string ell = "\xE2\x80\xA6";  // U+2026 horizontal ellipsis
  std::string shown = s;
  while (!shown.empty() && ImGui::CalcTextSize((shown + ell).c_str()).x > width) {
    shown.pop_back();
    // Never cut a UTF-8 character in two.
    while (!shown.empty() && (static_cast<unsigned char>(shown.back()) & 0xC0) == 0x80) shown.pop_back();
    if (!shown.empty() && (static_cast<unsigned char>(shown.back()) & 0xC0) == 0xC0) shown.pop_back();
  }
  return shown + ell;
}

bool button(const std::string& label, float width, bool enabled, bool primary) {
  const float h = g_look.m.tap;
  // A button of its own width that would run past the right edge starts a new line.
  if (width >= 0) wrap_if_past_edge(width == 0 ? label_width(label) : width);
  float w = width == 0 ? label_width(label) : width < 0 ? ImGui::GetContentRegionAvail().x : width;
  if (primary) {
    ImGui::PushStyleColor(ImGuiCol_Button, to_vec4(g_look.pal.accent));
    ImGui::PushStyleColor(ImGuiCol_ButtonHovered, to_vec4(g_look.pal.accent));
    ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(g_look.pal.accent_text));
  }
  if (!enabled) ImGui::BeginDisabled();
  const bool hit = ImGui::Button(label.c_str(), ImVec2(w, h));
  if (!enabled) ImGui::EndDisabled();
  if (primary) ImGui::PopStyleColor(3);
  record_target(label, enabled);
  record_box(label, text_width(label), label_room());
  return hit && enabled;
}

bool chip(const std::string& label, bool selected, bool enabled, float width, bool mark) {
  if (selected) {
    ImGui::PushStyleColor(ImGuiCol_Button, to_vec4(g_look.pal.accent));
    ImGui::PushStyleColor(ImGuiCol_ButtonHovered, to_vec4(g_look.pal.accent));
    ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(g_look.pal.accent_text));
  }
  const bool hit = button((selected && mark ? "\xE2\x9C\x93 " : "") + label, width, enabled);  // U+2713 check mark
  // Record the chip also under its plain label (the check mark is decoration).
  if (selected && mark) record_target(label, enabled);
  if (selected) ImGui::PopStyleColor(3);
  return hit;
}

bool row_chip(const std::string& label, bool selected) {
  const float room = ImGui::GetContentRegionAvail().x - ImGui::GetStyle().FramePadding.x * 2 -
                     (selected ? ImGui::CalcTextSize("\xE2\x9C\x93 ").x : 0.0f);
  const std::string shown = fit_to_width(visible_label(label), room);
  const bool hit = chip(shown + "##" + label, selected, true, -1);
  if (shown != visible_label(label)) record_target(label, true);
  return hit;
}

int chip_row(const std::vector<std::string>& labels, int selected, bool enabled) {
  int hit = -1;
  for (size_t i = 0; i < labels.size(); ++i) {
    const std::string shown = (static_cast<int>(i) == selected ? "\xE2\x9C\x93 " : "") + labels[i];
    if (i > 0) same_line_if_fits(label_width(shown));
    ImGui::PushID(static_cast<int>(i));
    if (chip(labels[i], static_cast<int>(i) == selected, enabled)) hit = static_cast<int>(i);
    ImGui::PopID();
  }
  return hit;
}

void text(const std::string& s) {
  ImGui::TextUnformatted(s.c_str());
  record_box(s);
  this_frame().texts.push_back(s);
}

void text_dim(const std::string& s) { text_colour(g_look.pal.text_dim, s); }

void text_colour(ImU32 colour, const std::string& s) {
  ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(colour));
  ImGui::PushTextWrapPos(0.0f);
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  ImGui::PopStyleColor();
  record_box(s);
  this_frame().texts.push_back(s);
}

void text_wrapped(const std::string& s) {
  ImGui::PushTextWrapPos(0.0f);
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  record_box(s);
  this_frame().texts.push_back(s);
}

void heading(const std::string& s) {
  ImGui::PushFont(g_look.fonts.bold);
  text_wrapped(s);
  ImGui::PopFont();
}

void error_box(const std::string& s) {
  const float pad = g_look.m.gap;
  const float w = ImGui::GetContentRegionAvail().x;
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 p = ImGui::GetCursorScreenPos();
  const ImVec2 sz = ImGui::CalcTextSize(s.c_str(), nullptr, false, w - 2 * pad);
  dl->AddRectFilled(p, ImVec2(p.x + w, p.y + sz.y + 2 * pad), g_look.pal.error_bg, 4);
  dl->AddRect(p, ImVec2(p.x + w, p.y + sz.y + 2 * pad), g_look.pal.error, 4, 0, 2);
  ImGui::SetCursorScreenPos(ImVec2(p.x + pad, p.y + pad));
  ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(g_look.pal.error));
  ImGui::PushTextWrapPos(ImGui::GetCursorPosX() + w - 2 * pad);
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  ImGui::PopStyleColor();
  ImGui::SetCursorScreenPos(ImVec2(p.x, p.y + sz.y + 2 * pad));
  ImGui::Dummy(ImVec2(w, pad * 0.5f));
  this_frame().texts.push_back(s);
}

float caution_box(const std::string& title, const std::string& s) {
  const float pad = g_look.m.gap * 1.5f;
  const float w = ImGui::GetContentRegionAvail().x;
  const float sign = g_look.m.tap;  // the warning triangle
  ImDrawList* dl = ImGui::GetWindowDrawList();
  const ImVec2 p = ImGui::GetCursorScreenPos();
  ImGui::PushFont(g_look.fonts.bold);
  const float text_w = w - 3 * pad - sign;
  const ImVec2 tsz = ImGui::CalcTextSize(title.c_str(), nullptr, false, text_w);
  const ImVec2 bsz = ImGui::CalcTextSize(s.c_str(), nullptr, false, text_w);
  const float h = std::max(sign, tsz.y + bsz.y + g_look.m.gap) + 2 * pad;
  dl->AddRectFilled(p, ImVec2(p.x + w, p.y + h), g_look.pal.caution_bg, 6);
  dl->AddRect(p, ImVec2(p.x + w, p.y + h), g_look.pal.caution_border, 6, 0, 4);
  // The warning sign: a triangle with an exclamation mark (the ISO 7010 W001 shape).
  const ImVec2 a(p.x + pad + sign / 2, p.y + pad), b(p.x + pad + sign, p.y + pad + sign * 0.9f),
      c(p.x + pad, p.y + pad + sign * 0.9f);
  dl->AddTriangleFilled(a, b, c, g_look.pal.caution_text);
  dl->AddTriangleFilled(ImVec2(a.x, a.y + sign * 0.2f), ImVec2(b.x - sign * 0.14f, b.y - sign * 0.08f),
                        ImVec2(c.x + sign * 0.14f, c.y - sign * 0.08f), g_look.pal.caution_bg);
  dl->AddRectFilled(ImVec2(a.x - sign * 0.045f, a.y + sign * 0.33f), ImVec2(a.x + sign * 0.045f, a.y + sign * 0.62f),
                    g_look.pal.caution_text);
  dl->AddCircleFilled(ImVec2(a.x, a.y + sign * 0.72f), sign * 0.05f, g_look.pal.caution_text);
  ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(g_look.pal.caution_text));
  const float tx = p.x + 2 * pad + sign;
  ImGui::SetCursorScreenPos(ImVec2(tx, p.y + pad));
  ImGui::PushTextWrapPos(ImGui::GetCursorPosX() + text_w);
  ImGui::TextUnformatted(title.c_str());
  ImGui::PopFont();
  // Each call starts its own block at tx (a new line would start at the window's indent).
  ImGui::SetCursorScreenPos(ImVec2(tx, p.y + pad + tsz.y + g_look.m.gap));
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  ImGui::PopStyleColor();
  ImGui::SetCursorScreenPos(ImVec2(p.x, p.y + h));
  ImGui::Dummy(ImVec2(w, g_look.m.gap * 0.5f));
  this_frame().texts.push_back(title);
  this_frame().texts.push_back(s);
  return h;
}

bool field(const std::string& label, const std::string& value, bool selected, float width) {
  const float h = g_look.m.tap;
  const ImVec2 p = ImGui::GetCursorScreenPos();
  ImGui::PushID(label.c_str());
  const bool hit = ImGui::InvisibleButton("field", ImVec2(width, h));
  ImGui::PopID();
  this_frame().targets.push_back({label, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
  ImDrawList* dl = ImGui::GetWindowDrawList();
  dl->AddRectFilled(p, ImVec2(p.x + width, p.y + h), selected ? g_look.pal.panel : g_look.pal.background, 4);
  dl->AddRect(p, ImVec2(p.x + width, p.y + h), selected ? g_look.pal.accent : g_look.pal.border, 4, 0,
              selected ? 4.0f : 2.0f);
  const std::string shown = visible_label(label) + ": " + value + (selected ? "\xE2\x96\x8F" : "");  // caret-like bar
  dl->AddText(ImVec2(p.x + g_look.m.gap, p.y + (h - g_look.m.font) / 2), g_look.pal.text, shown.c_str());
  record_box(label, ImGui::CalcTextSize(shown.c_str()).x, width - 2 * g_look.m.gap);
  this_frame().texts.push_back(shown);
  return hit;
}

float fill_height(float min_taps) { return std::max(ImGui::GetContentRegionAvail().y, g_look.m.tap * min_taps); }

void touch_scroll() {
  ImGuiContext& g = *ImGui::GetCurrentContext();
  ImGuiWindow* w = ImGui::GetCurrentWindow();
  const ImGuiIO& io = ImGui::GetIO();
  if (!io.MouseDown[0]) return;
  if (!w->InnerRect.Contains(io.MouseClickedPos[0])) return;
  if (!ImGui::IsWindowHovered(ImGuiHoveredFlags_AllowWhenBlockedByActiveItem | ImGuiHoveredFlags_ChildWindows)) return;
  const float threshold = g_look.m.tap * 0.25f;
  if (!ImGui::IsMouseDragging(0, threshold)) return;
  if (io.MouseDelta.y != 0) ImGui::SetScrollY(w, w->Scroll.y - io.MouseDelta.y);
  // The finger is scrolling, not tapping: cancel the press on whatever it started on.
  if (g.ActiveId != 0 && g.ActiveIdWindow && g.ActiveIdWindow->RootWindow == w->RootWindow) ImGui::ClearActiveID();
}

std::string keypad(const std::vector<std::string>& keys, int columns, float key_w, float key_h) {
  std::string hit;
  ImGui::PushFont(g_look.fonts.big);
  // The big key labels are taller than a framed widget's text: no vertical padding.
  ImGui::PushStyleVar(ImGuiStyleVar_FramePadding, ImVec2(ImGui::GetStyle().FramePadding.x, 0));
  for (size_t i = 0; i < keys.size(); ++i) {
    if (i % static_cast<size_t>(columns) != 0) ImGui::SameLine();
    ImGui::PushID(static_cast<int>(i));
    if (keys[i].empty()) {
      ImGui::Dummy(ImVec2(key_w, key_h));
    } else {
      // A word key ("Clear", "space") too wide for the big font takes the bold body font.
      const float room = key_w - 2 * ImGui::GetStyle().FramePadding.x;
      const bool smaller = text_width(keys[i]) > room;
      if (smaller) {
        ImGui::PushFont(g_look.fonts.bold);
        if (text_width(keys[i]) > room) {
          ImGui::PopFont();
          ImGui::PushFont(g_look.fonts.small);
        }
      }
      const bool pressed = ImGui::Button(keys[i].c_str(), ImVec2(key_w, key_h));
      this_frame().targets.push_back({"key " + keys[i], ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
      record_box("key " + keys[i], text_width(keys[i]), label_room());
      if (smaller) ImGui::PopFont();
      if (pressed) hit = keys[i];
    }
    ImGui::PopID();
  }
  ImGui::PopStyleVar();
  ImGui::PopFont();
  return hit;
}

void progress(float fraction, const std::string& label) {
  const float h = g_look.m.tap * 0.6f;
  if (fraction < 0) {
    // Busy without a measure: a block sliding along the bar.
    const float t = static_cast<float>(std::fmod(ImGui::GetTime() * 0.6, 1.0));
    const ImVec2 p = ImGui::GetCursorScreenPos();
    const float w = ImGui::GetContentRegionAvail().x;
    ImDrawList* dl = ImGui::GetWindowDrawList();
    dl->AddRectFilled(p, ImVec2(p.x + w, p.y + h), g_look.pal.panel, 3);
    const float x0 = p.x + (w * 0.75f) * t;
    dl->AddRectFilled(ImVec2(x0, p.y), ImVec2(x0 + w * 0.25f, p.y + h), g_look.pal.accent, 3);
    dl->AddRect(p, ImVec2(p.x + w, p.y + h), g_look.pal.border, 3, 0, 2);
    ImGui::Dummy(ImVec2(w, h));
  } else {
    ImGui::ProgressBar(std::clamp(fraction, 0.0f, 1.0f), ImVec2(-1, h), "");
  }
  text(label);
}

}  // namespace cairn::ui
