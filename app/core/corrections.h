// Applying the correction a cross-check flag suggests to its reading, as one
// audited update (so it can be undone and shows in the audit trail):
//  - reversed-dip: the reading is re-entered dipping the other way (the typed
//    strike turned by 180 degrees, right-hand rule);
//  - declination-suspect: a reading recorded against true north that fits once
//    the local declination is added is re-labelled magnetic (storage then
//    applies the declination); a magnetic reading that fits once the declination
//    is taken off is re-labelled true north (the declination was set on the
//    compass and applied twice). Which of the two is decided by the reading's
//    north reference and the declination storage applies (east or west), never
//    by the sign of the turn alone;
//  - a group flag (declination-suspect or compass-offset for one observer's
//    day): every reading of the group in one transaction, all or nothing; a
//    compass-offset turns each measured strike by the group's rotation.
// Other rules suggest re-measuring or checking the notebook, not an edit.
#pragma once
#include <string>

#include "geomath/crosscheck.h"
#include "geomath/result.h"
#include "storage/project.h"

namespace cairn::core {

using store::Project;

// True when the flag carries a correction this module can apply.
bool has_correction(const geo::Flag& f);

// Applies it; returns a one-line description of the change ("RO-07a: 218/37 -> 038/37").
// Fails, writing nothing, when the reading is gone, has changed since the check
// (its stored attitude no longer matches the flag's), or the file is read-only.
Result<std::string> apply_correction(Project& p, const geo::Flag& f);

}  // namespace cairn::core
