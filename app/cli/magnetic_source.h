// The World Magnetic Model Cairn ships (assets/wmm2025.cof), loaded once.
#pragma once
#include <string>

#include "geomath/magnetic.h"

namespace cairn::cli {

// File name of the shipped coefficients, found through asset_path().
inline const std::string kWmmAsset = "wmm2025.cof";

// The shipped model, read and parsed on first use. Throws std::runtime_error
// naming the file (and the bad line) when it is missing or malformed.
const cairn::geo::MagneticModel& wmm();

}  // namespace cairn::cli
