// Touch widgets: every target at least one tap (12 mm) high, nothing that only
// works on hover, and a record of what each frame drew (targets with their
// labels and the texts shown) so that an event script can find a button by
// its label and check what the screen says.
#pragma once
#include <functional>
#include <string>
#include <vector>

#include <imgui.h>

#include "app/ui/theme.h"

namespace cairn::ui {

// ---- what a frame drew ----------------------------------------------------------

struct Target {
  std::string label;  // as given to the widget (may carry an "##id" suffix)
  ImVec2 min, max;    // screen rectangle
  bool enabled = true;
};

// Where a widget or a line of text was drawn, for the layout check: its
// rectangle, the horizontal extent of the window region that clips it, and
// for a labelled widget the width of its label's text and the room the widget
// leaves for it (its width less the frame padding on both sides), all as Dear
// ImGui measured them (GetItemRectMin/Max, CalcTextSize).
struct Box {
  std::string what;
  ImVec2 min, max;
  ImVec2 clip_min, clip_max;     // the region of its window that shows it
  bool scrolls = true;           // the window scrolls (a finger drag), so an item may be partly below or above it
  float text_w = 0, room_w = 0;  // room_w 0: no label to fit
};

struct FrameRecord {
  std::vector<Target> targets;
  std::vector<std::string> texts;
  std::vector<Box> boxes;
};

// The record being written this frame, and the one of the last finished frame.
// Only the UI thread may write it (mark_ui_thread): a picture drawn on a worker
// (soft_raster.h) that wrote it raced the frame's own writes and could crash.
// Called from another thread, this_frame() throws std::logic_error.
void mark_ui_thread();
FrameRecord& this_frame();
const FrameRecord& last_frame();
void finish_frame_record();  // this frame becomes the last one

// Records the last item as a box (widgets.cpp records its own widgets; a screen
// records what it draws itself, e.g. a picture).
void record_box(const std::string& what, float text_w = 0, float room_w = 0);

// The layout check: what shows of every box (its part inside the region that
// clips it) lies inside the window (DISPLAY, pixels); no box is cut by the left
// or right edge of its region, nor by its top or bottom edge unless the region
// scrolls; no label is wider than the room its widget leaves for it. One line
// per problem, naming the widget and the sizes.
std::vector<std::string> layout_problems(const FrameRecord& f, ImVec2 display);

// The label a person sees: the text before "##".
std::string visible_label(const std::string& label);

// Records the last widget again under another label (e.g. a station row under its code).
void also_label(const std::string& label);

// ---- the look of this session -------------------------------------------------------

struct Look {
  Metrics m;
  Fonts fonts;
  Palette pal;
  ThemeKind theme = ThemeKind::Outdoor;
};
Look& look();

// ---- widgets ----------------------------------------------------------------------

// A button at least one tap high (width: `width`, 0 = fit the label, -1 = fill the line);
// after SameLine it starts a new line when it would run past the right edge.
bool button(const std::string& label, float width = 0, bool enabled = true, bool primary = false);
// A selectable chip (toggle look): filled with the accent colour when selected,
// and marked with a check mark unless `mark` is false (so not by colour alone).
bool chip(const std::string& label, bool selected, bool enabled = true, float width = 0, bool mark = true);
// A chip filling the line, for a row of a list: a label too long for the row is
// shortened with an ellipsis (the target keeps the whole label).
bool row_chip(const std::string& label, bool selected);
// A row of chips that wraps to the next line; returns the index tapped or -1.
int chip_row(const std::vector<std::string>& labels, int selected, bool enabled = true);
// Keeps the next widget on this line when it fits, else starts a new line.
void same_line_if_fits(float next_width);
float label_width(const std::string& label);  // width of a button with this label
// After SameLine: starts a new line when a widget NEXT_WIDTH wide would run past the right edge.
void wrap_if_past_edge(float next_width);
// S shortened with an ellipsis to at most WIDTH pixels in the current font.
std::string fit_to_width(const std::string& s, float width);

// Text that is recorded for the event script (text_dim and text_colour wrap at the window's edge).
void text(const std::string& s);
void text_dim(const std::string& s);
void text_colour(ImU32 colour, const std::string& s);
void text_wrapped(const std::string& s);
void heading(const std::string& s);  // bold, wrapped at the window's edge
// An error in a tinted box, the text wrapped.
void error_box(const std::string& s);
// A field-safety caution: yellow-and-black (or night amber) box with a warning
// sign, the text wrapped in bold. Returns the box height.
float caution_box(const std::string& title, const std::string& s);

// A framed value that acts as a field: tapping it selects it (for the keypad).
bool field(const std::string& label, const std::string& value, bool selected, float width);

// The height for a list or picture that fills the rest of the screen: what is
// left, but at least MIN_TAPS tap heights (the screen then scrolls).
float fill_height(float min_taps = 3);

// Inside a scrolling child window: a drag with the finger scrolls it and cancels
// the tap that started the drag. Call before EndChild().
void touch_scroll();

// A grid of keys; returns the key tapped ("" when none).
std::string keypad(const std::vector<std::string>& keys, int columns, float key_w, float key_h);

// A horizontal progress bar with a label (fraction < 0: busy without a measure).
void progress(float fraction, const std::string& label);

}  // namespace cairn::ui
