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

}  // namespace cairn::cli
