#include "app/cli/magnetic_source.h"

#include <stdexcept>

#include "app/cli/assets.h"

namespace cairn::cli {

namespace {

cairn::geo::MagneticModel load_wmm() {
  auto parsed = cairn::geo::MagneticModel::parse(read_asset(kWmmAsset));
  if (!parsed) throw std::runtime_error(asset_path(kWmmAsset) + ": " + parsed.error());
  return parsed.value();
}

}  // namespace

const cairn::geo::MagneticModel& wmm() {
  // A throwing initialiser leaves the static uninitialised, so a later call retries.
  static const cairn::geo::MagneticModel model = load_wmm();
  return model;
}

std::function<std::optional<double>(double, double, double)> wmm_declination_or_warn(std::ostream& err) {
  try {
    const cairn::geo::MagneticModel* model = &wmm();
    return [model](double lat, double lon, double year) -> std::optional<double> {
      return model->evaluate(lat, lon, 0.0, year).declination;
    };
  } catch (const std::exception& e) {
    err << "warning: no magnetic model (" << e.what() << "); declination-suspect is not checked\n";
    return {};
  }
}

}  // namespace cairn::cli
