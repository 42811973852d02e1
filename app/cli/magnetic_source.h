// The World Magnetic Model Cairn ships (assets/wmm2025.cof), loaded once.
#pragma once
#include <functional>
#include <optional>
#include <ostream>
#include <string>

#include "geomath/magnetic.h"

namespace cairn::cli {

// File name of the shipped coefficients, found through asset_path().
inline const std::string kWmmAsset = "wmm2025.cof";

// The shipped model, read and parsed on first use. Throws std::runtime_error
// naming the file (and the bad line) when it is missing or malformed.
const cairn::geo::MagneticModel& wmm();

// The shipped model's declination at a place and decimal year (height 0), for
// the cross-check's declination-suspect rule; empty, with a warning on ERR,
// when the model cannot be loaded (the rule is then not checked).
std::function<std::optional<double>(double lat, double lon, double decimal_year)> wmm_declination_or_warn(
    std::ostream& err);

}  // namespace cairn::cli
