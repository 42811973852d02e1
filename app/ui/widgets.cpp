#include "app/ui/widgets.h"

#include <algorithm>
#include <cmath>

#include <imgui_internal.h>

namespace cairn::ui {

namespace {

FrameRecord g_frames[2];
int g_current = 0;
Look g_look;

void record_target(const std::string& label, bool enabled) {
  // Only what can be seen (not scrolled or clipped away) can be tapped.
  if (!ImGui::IsItemVisible()) return;
  this_frame().targets.push_back({label, ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), enabled});
}

ImVec4 to_vec4(ImU32 c) { return ImGui::ColorConvertU32ToFloat4(c); }

}  // namespace

FrameRecord& this_frame() { return g_frames[g_current]; }
const FrameRecord& last_frame() { return g_frames[1 - g_current]; }
void finish_frame_record() {
  g_current = 1 - g_current;
  g_frames[g_current].targets.clear();
  g_frames[g_current].texts.clear();
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

bool button(const std::string& label, float width, bool enabled, bool primary) {
  const float h = g_look.m.tap;
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
  this_frame().texts.push_back(s);
}

void text_dim(const std::string& s) { text_colour(g_look.pal.text_dim, s); }

void text_colour(ImU32 colour, const std::string& s) {
  ImGui::PushStyleColor(ImGuiCol_Text, to_vec4(colour));
  ImGui::PushTextWrapPos(0.0f);
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  ImGui::PopStyleColor();
  this_frame().texts.push_back(s);
}

void text_wrapped(const std::string& s) {
  ImGui::PushTextWrapPos(0.0f);
  ImGui::TextUnformatted(s.c_str());
  ImGui::PopTextWrapPos();
  this_frame().texts.push_back(s);
}

void heading(const std::string& s) {
  ImGui::PushFont(g_look.fonts.bold);
  text(s);
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
  this_frame().texts.push_back(shown);
  return hit;
}

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
      const bool pressed = ImGui::Button(keys[i].c_str(), ImVec2(key_w, key_h));
      this_frame().targets.push_back({"key " + keys[i], ImGui::GetItemRectMin(), ImGui::GetItemRectMax(), true});
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
