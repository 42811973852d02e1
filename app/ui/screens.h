// The screens of the touch UI (names from the project's naming sheet), each a
// function drawn every frame inside the screen area of the App's window.
#pragma once
#include <string>

#include "app/ui/app.h"
#include "geomath/crosscheck.h"

namespace cairn::ui {

void draw_open(App& a);                              // choose or create a project file
void draw_opening(App& a, const std::string& path);  // while a project file is opened and read
// Whether the project's readings are read (Records::complete); if not, says so
// with the reading's progress in place of a screen that needs them.
bool readings_ready(App& a);
void draw_logbook(App& a);      // Logbook: stations by day
void draw_station(App& a);      // Station sheet
void draw_pad(App& a);          // Reading pad
void draw_net_screen(App& a);   // Net
void draw_plan_screen(App& a);  // Plan
void draw_crosscheck(App& a);   // Crosscheck
void draw_camp(App& a);         // Camp
void draw_review(App& a);       // Review

// Shared by several screens.

// Sets the station's position, accuracies and source from a GPS fix.
void take_fix_position(store::Station& s, const GpsFix& fix);
// Creates a station at once from the GPS fix, or opens the Station sheet's
// form for typed coordinates when there is no fix.
void new_station(App& a);
// The review key of a flag (storage/reviews.h).
std::string review_key(const geo::Flag& f);
// Severity as word and shape: "▲ HAZARD", "◆ CONFLICT", "■ QUERY", "● NOTE".
std::string severity_label(geo::Severity s);
// "030/40 bedding" and the like for a planar reading.
std::string reading_summary(const store::PlanarReading& r);
std::string reading_summary(const store::LinearReading& r);

}  // namespace cairn::ui
