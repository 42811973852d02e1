#include "app/core/corrections.h"

#include <cmath>
#include <cstdio>
#include <fmt/format.h>

#include "geomath/angles.h"
#include "geomath/notation.h"
#include "storage/repository.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

namespace {
// Two attitudes this close (degrees between poles) are the same reading.
constexpr double kSame = 0.05;
}  // namespace

bool has_correction(const geo::Flag& f) {
  return !f.reading.empty() && f.corrected && (f.rule == "reversed-dip" || f.rule == "declination-suspect");
}

Result<std::string> apply_correction(Project& p, const geo::Flag& f) {
  using R = Result<std::string>;
  if (!has_correction(f)) return R::failure("flag " + f.rule + " suggests no correction to apply");
  if (p.read_only()) return R::failure("the project is open read-only");
  auto r = get_plane(p, f.reading);
  if (!r || r->meta.deleted) return R::failure("reading " + f.ref + " is no longer in the project");
  const geo::Plane now{r->strike, r->dip};
  const std::string label = (f.ref.empty() ? std::string("reading") : f.ref) + ": ";
  PlanarReading u = *r;
  std::string change;
  if (f.rule == "reversed-dip") {
    // The flag's correction is the stored attitude dipping the other way; check it still is.
    if (geo::angle_between_planes(geo::Plane{geo::wrap360(now.strike + 180.0), now.dip}, *f.corrected) > kSame)
      return R::failure("reading " + f.ref + " has changed since the check; run it again");
    const geo::Plane measured{geo::wrap360(r->measured_strike + 180.0), r->measured_dip};
    u.typed = geo::format_strike_dip(measured);
    u.notation = PlaneNotation::StrikeDip;
    change = r->typed + " -> " + u.typed + " (dipping the other way)";
  } else {
    const double turn = geo::azimuth_difference(f.corrected->strike, now.strike);
    if (std::abs(f.corrected->dip - now.dip) > kSame || std::abs(turn) < 0.5)
      return R::failure("reading " + f.ref + " has changed since the check; run it again");
    if (r->north == North::True && turn > 0) {
      u.north = North::Magnetic;
      u.declination_source.clear();  // storage applies the model's declination
      change = "north reference true -> magnetic (declination applied)";
    } else if (r->north == North::Magnetic && turn < 0 && std::abs(turn + r->declination) < 1.0) {
      u.north = North::True;
      u.declination = 0;
      u.declination_source.clear();
      change = "north reference magnetic -> true (declination was already set on the compass)";
    } else {
      return R::failure(
          fmt::format("the suggested turn of {:+.1f} degrees does not match the reading's north reference", turn));
    }
  }
  u.notes = r->notes + (r->notes.empty() ? "" : " ") + "[corrected after " + f.rule + ": " + change + "]";
  if (!update(p, u)) return R::failure("nothing to change");
  return label + change;
}

}  // namespace cairn::core
