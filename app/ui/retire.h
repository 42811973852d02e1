// Letting go of large values off the UI thread. A season's records (100 000
// stations) or a plan's recorded drawing (hundreds of thousands of operations)
// take milliseconds to free, a frame's whole budget; handed to retire(), the
// last reference is dropped on a thread of its own instead.
//
//   retire(std::exchange(ps.rendered, newer));  // the older picture is freed on the retiring thread
//
// Only for values whose destructors touch nothing but their own memory (no
// OpenGL, no Dear ImGui, no database): they run on another thread.
#pragma once
#include <memory>

namespace cairn::ui {

// Drops this reference on the retiring thread (started on first use, joined at
// exit after it has freed everything handed to it). Thread-safe; an empty
// pointer is ignored.
void retire(std::shared_ptr<const void> p);

// How many values have been freed there so far (for tests).
unsigned long retired_count();

// Waits until everything handed to retire() so far has been dropped (for tests).
void wait_retired();

}  // namespace cairn::ui
