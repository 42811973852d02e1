#include "app/core/corrections.h"

#include <cmath>
#include <cstdio>
#include <fmt/format.h>
#include <stdexcept>

#include "geomath/angles.h"
#include "geomath/notation.h"
#include "storage/repository.h"
#include "geomath/decimal.h"

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

namespace {
// Two attitudes this close (degrees between poles) are the same reading.
constexpr double kSame = 0.05;
}  // namespace

bool has_correction(const geo::Flag& f) {
  if (!f.reading.empty()) return f.corrected && (f.rule == "reversed-dip" || f.rule == "declination-suspect");
  return !f.readings.empty() && f.rotation && (f.rule == "declination-suspect" || f.rule == "compass-offset");
}

namespace {

// The change a declination diagnosis asks of one reading, decided by the
// reading's north reference and the declination storage applies, never by the
// sign of the turn alone (west declinations are negative):
//  - stored true, and the turn is the local declination: relabel magnetic;
//  - stored magnetic, and the turn takes the applied declination off: relabel true.
// Fails, changing nothing in `u`, when neither holds.
Result<std::string> relabel_north(Project& p, const PlanarReading& r, double turn, const std::string& cause,
                                  PlanarReading& u) {
  using R = Result<std::string>;
  if (r.north == North::True && cause != "declination-applied-twice") {
    auto st = get_station(p, r.station);
    if (st) {
      const double d = p.declination_at(st->lat, st->lon, r.time).degrees;
      if (std::abs(geo::azimuth_difference(turn, d)) < 1.0) {
        u.north = North::Magnetic;
        u.declination_source.clear();  // storage applies the model's declination
        return std::string("north reference true -> magnetic (declination applied)");
      }
    }
  } else if (r.north == North::Magnetic && cause != "declination-not-applied" &&
             std::abs(geo::azimuth_difference(turn, -r.declination)) < 1.0) {
    u.north = North::True;
    u.declination = 0;
    u.declination_source.clear();
    return std::string("north reference magnetic -> true (declination was already set on the compass)");
  }
  return R::failure(
      geo::format_decimal("the suggested turn of %+.1f degrees does not match the reading's north reference", turn));
}

// One audited change for every reading of a group flag, all or nothing.
Result<std::string> apply_group(Project& p, const geo::Flag& f) {
  using R = Result<std::string>;
  std::string failure;
  size_t changed = 0;
  try {
    p.write([&] {
      for (size_t i = 0; i < f.readings.size(); ++i) {
        const std::string ref = i < f.refs.size() && !f.refs[i].empty() ? f.refs[i] : f.readings[i];
        auto r = get_plane(p, f.readings[i]);
        if (!r || r->meta.deleted) throw std::runtime_error("reading " + ref + " is no longer in the project");
        PlanarReading u = *r;
        std::string change;
        if (f.rule == "declination-suspect") {
          auto c = relabel_north(p, *r, *f.rotation, f.cause, u);
          if (!c) throw std::runtime_error("reading " + ref + ": " + c.error());
          change = *c;
        } else {
          // compass-offset: the measured azimuth turned by the group's rotation.
          const geo::Plane measured{geo::wrap360(r->measured_strike + *f.rotation), r->measured_dip};
          u.typed = geo::format_strike_dip(measured);
          u.notation = PlaneNotation::StrikeDip;
          change = r->typed + " -> " + u.typed;
        }
        const std::string turn = geo::format_decimal("%+.1f", *f.rotation);
        u.notes = r->notes + (r->notes.empty() ? "" : " ") + "[corrected after " + f.rule + " of " + f.observer +
                  (f.day.empty() ? "" : " " + f.day) + ", turn " + turn + ": " + change + "]";
        if (update(p, u)) ++changed;
      }
    });
  } catch (const std::runtime_error& e) {
    failure = e.what();
  }
  if (!failure.empty()) return R::failure(failure + "; nothing was changed");
  return std::to_string(changed) + " readings of " + (f.observer.empty() ? std::string("the group") : f.observer) +
         (f.day.empty() ? "" : " on " + f.day) + " corrected (" + f.rule + ")";
}

}  // namespace

Result<std::string> apply_correction(Project& p, const geo::Flag& f) {
  using R = Result<std::string>;
  if (!has_correction(f)) return R::failure("flag " + f.rule + " suggests no correction to apply");
  if (p.read_only()) return R::failure("the project is open read-only");
  if (f.reading.empty()) return apply_group(p, f);
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
    auto c = relabel_north(p, *r, turn, f.cause, u);
    if (!c) return R::failure(c.error());
    change = *c;
  }
  u.notes = r->notes + (r->notes.empty() ? "" : " ") + "[corrected after " + f.rule + ": " + change + "]";
  if (!update(p, u)) return R::failure("nothing to change");
  return label + change;
}

}  // namespace cairn::core
