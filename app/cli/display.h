// Whether a window can be opened here: on Linux (and the BSDs) an X11 or
// Wayland display must be named by DISPLAY or WAYLAND_DISPLAY; elsewhere the
// system always has one. Without it SDL would fall back to an invisible
// offscreen driver, so `cairn` prints its help and `cairn gui` refuses instead.
#pragma once
#include <cstdlib>

namespace cairn::cli {

inline bool have_display() {
#if defined(__linux__) || defined(__FreeBSD__) || defined(__OpenBSD__) || defined(__NetBSD__)
  const char* x = std::getenv("DISPLAY");
  const char* w = std::getenv("WAYLAND_DISPLAY");
  return (x && *x) || (w && *w);
#else
  return true;
#endif
}

}  // namespace cairn::cli
