// The demo's day tracks: each mapper's walk from station to station on each
// field day, as the UI would have logged it (a fix every 5 s from an invented
// receiver, thinned by geomath/track.h), written into that mapper's tablet file.
#pragma once
#include "app/cli/demo_area.h"

namespace cairn::store {
class Project;
}

namespace cairn::cli::demo {

// Adds the day tracks of TABLET's people (the stations' observers, days and
// times) to P, the tablet's file. Deterministic. Returns the fixes kept.
size_t add_demo_tracks(store::Project& p, const Tablet& tablet);

}  // namespace cairn::cli::demo
