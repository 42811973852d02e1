// cairn check FILE: contact fits, then the flags grouped by station.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iomanip>
#include <iostream>
#include <map>
#include <set>
#include <unordered_map>
#include <sstream>
#include <string_view>

#include "app/cli/check_terrain.h"
#include "app/cli/command.h"
#include "formats/json.h"
#include "app/cli/magnetic_source.h"
#include "geomath/crosscheck.h"
#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "geomath/strike_lines.h"
#include "app/core/check_input.h"
#include "geomath/decimal.h"
#include "storage/repository.h"

namespace cairn::cli {

using formats::JsonWriter;
namespace {

std::string num(std::optional<double> v, const char* f = "%.1f") {
  if (!v) return "-";
  return geo::format_decimal(f, *v);
}

// The terrain's part of the report: where the ground gives no all-clear, and
// where next on the ground from a position (app/cli/check_terrain.h).
struct GroundReport {
  const GroundCheck* ground = nullptr;
  std::optional<std::vector<GroundLead>> leads;  // with --at
  // Where each contact's point elevations came from: contact id -> source -> count.
  std::map<std::string, std::map<std::string, int>> elevation_sources;
};

std::string sources_text(const std::map<std::string, int>& by) {
  std::string t;
  for (const auto& [src, n] : by) t += (t.empty() ? "" : ", ") + std::to_string(n) + " " + src;
  return t;
}

void write_ground_json(JsonWriter& j, const GroundReport& gr) {
  const GroundCheck& g = *gr.ground;
  j.key("terrain").begin_object();
  j.key("present").value(g.has_terrain);
  j.key("cell").value(g.has_terrain ? std::optional<double>(g.cell) : std::nullopt);
  j.key("too_coarse_to_clear").value(g.too_coarse());
  j.key("not_cleared").begin_array();
  for (const auto& c : g.not_cleared) j.value(c);
  j.end_array();
  j.end_object();
  if (!gr.leads) return;
  j.key("where_next_on_ground").begin_array();
  for (const auto& l : *gr.leads) {
    j.begin_object();
    j.key("contact").value(l.contact);
    j.key("distance").value(l.distance);
    j.key("bearing").value(l.bearing);
    j.key("easting").value(l.e);
    j.key("northing").value(l.n);
    j.key("elevation").value(l.elevation);
    j.key("band_half_width95").value(l.half_width);
    j.end_object();
  }
  j.end_array();
}

// `check --json` lists where next for the usable contacts nearest each station
// only: a prediction far from a contact's points says little, and every contact
// at every station grows as their product (issue 16).
constexpr size_t kWhereNextContacts = 5;

// For each fit, the stations (indices, in order) that have it among their
// kWhereNextContacts nearest usable fits, by horizontal distance from the
// station to the fit's centroid (ties: the earlier fit). A uniform grid over the
// centroids searched in growing rings keeps it near linear in stations + fits.
std::vector<std::vector<size_t>> nearest_fits(const std::vector<geo::CheckStation>& stations,
                                              const std::vector<geo::ContactFit>& fits) {
  std::vector<std::vector<size_t>> out(fits.size());
  std::vector<size_t> usable;
  for (size_t i = 0; i < fits.size(); ++i)
    if (fits[i].usable && fits[i].fit) usable.push_back(i);
  if (usable.empty()) return out;
  double e0 = 1e300, e1 = -1e300, n0 = 1e300, n1 = -1e300;
  for (size_t i : usable) {
    const auto& c = fits[i].fit->centroid;
    e0 = std::min(e0, c.x()), e1 = std::max(e1, c.x()), n0 = std::min(n0, c.y()), n1 = std::max(n1, c.y());
  }
  const double span = std::max({e1 - e0, n1 - n0, 1.0});
  const long side = std::max(1L, static_cast<long>(std::sqrt(static_cast<double>(usable.size()))));
  const double cell = span / static_cast<double>(side) * 1.0000001;
  std::vector<std::vector<size_t>> grid(static_cast<size_t>(side * side));
  auto cell_of = [&](double v, double lo) {
    return std::clamp(static_cast<long>(std::floor((v - lo) / cell)), 0L, side - 1);
  };
  for (size_t i : usable) {
    const auto& c = fits[i].fit->centroid;
    grid[static_cast<size_t>(cell_of(c.y(), n0) * side + cell_of(c.x(), e0))].push_back(i);
  }
  std::vector<std::pair<double, size_t>> best;
  for (size_t si = 0; si < stations.size(); ++si) {
    const auto& s = stations[si];
    best.clear();
    const long ce = cell_of(s.e, e0), cn = cell_of(s.n, n0);
    const double out_e = std::max(0.0, std::max(e0 - s.e, s.e - (e0 + cell * static_cast<double>(side))));
    const double out_n = std::max(0.0, std::max(n0 - s.n, s.n - (n0 + cell * static_cast<double>(side))));
    const double outside = std::hypot(out_e, out_n);
    for (long r = 0; r < side; ++r) {
      for (long i = ce - r; i <= ce + r; ++i)
        for (long k = cn - r; k <= cn + r; ++k) {
          if (i < 0 || k < 0 || i >= side || k >= side) continue;
          if (std::max(std::abs(i - ce), std::abs(k - cn)) != r) continue;  // the ring only
          for (size_t fi : grid[static_cast<size_t>(k * side + i)]) {
            const auto& c = fits[fi].fit->centroid;
            best.push_back({std::hypot(c.x() - s.e, c.y() - s.n), fi});
          }
        }
      if (best.size() >= kWhereNextContacts) {
        std::sort(best.begin(), best.end());
        best.resize(kWhereNextContacts);
        // A fit beyond ring r lies at least r cells from the station, and no
        // nearer than the grid's edge when the station is outside it.
        if (best.back().first <= std::max(outside, cell * static_cast<double>(r))) break;
      }
    }
    std::sort(best.begin(), best.end());
    if (best.size() > kWhereNextContacts) best.resize(kWhereNextContacts);
    for (const auto& b : best) out[b.second].push_back(si);
  }
  return out;
}

void write_json(std::ostream& out, const core::CheckData& data, const geo::CheckReport& rep, geo::Severity min,
                const GroundReport& gr) {
  JsonWriter j(out);
  j.begin_object();
  j.key("fits").begin_array();
  for (const auto& f : rep.fits) {
    j.begin_object();
    j.key("contact").value(f.contact);
    j.key("points").value(static_cast<unsigned long>(f.points));
    if (f.plane) {
      j.key("strike").value(f.plane->strike);
      j.key("dip").value(f.plane->dip);
      j.key("dip_direction").value(f.plane->dip_direction());
      j.key("cone95").value(f.fit->cone95);
      j.key("rms").value(f.fit->rms);
      j.key("M").value(f.fit->M);
      j.key("K").value(f.fit->K);
    } else {
      for (const char* k : {"strike", "dip", "dip_direction", "cone95", "rms", "M", "K"}) j.key(k).null();
    }
    j.key("verdict").value(f.verdict);
    j.key("elevation_sources").begin_object();
    if (auto it = gr.elevation_sources.find(f.contact_id); it != gr.elevation_sources.end())
      for (const auto& [src, n] : it->second) j.key(src).value(static_cast<long>(n));
    j.end_object();
    j.end_object();
  }
  j.end_array();
  j.key("flags").begin_array();
  auto opt = [](const std::string& s) {
    return s.empty() ? std::optional<std::string>{} : std::optional<std::string>{s};
  };
  for (const auto& f : rep.flags) {
    if (f.severity < min) continue;
    j.begin_object();
    j.key("rule").value(f.rule);
    j.key("severity").value(geo::severity_name(f.severity));
    j.key("station").value(opt(f.station));
    j.key("ref").value(opt(f.ref));
    j.key("reading").value(opt(f.reading));
    j.key("contact").value(opt(f.contact));
    j.key("misfit").value(f.misfit);
    j.key("misfit_corrected").value(f.misfit_corrected);
    j.key("message").value(f.message);
    j.key("action").value(f.action);
    j.key("caution").value(opt(f.caution));
    j.key("cause").value(opt(f.cause));
    if (!f.readings.empty()) {  // a group flag: one observer's day
      j.key("refs").array(f.refs);
      j.key("readings").array(f.readings);
      j.key("stations").array(f.stations);
      j.key("observer").value(f.observer);
      j.key("day").value(opt(f.day));
      j.key("rotation").value(f.rotation);
      if (f.rotation_interval)
        j.key("rotation_interval").array(std::vector<double>{f.rotation_interval->first, f.rotation_interval->second});
      else
        j.key("rotation_interval").null();
    }
    if (const std::string src = slope_source(*gr.ground, f); !src.empty()) j.key("slope_source").value(src);
    j.end_object();
  }
  j.end_array();
  // Where next: the predicted elevation (95% half-width) of the kWhereNextContacts
  // usable contacts nearest each station (bounded per station, so the output
  // grows with the data), by contact in the fits' order, then by station.
  const auto near = nearest_fits(data.input.stations, rep.fits);
  j.key("where_next").begin_array();
  for (size_t fi = 0; fi < rep.fits.size(); ++fi) {
    const auto& f = rep.fits[fi];
    for (size_t si : near[fi]) {
      const auto& s = data.input.stations[si];
      auto e = geo::elevation_at(*f.fit, s.e, s.n);
      if (!e) continue;
      j.begin_object();
      j.key("contact").value(f.contact);
      j.key("station").value(s.code);
      j.key("elevation").value(e->elevation);
      j.key("half_width95").value(e->half_width95);
      j.key("station_elevation").value(s.z);
      j.end_object();
    }
  }
  j.end_array();
  write_ground_json(j, gr);
  j.end_object();
  out << "\n";
}

void write_text(std::ostream& out, const core::CheckData& data, const geo::CheckReport& rep, geo::Severity min,
                const GroundReport& gr) {
  out << "Contact fits (strike by the right-hand rule, true north; cone at 95%)\n";
  out << "  " << std::left << std::setw(24) << "contact" << std::right << std::setw(6) << "points"
      << "  " << std::left << std::setw(11) << "strike/dip" << std::setw(13) << "quadrant" << std::right << std::setw(7)
      << "cone95" << std::setw(8) << "rms m"
      << "  verdict\n";
  for (const auto& f : rep.fits) {
    out << "  " << std::left << std::setw(24) << f.contact << std::right << std::setw(6) << f.points << "  ";
    if (f.plane) {
      out << std::left << std::setw(11) << geo::format_strike_dip(*f.plane) << std::setw(13)
          << geo::format_quadrant(*f.plane) << std::right << std::setw(7) << num(f.fit->cone95) << std::setw(8)
          << num(f.fit->rms) << "  " << f.verdict << "\n";
    } else {
      out << std::left << std::setw(39) << "-" << f.verdict << "\n";
    }
  }
  if (gr.ground->has_terrain) {
    out << "  elevations of the points (gps: receiver, map, dem: the terrain, none):\n";
    for (const auto& f : rep.fits)
      if (auto it = gr.elevation_sources.find(f.contact_id); it != gr.elevation_sources.end())
        out << "    " << f.contact << ": " << sources_text(it->second) << "\n";
  }
  size_t shown = 0;
  std::map<std::string, int> by_severity;
  std::string last_station = "\x01";
  out << "\nFlags\n";
  for (const auto& f : rep.flags) {
    if (f.severity < min) continue;
    ++shown;
    ++by_severity[geo::severity_name(f.severity)];
    if (f.station != last_station) {
      out << "  " << (f.station.empty() ? "Contacts and crew" : "Station " + f.station) << "\n";
      last_station = f.station;
    }
    std::string head = std::string(geo::severity_name(f.severity)) + " " + f.rule;
    for (auto& c : head) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
    out << "    [" << head << "]" << (f.ref.empty() ? "" : " " + f.ref) << "  " << f.message;
    if (slope_source(*gr.ground, f) == "dem")
      out << " (slope face from the terrain, " << num(gr.ground->cell, "%.0f") << " m cells)";
    out << "\n";
    if (!f.readings.empty()) {
      out << "      readings:";
      for (size_t i = 0; i < f.readings.size(); ++i)
        out << (i ? ", " : " ") << (i < f.stations.size() ? f.stations[i] + " " : std::string()) << f.refs[i];
      out << "\n";
    }
    out << "      action: " << f.action << "\n";
    if (!f.caution.empty()) out << "      CAUTION: " << f.caution << "\n";
  }
  if (shown == 0) out << "  none\n";

  // Where next: the contact's predicted elevation at stations that name it
  // (each contact's stations gathered in one pass over the readings, in their order).
  std::map<std::string, std::vector<std::string>> lines;
  // Keyed by views of the input's ids (alive until the end): no copy per station or reading.
  std::unordered_map<std::string_view, const geo::CheckStation*> st;
  for (const auto& s : data.input.stations) st.emplace(s.uuid, &s);
  std::unordered_map<std::string_view, std::vector<const geo::CheckStation*>> recorded_at;
  std::set<std::pair<std::string_view, std::string_view>> seen;  // (contact, station)
  for (const auto& r : data.input.planes) {
    if (r.contact.empty()) continue;
    auto s = st.find(r.station);
    if (s == st.end() || !seen.insert({r.contact, r.station}).second) continue;
    recorded_at[r.contact].push_back(s->second);
  }
  for (const auto& f : rep.fits) {
    if (!f.usable) continue;
    auto at = recorded_at.find(f.contact_id);
    if (at == recorded_at.end()) continue;
    for (const geo::CheckStation* s : at->second) {
      auto e = geo::elevation_at(*f.fit, s->e, s->n);
      if (!e) continue;
      std::string l = "    " + s->code + ": contact at " + num(e->elevation, "%.0f") + " m";
      if (e->half_width95) l += " +/- " + num(*e->half_width95, "%.0f");
      if (s->z) {
        const double d = e->elevation - *s->z;
        l += " (station at " + num(*s->z, "%.0f") + " m; contact " + num(std::abs(d), "%.0f") + " m " +
             (d >= 0 ? "above" : "below") + " it)";
      }
      lines[f.contact].push_back(l);
    }
  }
  if (!lines.empty()) {
    out << "\nWhere next (the contact's predicted elevation at stations that record it, 95%)\n";
    for (const auto& [c, ls] : lines) {
      out << "  " << c << "\n";
      for (const auto& l : ls) out << l << "\n";
    }
  }
  if (gr.ground->too_coarse() && !gr.ground->not_cleared.empty()) {
    out << "\nSlopes from the terrain: its " << num(gr.ground->cell, "%.0f") << " m cells are coarser than "
        << num(kMaxScreeningCell, "%.0f") << " m and cannot show a face a few metres high, so they clear nothing. "
        << "Not cleared (no slope-face reading): ";
    for (size_t i = 0; i < gr.ground->not_cleared.size(); ++i) out << (i ? ", " : "") << gr.ground->not_cleared[i];
    out << ".\n  CAUTION: " << geo::kSlopeCaution << "\n";
  }
  if (gr.leads) {
    out << "\nWhere next on the ground (nearest stretch of each predicted trace)\n";
    if (gr.leads->empty()) out << "  no predicted trace nearby\n";
    for (const auto& l : *gr.leads)
      out << "  " << l.contact << ": " << num(l.distance, "%.0f") << " m at bearing " << num(l.bearing, "%03.0f")
          << ", ground at " << num(l.elevation, "%.0f") << " m, band +/- " << num(l.half_width, "%.0f") << " m\n";
  }
  out << "\n" << shown << " flag" << (shown == 1 ? "" : "s");
  for (const char* s : {"hazard", "conflict", "query", "note"})
    if (by_severity.count(s)) out << ", " << by_severity[s] << " " << s;
  out << "\n";
}

struct CheckArgs {
  std::string file;
  bool json = false;
  std::optional<std::string> min_severity;
  std::optional<double> nearby, friction, sliding, toppling, confidence, radius;
  std::optional<std::string> at;
};

int run_check(const CheckArgs& a, std::ostream& out, std::ostream& err) {
  const std::vector<std::string> args{a.file};
  const bool json = a.json;
  geo::Severity min = geo::Severity::Note;
  if (a.min_severity) min = *geo::parse_severity(*a.min_severity);  // one of the choices
  geo::CheckOptions o;
  // -1: the project's setting.
  const double nearby = a.nearby.value_or(-1);
  const double friction = a.friction.value_or(-1);
  const double sliding = a.sliding.value_or(-1);
  const double toppling = a.toppling.value_or(-1);
  o.confidence = a.confidence.value_or(o.confidence);
  const auto& at = a.at;
  const double radius = a.radius.value_or(2000);

  store::OpenOptions oo;
  oo.read_only = true;
  oo.backups = false;
  store::Project p = store::Project::open(args[0], oo);
  if (!p.problem().empty()) err << "warning: " << p.problem() << "\n";
  const store::ProjectInfo info = p.info();
  o.nearby_radius = nearby >= 0 ? nearby : info.nearby_radius;
  o.friction_angle = friction >= 0 ? friction : info.friction_angle;
  o.sliding_window = sliding >= 0 ? sliding : info.sliding_window;
  o.toppling_window = toppling >= 0 ? toppling : info.toppling_window;
  int outside = 0;  // readings dated outside the model's validity
  core::CheckData data = core::load_check_input(p, wmm_declination(&err, &outside));
  if (outside > 0) err << "warning: " << outside_validity_warning(outside) << "\n";
  const GroundCheck ground = add_terrain_faces(p, data, o);
  const geo::CheckReport rep = geo::run_crosscheck(data.input, o);
  GroundReport gr;
  gr.ground = &ground;
  gr.elevation_sources = std::move(data.elevation_sources);
  if (at) {
    const auto comma = at->find(',');
    const auto lat_ = geo::parse_decimal(at->substr(0, comma));
    const auto lon_ = comma == std::string::npos ? std::nullopt : geo::parse_decimal(at->substr(comma + 1));
    if (!lat_ || !lon_) throw std::invalid_argument("--at must be LAT,LON in decimal degrees, not '" + *at + "'");
    const double lat = *lat_, lon = *lon_;
    const auto u = geo::to_utm({lat, lon}, data.zone);
    if (!u) throw std::invalid_argument("--at " + *at + ": " + u.error());
    if (!ground.has_terrain) err << "warning: --at needs a terrain (cairn terrain FILE DEM)\n";
    gr.leads = where_next_on_ground(ground, data, rep, u->easting, u->northing, radius);
  }
  if (json)
    write_json(out, data, rep, min, gr);
  else
    write_text(out, data, rep, min, gr);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<CheckArgs>();
  positional(app, "FILE", a->file, "the project file");
  flag(app, "--json", a->json,
       "print the fits and flags as JSON (streamed; where_next: the 5 usable contacts nearest each station)");
  choice(app, "--min-severity", a->min_severity, {"note", "query", "conflict", "hazard"},
         "show flags of this severity and worse (default: note)");
  number(app, "--nearby", a->nearby, 0, 100000,
         "compare readings that name no contact with the nearest contact within this many metres "
         "(default: the project's setting)");
  number(app, "--friction", a->friction, 0, 89,
         "friction angle in degrees for the slope screening (default: the project's setting)");
  number(app, "--sliding-window", a->sliding, 1, 90,
         "planar sliding window in degrees around the face's dip direction (default: the project's setting)");
  number(app, "--toppling-window", a->toppling, 1, 90,
         "toppling window in degrees around the face's opposite direction (default: the project's setting)");
  number(app, "--confidence", a->confidence, 0.5, 0.9999, "confidence level of the cones (default 0.95)");
  option(
      app, "--at", a->at,
      "LAT,LON: where next on the ground from this position (the nearest stretch of each contact's predicted trace)");
  number(app, "--radius", a->radius, 1, 100000, "with --at: contacts within this many metres (default 2000)");
  return [a](std::ostream& out, std::ostream& err) { return run_check(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"check", "fit every contact and cross-check the readings against the fits", define});

}  // namespace cairn::cli
