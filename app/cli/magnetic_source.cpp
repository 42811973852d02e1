#include "app/cli/magnetic_source.h"

#include <stdexcept>
#include <fmt/format.h>

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

std::function<std::optional<double>(double, double, double)> wmm_declination(std::ostream* warn, int* outside) {
  try {
    const cairn::geo::MagneticModel* model = &wmm();
    return [model, outside](double lat, double lon, double year) -> std::optional<double> {
      if (outside && !model->in_validity(year)) ++*outside;
      return model->evaluate(lat, lon, 0.0, year).declination;
    };
  } catch (const std::exception& e) {
    if (warn) *warn << "warning: no magnetic model (" << e.what() << "); declination-suspect is not checked\n";
    return {};
  }
}

std::string outside_validity_warning(int outside) {
  if (outside <= 0) return "";
  const cairn::geo::MagneticModel* model = nullptr;
  try {
    model = &wmm();
  } catch (const std::exception&) {
    return "";
  }
  const std::string range = fmt::format("{:g} to {:g}", model->valid_from(), model->valid_to());
  return std::to_string(outside) + (outside == 1 ? " reading is" : " readings are") + " dated outside " +
         model->name() + "'s validity (" + range + "); " + (outside == 1 ? "its" : "their") +
         " declination is extrapolated and less certain";
}

}  // namespace cairn::cli
