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
// the cross-check's declination-suspect rule; empty, with a warning on WARN
// (when given), when the model cannot be loaded (the rule is then not checked).
// When OUTSIDE is given, each evaluation at a year outside the model's validity
// adds one to it (see outside_validity_warning).
std::function<std::optional<double>(double lat, double lon, double decimal_year)> wmm_declination(
    std::ostream* warn, int* outside = nullptr);

inline std::function<std::optional<double>(double lat, double lon, double decimal_year)> wmm_declination_or_warn(
    std::ostream& err) {
  return wmm_declination(&err);
}

// "N readings are dated outside WMM2025's validity (2025 to 2030); ..." for
// OUTSIDE readings counted as above; "" when none are (or there is no model).
std::string outside_validity_warning(int outside);

}  // namespace cairn::cli
