#include "app/cli/report_html.h"

#include "formats/base64.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <map>
#include <set>
#include <sstream>
#include <unordered_map>

#include "app/plot/net_scene.h"
#include "app/plot/plan_scene.h"
#include "app/plot/plan_terrain.h"
#include "app/plot/svg_canvas.h"
#include "app/plot/symbols.h"
#include "geomath/notation.h"
#include "geomath/strike_lines.h"
#include "geomath/decimal.h"

namespace cairn::cli {

namespace {

using plot::Rgba;

// A season on paper. The plan labels its stations (codes and dip values) up to
// this many; more would be unreadable at a page's 720 units across.
constexpr size_t kReportLabelledStations = 1500;
// A net draws at most this many pole markers (the newest); its contours and
// statistics count every pole (as the Net screen does with its own limit).
constexpr size_t kReportPoleMarkers = 2000;

std::string esc(const std::string& s) { return plot::xml_escape(s); }

std::string degrees_ew(double d) {
  if (std::fabs(d) < 0.05) return "0.0°";
  return geo::format_decimal("%.1f", std::fabs(d)) + "° " + (d > 0 ? "E" : "W");
}

// YYYY-MM-DD of an ISO 8601 date or time, or "" when there is none.
std::string date_of(const std::string& iso) {
  if (iso.size() < 10 || iso[4] != '-' || iso[7] != '-') return "";
  return iso.substr(0, 10);
}

std::string plural(size_t n, const std::string& one, const std::string& many) {
  return std::to_string(n) + " " + (n == 1 ? one : many);
}

std::string kind_words(std::string s) {
  std::replace(s.begin(), s.end(), '_', ' ');
  return s;
}

std::string line_set_name(const std::string& kind) {
  if (kind == "fold_axis") return "fold axes";
  if (kind == "intersection") return "intersection lineations";
  return kind_words(kind) + "s";
}

const char* const kSeverities[] = {"hazard", "conflict", "query", "note"};  // worst first

Rgba severity_ink(const std::string& s) {
  if (s == "hazard") return {213, 94, 0, 255};
  if (s == "conflict") return {230, 159, 0, 255};
  if (s == "query") return {0, 114, 178, 255};
  return {110, 110, 110, 255};
}

// A small inline picture of the severity's shape (shape and word, never colour alone).
std::string severity_icon(const std::string& s, double size = 13) {
  plot::SvgCanvas c(size, size, 2);
  c.set_class("sev-icon");
  c.marker({size / 2, size / 2}, plot::severity_shape(s), size - 2, severity_ink(s), true);
  c.marker({size / 2, size / 2}, plot::severity_shape(s), size - 2, plot::kInk, false);
  return c.svg();
}

std::string marker_icon(plot::Shape shape, Rgba colour, bool filled, double size = 12) {
  plot::SvgCanvas c(size, size, 2);
  c.marker({size / 2, size / 2}, shape, size - 3, colour, filled);
  if (filled && plot::marker_fillable(shape)) c.marker({size / 2, size / 2}, shape, size - 3, {40, 40, 40, 200}, false);
  return c.svg();
}

std::string stroke_icon(Rgba colour, double w = 22, double h = 12) {
  plot::SvgCanvas c(w, h, 2);
  c.polyline({{1, h / 2}, {w - 1, h / 2}}, colour, 2);
  return c.svg();
}

// ---------------------------------------------------------------- lookups

struct Index {
  std::unordered_map<std::string, const store::Station*> station;       // by uuid
  std::unordered_map<std::string, const store::Station*> station_code;  // by code
  std::unordered_map<std::string, const store::Person*> person;
  std::unordered_map<std::string, const store::Unit*> unit;
  std::unordered_map<std::string, Rgba> unit_colour;
  std::unordered_map<std::string, const store::Contact*> contact;

  explicit Index(const ReportData& d) {
    for (const auto& s : d.stations) station[s.meta.uuid] = &s, station_code[s.code] = &s;
    for (const auto& p : d.people) person[p.meta.uuid] = &p;
    for (size_t i = 0; i < d.units.size(); ++i) {
      unit[d.units[i].meta.uuid] = &d.units[i];
      unit_colour[d.units[i].meta.uuid] = plot::unit_colour(d.units[i].colour, i);
    }
    for (const auto& c : d.contacts) contact[c.meta.uuid] = &c;
  }
  std::string person_label(const std::string& uuid) const {
    auto it = person.find(uuid);
    return it == person.end() ? std::string("unknown") : label(*it->second);
  }
  static std::string label(const store::Person& p) {
    if (p.initials.empty()) return p.name;
    return p.initials + (p.name.empty() ? "" : " (" + p.name + ")");
  }
  // Who made a reading: its own observer, else its station's.
  std::string reading_person(const ReportData& d, const ReportReading& r) const {
    if (r.observer >= 0) return label(d.people[static_cast<size_t>(r.observer)]);
    if (r.observer == ReportReading::kUnknown || r.station < 0) return "unknown";
    return person_label(d.stations[static_cast<size_t>(r.station)].observer);
  }
  std::string unit_code(const std::string& uuid) const {
    auto it = unit.find(uuid);
    return it == unit.end() ? std::string("-") : it->second->code;
  }
  Rgba colour_of_unit(const std::string& uuid) const {
    auto it = unit_colour.find(uuid);
    return it == unit_colour.end() ? Rgba{120, 120, 120, 255} : it->second;
  }
};

// ---------------------------------------------------------------- summary

struct Tally {
  size_t stations = 0, planes = 0, lines = 0, points = 0;
  std::map<std::string, size_t> flags;  // by severity word
  void add(const Tally& t) {
    stations += t.stations, planes += t.planes, lines += t.lines, points += t.points;
    for (const auto& [k, v] : t.flags) flags[k] += v;
  }
};

std::string flag_counts(const std::map<std::string, size_t>& f) {
  std::string s;
  for (const char* sev : kSeverities) {
    auto it = f.find(sev);
    if (it == f.end() || it->second == 0) continue;
    if (!s.empty()) s += " ";
    s += "<span class=\"sev\">" + severity_icon(sev, 10) + " " + std::to_string(it->second) + " " + sev + "</span>";
  }
  return s.empty() ? "–" : s;
}

std::string tally_cells(const Tally& t) {
  std::ostringstream o;
  o << "<td class=\"num\">" << t.stations << "</td><td class=\"num\">" << t.planes << "</td><td class=\"num\">"
    << t.lines << "</td><td class=\"num\">" << t.points << "</td><td>" << flag_counts(t.flags) << "</td>";
  return o.str();
}

void write_summary(std::ostream& o, const ReportData& d, const Index& ix) {
  using Key = std::pair<std::string, std::string>;  // day ("" undated), person label
  std::map<Key, Tally> t;
  for (const auto& s : d.stations) t[{date_of(s.time), ix.person_label(s.observer)}].stations++;
  static const std::string undated;
  auto key = [&](const ReportReading& r) {
    // Both sides references: no copy of the station's time for each of a season's readings.
    const std::string& station_time = r.station < 0 ? undated : d.stations[static_cast<size_t>(r.station)].time;
    return Key{r.day.empty() ? date_of(station_time) : r.day, ix.reading_person(d, r)};
  };
  for (const auto& r : d.planes) t[key(r)].planes++;
  for (const auto& r : d.lines) t[key(r)].lines++;
  for (const auto& [k, n] : d.points.by_day_observer) t[{k.first, ix.person_label(k.second)}].points += n;
  size_t contact_wide = 0;
  std::map<std::string, size_t> all_flags;
  for (const auto& f : d.result.flags) {
    const std::string sev = geo::severity_name(f.severity);
    all_flags[sev]++;
    auto st = ix.station_code.find(f.station);
    if (f.station.empty() || st == ix.station_code.end()) {
      ++contact_wide;
      continue;
    }
    t[{date_of(st->second->time), ix.person_label(st->second->observer)}].flags[sev]++;
  }

  std::set<std::string> days, people;
  for (const auto& [k, v] : t) days.insert(k.first), people.insert(k.second);
  Tally total;
  for (const auto& [k, v] : t) total.add(v);
  total.flags = all_flags;
  std::string range;
  {
    std::vector<std::string> dated;
    for (const auto& day : days)
      if (!day.empty()) dated.push_back(day);
    if (!dated.empty())
      range = dated.front() == dated.back() ? " (" + dated.front() + ")"
                                            : " (" + dated.front() + " to " + dated.back() + ")";
  }
  o << "<section id=\"summary\"><h2>Summary</h2>\n<p>" << plural(days.size(), "day", "days") << range << ", "
    << plural(people.size(), "person", "people") << ": " << plural(total.stations, "station", "stations") << ", "
    << plural(total.planes, "planar reading", "planar readings") << ", "
    << plural(total.lines, "linear reading", "linear readings") << ", "
    << plural(total.points, "contact point", "contact points") << "; "
    << plural(d.result.flags.size(), "flag", "flags");
  if (!d.result.flags.empty()) o << " (" << flag_counts(all_flags) << ")";
  o << ".</p>\n";
  if (t.empty()) {
    o << "<p>The project holds no stations, readings or contact points yet.</p></section>\n";
    return;
  }
  o << "<table class=\"summary\"><thead><tr><th>Day</th><th>Person</th><th class=\"num\">Stations</th>"
       "<th class=\"num\">Planar readings</th><th class=\"num\">Linear readings</th><th class=\"num\">Contact "
       "points</th>"
       "<th>Flags at their stations</th></tr></thead>\n<tbody>\n";
  std::string day = "\x01";
  Tally day_total;
  size_t day_rows = 0;
  auto close_day = [&] {
    if (day_rows > 1)
      o << "<tr class=\"subtotal\"><td class=\"day\">" << esc(day.empty() ? "undated" : day) << "</td><td>all</td>"
        << tally_cells(day_total) << "</tr>\n";
  };
  for (const auto& [k, v] : t) {
    if (k.first != day) {
      if (day != "\x01") close_day();
      day = k.first, day_total = {}, day_rows = 0;
    }
    day_total.add(v);
    ++day_rows;
    o << "<tr><td class=\"day\">" << esc(k.first.empty() ? "undated" : k.first) << "</td><td>" << esc(k.second)
      << "</td>" << tally_cells(v) << "</tr>\n";
  }
  close_day();
  o << "</tbody><tfoot><tr class=\"total\"><td>All days</td><td>everyone</td>" << tally_cells(total)
    << "</tr></tfoot></table>\n";
  if (contact_wide)
    o << "<p class=\"small\">The total includes " << plural(contact_wide, "flag", "flags")
      << " about whole contacts, which belong to no station.</p>\n";
  o << "</section>\n";
}

// ---------------------------------------------------------------- declination

void write_declination(std::ostream& o, const ReportData& d) {
  o << "<section id=\"declination\"><h2>Declination</h2>\n";
  if (d.declination) {
    const auto& s = *d.declination;
    o << "<p>" << esc(s.model) << " at " << geo::format_decimal("%.4f", std::fabs(s.lat)) << "° "
      << (s.lat >= 0 ? "N" : "S") << ", " << geo::format_decimal("%.4f", std::fabs(s.lon)) << "° "
      << (s.lon >= 0 ? "E" : "W") << " (the mean position of the data)";
    if (s.first_date == s.last_date) {
      o << " on " << esc(s.first_date) << ": <strong>" << degrees_ew(s.first) << "</strong>";
    } else {
      o << " from " << esc(s.first_date) << " to " << esc(s.last_date) << ": <strong>" << degrees_ew(s.first)
        << "</strong> to <strong>" << degrees_ew(s.last) << "</strong>";
    }
    o << (s.dates_from_data ? "." : " (no dated records: evaluated on the day of this report).") << "</p>\n";
    if (!s.in_validity)
      o << "<p class=\"caution\">These dates fall outside " << esc(s.model) << "'s validity ("
        << geo::format_decimal("%.1f", s.valid_from) << " to " << geo::format_decimal("%.1f", s.valid_to)
        << "): its declination there is an extrapolation.</p>\n";
  } else {
    o << "<p>No declination evaluated: " << esc(d.declination_problem) << ".</p>\n";
  }
  // What the readings themselves carry.
  struct Use {
    size_t n = 0;
    double lo = 1e9, hi = -1e9;
  };
  std::map<std::string, Use> by_source;
  size_t true_north = 0;
  auto take = [&](store::North north, double decl, const std::string& source) {
    if (north != store::North::Magnetic) {
      ++true_north;
      return;
    }
    auto& u = by_source[source.empty() ? "unstated" : source];
    ++u.n;
    u.lo = std::min(u.lo, decl);
    u.hi = std::max(u.hi, decl);
  };
  for (const auto& r : d.planes) take(r.north, r.declination, r.declination_source);
  for (const auto& r : d.lines) take(r.north, r.declination, r.declination_source);
  o << "<ul>\n<li>" << plural(true_north, "reading was", "readings were") << " measured against true north.</li>\n";
  for (const auto& [src, u] : by_source) {
    o << "<li>" << plural(u.n, "magnetic reading", "magnetic readings") << " turned to true north with " << esc(src)
      << ": " << degrees_ew(u.lo);
    if (std::fabs(u.hi - u.lo) >= 0.05) o << " to " << degrees_ew(u.hi);
    o << ".</li>\n";
  }
  if (by_source.count("project setting"))
    o << "<li>The project's declination setting is " << degrees_ew(d.info.declination) << ".</li>\n";
  o << "</ul>\n<p class=\"small\">Declination is east positive: true azimuth = magnetic azimuth + declination. "
       "All attitudes below are against true north; strikes follow the right-hand rule.</p>\n</section>\n";
}

// ---------------------------------------------------------------- flags

void write_flags(std::ostream& o, const ReportData& d) {
  o << "<section id=\"flags\"><h2>Flags</h2>\n";
  if (d.result.flags.empty()) {
    o << "<p>The cross-check raised no flags.</p></section>\n";
    return;
  }
  o << "<p class=\"key\">";
  for (const char* s : {"note", "query", "conflict", "hazard"})
    o << "<span class=\"sev\">" << severity_icon(s) << " " << s << "</span> ";
  o << "&nbsp;(mildest to worst). Hazards come first; anything that could send someone onto steep ground carries a "
       "caution.</p>\n";
  std::vector<const geo::Flag*> flags;
  for (const auto& f : d.result.flags) flags.push_back(&f);
  std::stable_sort(flags.begin(), flags.end(),
                   [](const geo::Flag* a, const geo::Flag* b) { return a->severity > b->severity; });
  o << "<table class=\"flags\"><thead><tr><th>Severity</th><th>Rule</th><th>Where</th><th>Finding</th>"
       "<th>What to do</th></tr></thead>\n<tbody>\n";
  for (const auto* f : flags) {
    const std::string sev = geo::severity_name(f->severity);
    std::string where;
    if (!f->station.empty()) where += "station " + esc(f->station);
    if (!f->ref.empty()) where += (where.empty() ? "" : "<br>") + std::string("reading ") + esc(f->ref);
    if (!f->contact.empty()) where += (where.empty() ? "" : "<br>") + std::string("contact ") + esc(f->contact);
    if (where.empty()) where = "–";
    std::string finding = esc(f->message);
    if (f->misfit) {
      finding += "<br><span class=\"small\">misfit " + geo::format_decimal("%.1f", *f->misfit) + "°";
      if (f->misfit_corrected)
        finding += ", " + geo::format_decimal("%.1f", *f->misfit_corrected) + "° after the suggested correction";
      finding += "</span>";
    }
    o << "<tr class=\"sev-" << sev << "\"><td class=\"sev\">" << severity_icon(sev) << " <strong>" << sev
      << "</strong></td><td>" << esc(f->rule) << "</td><td>" << where << "</td><td>" << finding << "</td><td>"
      << esc(f->action);
    if (!f->caution.empty()) o << "<p class=\"caution\">Caution: " << esc(f->caution) << "</p>";
    o << "</td></tr>\n";
  }
  o << "</tbody></table>\n</section>\n";
}

// ---------------------------------------------------------------- plan

// Contacts cycle through these Okabe-Ito inks (blue, reddish purple, bluish green,
// vermillion, black, sky blue); each is also named in the key under the plan.
const Rgba kContactInks[] = {{0, 114, 178, 255}, {204, 121, 167, 255}, {0, 158, 115, 255},
                             {213, 94, 0, 255},  {0, 0, 0, 255},       {86, 180, 233, 255}};
constexpr size_t kContactInkCount = sizeof kContactInks / sizeof kContactInks[0];

void write_plan(std::ostream& o, const ReportData& d, const Index& ix) {
  o << "<section id=\"plan\"><h2>Plan</h2>\n";
  const auto& in = d.check.input;
  bool any_contact_points = false;
  for (const auto& c : in.contacts) any_contact_points = any_contact_points || !c.points.empty();
  if (in.stations.empty() && !any_contact_points) {
    o << "<p>Nothing to draw: no stations and no contact points.</p></section>\n";
    return;
  }
  const double gamma = in.grid.convergence;
  plot::PlanData pd;
  std::unordered_map<std::string, const geo::CheckStation*> cst;
  for (const auto& s : in.stations) {
    cst[s.uuid] = &s;
    plot::PlanStation ps;
    ps.code = s.code;
    ps.e = s.e, ps.n = s.n;
    ps.colour = s.unit.empty() ? Rgba{255, 255, 255, 255} : ix.colour_of_unit(s.unit);
    pd.stations.push_back(ps);
  }
  std::map<std::string, Rgba> contact_ink;
  for (size_t i = 0; i < in.contacts.size(); ++i) {
    contact_ink[in.contacts[i].uuid] = kContactInks[i % kContactInkCount];
    for (const auto& p : in.contacts[i].points) pd.points.push_back({p.e, p.n, kContactInks[i % kContactInkCount]});
  }
  // One symbol per station and kind: bedding, contact readings, foliation, cleavage.
  std::set<std::pair<std::string, std::string>> shown;
  size_t symbols = 0;
  for (const auto& r : in.planes) {
    if (r.kind != "bedding" && r.kind != "contact" && r.kind != "foliation" && r.kind != "cleavage") continue;
    auto st = cst.find(r.station);
    if (st == cst.end() || !shown.insert({r.station, r.kind}).second) continue;
    plot::PlanAttitude a;
    a.e = st->second->e, a.n = st->second->n;
    a.strike = plot::grid_azimuth(r.plane.strike, gamma);
    a.dip = r.plane.dip;
    a.symbol = plot::attitude_symbol(r.kind, r.facing == geo::CheckFacing::Overturned);
    pd.attitudes.push_back(a);
    ++symbols;
  }

  const double W = 720;
  const geo::MapRect b = plot::plan_bounds(pd);
  const double aspect = std::clamp((b.n_max - b.n_min) / std::max(1e-6, b.e_max - b.e_min), 0.55, 1.25);
  const double H = std::round(W * aspect);
  const plot::Rect r{0, 0, W, H};
  plot::PlanOptions po;
  po.symbol_length = 22;
  po.text_size = 10;
  po.mark_size = 9;
  po.line_width = 1.3;
  // A season's stations on one printed page: their codes and dip values would
  // be a solid smear (and most of a 260 MB page), so past kReportLabelledStations
  // they are left out and the attitudes drawn as bare strike lines.
  const bool crowded = in.stations.size() > kReportLabelledStations;
  if (crowded) {
    po.station_labels = false;
    po.dip_values = false;
    po.strike_only = true;
  }
  const plot::PlanView view = plot::fit_view(b, r, 48);
  const geo::MapRect shown_map = plot::visible_map(view, r);

  // Structure contours of each usable fit near its own points, every `interval` metres.
  std::vector<std::string> contour_notes;
  for (size_t i = 0; i < d.result.fits.size(); ++i) {
    const auto& f = d.result.fits[i];
    if (!f.usable || !f.fit) continue;
    const geo::CheckContact* cc = nullptr;
    for (const auto& c : in.contacts)
      if (c.uuid == f.contact_id) cc = &c;
    if (!cc || cc->points.empty()) continue;
    const double dip = f.fit->plane.dip;
    if (dip < 0.5 || dip > 89.5) continue;
    const double view_w = shown_map.e_max - shown_map.e_min;
    const double interval = std::max(1.0, plot::nice_length(std::tan(dip * 3.14159265358979 / 180) * view_w / 8));
    geo::MapRect near{cc->points[0].e, cc->points[0].n, cc->points[0].e, cc->points[0].n};
    for (const auto& p : cc->points) {
      near.e_min = std::min(near.e_min, p.e), near.e_max = std::max(near.e_max, p.e);
      near.n_min = std::min(near.n_min, p.n), near.n_max = std::max(near.n_max, p.n);
    }
    const double grow = 0.2 * view_w;
    near = {std::max(shown_map.e_min, near.e_min - grow), std::max(shown_map.n_min, near.n_min - grow),
            std::min(shown_map.e_max, near.e_max + grow), std::min(shown_map.n_max, near.n_max + grow)};
    auto lines = geo::structure_contours(*f.fit, near, interval, 40);
    if (!lines) continue;
    const Rgba ink = contact_ink.count(f.contact_id) ? contact_ink[f.contact_id] : kContactInks[0];
    for (const auto& s : *lines) pd.strike_lines.push_back({s.e0, s.n0, s.e1, s.n1, s.elevation, ink});
    contour_notes.push_back(esc(f.contact) + " every " + geo::format_decimal("%g", interval) + " m");
  }

  // The ground: hillshade, terrain contours, predicted traces and their 95% bands.
  std::vector<std::string> ground_notes;
  if (d.terrain) {
    std::vector<plot::TracedContact> traced;
    for (const auto& f : d.result.fits)
      if (f.fit)
        traced.push_back(
            {f.contact, &*f.fit, contact_ink.count(f.contact_id) ? contact_ink[f.contact_id] : kContactInks[0]});
    ground_notes = plot::add_terrain(pd, *d.terrain, traced, d.terrain_sigma.value_or(0));
  }

  pd.tracks = d.tracks;

  plot::SvgCanvas svg(W, H, 1);
  svg.set_fixed_size(false);
  svg.set_class("plan");
  svg.set_title("Plan of stations, contact points, strike-dip symbols and structure contours");
  // A season's plan is tens of megabytes of SVG: written as it is drawn, not held whole.
  o << "<figure class=\"plan\">";
  svg.stream_to(o);
  plot::draw_plan(svg, r, pd, view, po);
  svg.polyline({{0.5, 0.5}, {W - 0.5, 0.5}, {W - 0.5, H - 0.5}, {0.5, H - 0.5}}, plot::kInk, 1, true);
  svg.finish();
  o << "\n<figcaption>";
  o << "Grid north up";
  if (d.check.zone.zone > 0) o << " (UTM zone " << d.check.zone.zone << (d.check.zone.northp ? "N" : "S") << ")";
  if (std::fabs(gamma) >= 0.05)
    o << "; true north lies " << geo::format_decimal("%.1f", std::fabs(gamma)) << "° " << (gamma > 0 ? "west" : "east")
      << " of grid north, and the symbols are turned onto the grid";
  o << ". Stations: circles in their unit's colour (white: no unit), labelled by code. Contact points: diamonds. "
    << plural(symbols, "strike-dip symbol", "strike-dip symbols")
    << " after FGDC-STD-013-2006 (tick and value on the dip side; a hooked tick for overturned bedding; "
       "a filled triangle for foliation, an open one for cleavage).";
  if (crowded)
    o << " With " << in.stations.size() << " stations (more than " << kReportLabelledStations
      << " on one page) the station codes and dip values are left out and the attitudes are bare strike lines; "
         "the Plan screen and <code>cairn export</code> give each one.";
  if (!contour_notes.empty()) {
    o << " Structure contours (strike lines of the fitted contacts, labelled with their elevation): ";
    for (size_t i = 0; i < contour_notes.size(); ++i) o << (i ? "; " : "") << contour_notes[i];
    o << ".";
  }
  if (!ground_notes.empty()) {
    o << " The ground from the project's terrain: ";
    for (size_t i = 0; i < ground_notes.size(); ++i) o << (i ? "; " : "") << esc(ground_notes[i]);
    o << ". Predicted outcrop traces (where each fitted plane meets the ground) are thick lines in the contact's "
         "colour, with their 95% trace bands tinted.";
  }
  if (!d.tracks.empty()) {
    o << " Day track of " << esc(d.track_day) << " (UTC): dashed, one line per person, an open square and the "
      << "person's initials at the last fix (every day's tracks: <code>cairn export FILE OUT.gpx</code>).";
  }
  o << "</figcaption></figure>\n<p class=\"key\">";
  for (size_t i = 0; i < d.units.size(); ++i)
    o << "<span>" << marker_icon(plot::Shape::Circle, ix.colour_of_unit(d.units[i].meta.uuid), true) << " "
      << esc(d.units[i].code) << (d.units[i].name.empty() ? "" : " " + esc(d.units[i].name)) << "</span> ";
  for (const auto& c : in.contacts)
    if (!c.points.empty())
      o << "<span>" << marker_icon(plot::Shape::Diamond, contact_ink[c.uuid], true) << stroke_icon(contact_ink[c.uuid])
        << " contact " << esc(c.name) << "</span> ";
  o << "</p>\n</section>\n";
}

// ---------------------------------------------------------------- fits

void write_fits(std::ostream& o, const ReportData& d, const Index& ix) {
  o << "<section id=\"fits\"><h2>Contact fits</h2>\n";
  if (d.result.fits.empty()) {
    o << "<p>The project has no contacts.</p></section>\n";
    return;
  }
  o << "<table class=\"fits\"><thead><tr><th>Contact</th><th>Units (lower → upper)</th><th class=\"num\">Points</th>"
       "<th>Strike/dip</th><th>Dip direction/dip</th><th class=\"num\">Cone 95%</th><th class=\"num\">RMS (m)</th>"
       "<th>Verdict</th></tr></thead>\n<tbody>\n";
  for (const auto& f : d.result.fits) {
    std::string units = "–";
    auto c = ix.contact.find(f.contact_id);
    if (c != ix.contact.end())
      units = esc(ix.unit_code(c->second->lower_unit)) + " → " + esc(ix.unit_code(c->second->upper_unit));
    o << "<tr><td>" << esc(f.contact) << "</td><td>" << units << "</td><td class=\"num\">" << f.points << "</td>";
    if (f.plane && f.fit) {
      o << "<td>" << esc(geo::format_strike_dip(*f.plane)) << "</td><td>" << esc(geo::format_dip_direction(*f.plane))
        << "</td><td class=\"num\">" << (f.fit->cone95 ? geo::format_decimal("%.1f", *f.fit->cone95) + "°" : "–")
        << "</td><td class=\"num\">" << geo::format_decimal("%.1f", f.fit->rms) << "</td>";
    } else {
      o << "<td>–</td><td>–</td><td class=\"num\">–</td><td class=\"num\">–</td>";
    }
    o << "<td>" << esc(f.verdict) << (f.usable ? "" : " <em>(not used for comparisons)</em>") << "</td></tr>\n";
  }
  o << "</tbody></table>\n</section>\n";
}

// ---------------------------------------------------------------- nets

plot::NetOptions net_options(const ReportData& d, bool contours) {
  plot::NetOptions o;
  o.kind = d.net;
  o.contours = contours;
  o.statistics = true;
  o.legend = true;
  o.contour_min_data = 5;
  o.text_size = 11;
  o.max_pole_markers = kReportPoleMarkers;
  return o;
}

// What a caption says of a net with more poles than it draws (net_options), or "".
std::string poles_left_out(const plot::NetData& nd) {
  if (nd.planes.size() <= kReportPoleMarkers) return "";
  return " The newest " + std::to_string(kReportPoleMarkers) + " of the " + std::to_string(nd.planes.size()) +
         " poles are drawn; the contours and statistics use all of them.";
}

std::string net_figure(const plot::NetData& nd, const plot::NetOptions& o, const std::string& caption) {
  const double W = 340;
  const auto stats = plot::net_statistics(nd, o);
  const int legend = static_cast<int>(plot::net_legend(nd, stats, o).size());
  const double H = std::ceil(plot::net_height_for_width(W, !nd.title.empty(), legend, o));
  plot::SvgCanvas svg(W, H, 2);
  svg.set_fixed_size(false);
  svg.set_class("net");
  svg.set_title(nd.title.empty() ? "Stereonet" : "Stereonet: " + nd.title);
  plot::draw_net(svg, {0, 0, W, H}, nd, o);
  return "<figure class=\"net\">" + svg.svg() + "\n<figcaption>" + caption + "</figcaption></figure>\n";
}

// A section's nets, written into the page one by one as they are drawn (a
// season's 2 000 contact nets are 50 MB): the first opens their block.
class NetFigures {
 public:
  explicit NetFigures(std::ostream& o) : o_(o) {}
  void put(const std::string& figure) {
    if (!any_) o_ << "<div class=\"nets\">\n";
    any_ = true;
    o_ << figure;
  }
  // Closes the block, or writes `none` when no net was put.
  void end(const std::string& none) { o_ << (any_ ? std::string("</div>\n") : none); }

 private:
  std::ostream& o_;
  bool any_ = false;
};

// The kind with the most readings (ties: the first in `order`).
std::string dominant(const std::map<std::string, size_t>& counts, const std::vector<std::string>& order) {
  std::string best;
  size_t n = 0;
  for (const auto& k : order) {
    auto it = counts.find(k);
    if (it != counts.end() && it->second > n) best = k, n = it->second;
  }
  for (const auto& [k, v] : counts)
    if (v > n) best = k, n = v;
  return best;
}

void write_unit_nets(std::ostream& o, const ReportData& d, const Index& ix) {
  o << "<section id=\"nets-units\"><h2>Nets by unit</h2>\n";
  struct Group {
    std::string title, key;
    Rgba colour;
  };
  std::vector<Group> groups;
  for (const auto& u : d.units)
    groups.push_back(
        {"Unit " + u.code + (u.name.empty() ? "" : " – " + u.name), u.meta.uuid, ix.colour_of_unit(u.meta.uuid)});
  groups.push_back({"Stations without a unit", "", Rgba{90, 90, 90, 255}});
  const std::vector<std::string> plane_order{"bedding", "foliation", "cleavage", "contact", "joint", "fault", "vein"};
  const std::vector<std::string> line_order{"lineation", "fold_axis", "slickenline", "intersection"};
  NetFigures figures(o);
  for (const auto& g : groups) {
    std::map<std::string, size_t> pk, lk;
    std::vector<const ReportPlane*> ps;
    std::vector<const ReportLine*> ls;
    auto in_group = [&](const ReportReading& r) {
      return r.station >= 0 && d.stations[static_cast<size_t>(r.station)].unit == g.key;
    };
    for (const auto& r : d.planes) {
      if (!in_group(r) || r.kind == store::PlaneKind::Slope) continue;
      ps.push_back(&r);
      pk[std::string(store::to_string(r.kind))]++;
    }
    for (const auto& r : d.lines) {
      if (!in_group(r)) continue;
      ls.push_back(&r);
      lk[std::string(store::to_string(r.kind))]++;
    }
    if (ps.empty() && ls.empty()) continue;
    const std::string pkind = dominant(pk, plane_order), lkind = dominant(lk, line_order);
    plot::NetData nd;
    nd.title = g.title;
    for (const auto* r : ps) {
      const std::string k(store::to_string(r->kind));
      nd.planes.push_back({geo::Plane{r->strike, r->dip}, g.colour, plot::pole_shape(k), k == pkind});
    }
    for (const auto* r : ls) {
      const std::string k(store::to_string(r->kind));
      nd.lines.push_back({geo::Line{r->trend, r->plunge}, g.colour, plot::line_shape(k), k == lkind});
    }
    for (const auto& [k, n] : pk)
      nd.key.push_back(
          {plot::pole_shape(k), g.colour, true, "poles to " + kind_words(k) + " (" + std::to_string(n) + ")"});
    for (const auto& [k, n] : lk)
      nd.key.push_back({plot::line_shape(k), g.colour, false, kind_words(k) + " (" + std::to_string(n) + ")"});
    nd.pole_set = "poles to " + kind_words(pkind);
    nd.line_set = lkind.empty() ? "lines" : line_set_name(lkind);
    std::string caption = "Contours and statistics use the poles to " + kind_words(pkind.empty() ? "planes" : pkind) +
                          (lkind.empty() ? "" : " and the " + line_set_name(lkind)) + ".";
    figures.put(net_figure(nd, net_options(d, true), esc(caption + poles_left_out(nd))));
  }
  figures.end("<p>No readings yet.</p>\n");
  o << "</section>\n";
}

void write_contact_nets(std::ostream& o, const ReportData& d, const Index& ix) {
  o << "<section id=\"nets-contacts\"><h2>Nets by contact</h2>\n";
  NetFigures figures(o);
  // Each contact's readings and fit, found in one pass each (a season has
  // thousands of contacts and hundreds of thousands of readings).
  std::vector<std::vector<const ReportPlane*>> naming(d.contacts.size());
  for (const auto& r : d.planes)
    if (r.contact >= 0) naming[static_cast<size_t>(r.contact)].push_back(&r);
  std::unordered_map<std::string, const geo::ContactFit*> fit_of;
  for (const auto& f : d.result.fits) fit_of[f.contact_id] = &f;  // the last of a contact's, as before
  for (size_t ci = 0; ci < d.contacts.size(); ++ci) {
    const store::Contact& c = d.contacts[ci];
    const auto found = fit_of.find(c.meta.uuid);
    const geo::ContactFit* fit = found == fit_of.end() ? nullptr : found->second;
    plot::NetData nd;
    nd.title = "Contact " + c.name;
    size_t n = 0;
    for (const ReportPlane* r : naming[ci]) {
      const Rgba ink =
          r->station < 0 ? plot::kInk : ix.colour_of_unit(d.stations[static_cast<size_t>(r->station)].unit);
      nd.planes.push_back(
          {geo::Plane{r->strike, r->dip}, ink, plot::pole_shape(std::string(store::to_string(r->kind))), true});
      ++n;
    }
    if (n)
      nd.key.push_back(
          {plot::Shape::Circle, plot::kInk, true, "poles to readings naming it (" + std::to_string(n) + ")"});
    nd.pole_set = "readings";
    if (fit && fit->plane && fit->fit) {
      plot::NetFit nf;
      nf.plane = *fit->plane;
      nf.cone95 = fit->fit->cone95;
      nf.colour = {0, 114, 178, 255};
      nf.label = "Fit to " + std::to_string(fit->points) + " points";
      nd.fits.push_back(nf);
    }
    if (nd.planes.empty() && nd.fits.empty()) continue;
    std::string caption = "Lower unit " + esc(ix.unit_code(c.lower_unit)) + ", upper unit " +
                          esc(ix.unit_code(c.upper_unit)) + ", " + esc(std::string(store::to_string(c.type))) + ". ";
    if (fit) caption += "Fit: " + esc(fit->verdict) + ". ";
    caption +=
        "The blue great circle is the plane fitted to the contact's points, the square its pole with the 95% "
        "cone; markers are the poles of readings that name the contact, in their station's unit colour.";
    figures.put(net_figure(nd, net_options(d, false), caption + esc(poles_left_out(nd))));
  }
  figures.end("<p>No contact has a fit or readings yet.</p>\n");
  o << "</section>\n";
}

// ---------------------------------------------------------------- photos

// Thumbnails by station (in the stations' order), each a JPEG data: URI (RFC 2397).
void write_photos(std::ostream& o, const ReportData& d, const Index& ix) {
  if (d.photos.empty()) return;
  o << "<section id=\"photos\"><h2>Photos</h2>\n<div class=\"photos\">\n";
  std::vector<const ReportPhoto*> order;
  for (const auto& p : d.photos) order.push_back(&p);
  std::unordered_map<std::string, size_t> rank;
  for (size_t i = 0; i < d.stations.size(); ++i) rank[d.stations[i].meta.uuid] = i;
  const auto rank_of = [&](const ReportPhoto* p) {
    const auto it = rank.find(p->photo.station);
    return it == rank.end() ? d.stations.size() : it->second;
  };
  std::stable_sort(order.begin(), order.end(),
                   [&](const ReportPhoto* a, const ReportPhoto* b) { return rank_of(a) < rank_of(b); });
  for (const ReportPhoto* p : order) {
    const auto st = ix.station.find(p->photo.station);
    const std::string code = st == ix.station.end() ? std::string("no station") : st->second->code;
    o << "<figure class=\"photo\">";
    if (!p->thumbnail_jpeg.empty())
      o << "<img src=\"data:image/jpeg;base64," << formats::base64_encode(p->thumbnail_jpeg) << "\" alt=\""
        << esc(p->photo.path) << "\">";
    else
      o << "<p class=\"small\">" << esc(p->problem) << "</p>";
    o << "<figcaption><b>" << esc(code) << "</b> " << esc(p->photo.path);
    if (!p->photo.time.empty()) o << "<br>" << esc(p->photo.time);
    if (!p->photo.caption.empty()) o << "<br>" << esc(p->photo.caption);
    if (!p->content_matches) o << "<br><b>the file is not the one recorded (SHA-256 differs)</b>";
    o << "</figcaption></figure>\n";
  }
  o << "</div>\n</section>\n";
}

// ---------------------------------------------------------------- page

const char* const kCss = R"CSS(
@page { size: auto; margin: 14mm 12mm 15mm 12mm; }
:root { color: #111; background: #fff; }
body { font-family: "DejaVu Sans", Verdana, Arial, sans-serif; font-size: 10pt; line-height: 1.35;
       max-width: 190mm; margin: 0 auto; padding: 8mm 6mm; }
h1 { font-size: 17pt; margin: 0 0 1mm; }
h2 { font-size: 13pt; margin: 7mm 0 2.5mm; padding-bottom: 1mm; border-bottom: 1.5px solid #444;
     break-after: avoid; page-break-after: avoid; }
p { margin: 1.5mm 0; }
.meta, .small, figcaption { font-size: 8.5pt; color: #333; }
table { border-collapse: collapse; width: 100%; font-size: 8.8pt; margin: 2mm 0; }
th, td { border: 0.6pt solid #999; padding: 1mm 1.5mm; text-align: left; vertical-align: top; }
th { background: #eee; }
thead { display: table-header-group; }
tfoot { display: table-row-group; }
tr, figure, .caution, .key { break-inside: avoid; page-break-inside: avoid; }
.day { white-space: nowrap; }
.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.subtotal td, tr.total td { font-weight: bold; }
tr.total td { border-top: 1.5pt solid #444; }
.sev { white-space: nowrap; }
svg.sev-icon, .key svg { vertical-align: -1.5px; }
tr.sev-hazard td { background: #fdeee6; }
tr.sev-conflict td { background: #fdf6e6; }
.caution { font-weight: bold; border-left: 2.5pt solid #111; padding-left: 1.5mm; margin: 1mm 0 0; }
.key span { margin-right: 3mm; white-space: nowrap; }
figure { margin: 2mm 0; }
figure svg { display: block; width: 100%; height: auto; }
figure.plan svg { max-height: 225mm; border: 0; }
.photos { display: grid; grid-template-columns: repeat(auto-fill, minmax(42mm, 1fr)); gap: 3mm; }
figure.photo img { display: block; max-width: 100%; height: auto; border: 0.6pt solid #999; }
.nets { display: grid; grid-template-columns: 1fr 1fr; gap: 4mm 6mm; align-items: start; }
footer { margin-top: 8mm; font-size: 8pt; color: #555; border-top: 0.6pt solid #999; padding-top: 1.5mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 9.5pt; }
  h2 { margin-top: 5mm; }
  section#plan { break-before: page; page-break-before: always; }
  section#nets-units, section#nets-contacts { break-before: page; page-break-before: always; }
  tr.sev-hazard td, tr.sev-conflict td, th { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
)CSS";

}  // namespace

ReportIndexer::ReportIndexer(const ReportData& d) {
  auto index = [](auto& map, const auto& list) {
    for (size_t i = 0; i < list.size(); ++i) map[list[i].meta.uuid] = static_cast<int32_t>(i);
  };
  index(station_, d.stations);
  index(contact_, d.contacts);
  index(person_, d.people);
}

// The fields planar and linear readings share.
template <class Record>
void ReportIndexer::fill(ReportReading& r, const Record& rec) const {
  if (const auto it = station_.find(rec.station); it != station_.end()) r.station = it->second;
  if (!rec.observer.empty()) {
    const auto it = person_.find(rec.observer);
    r.observer = it == person_.end() ? ReportReading::kUnknown : it->second;
  }
  r.day = date_of(rec.time);
  r.north = rec.north, r.declination = rec.declination, r.declination_source = rec.declination_source;
}

ReportPlane ReportIndexer::plane(const store::PlanarReading& p) const {
  ReportPlane r;
  fill(r, p);
  r.strike = p.strike, r.dip = p.dip, r.kind = p.kind;
  if (const auto it = contact_.find(p.contact); it != contact_.end()) r.contact = it->second;
  return r;
}

ReportLine ReportIndexer::line(const store::LinearReading& l) const {
  ReportLine r;
  fill(r, l);
  r.trend = l.trend, r.plunge = l.plunge, r.kind = l.kind;
  return r;
}

void ReportIndexer::count(ReportData& d, const store::ContactPoint& p) {
  const std::string day = date_of(p.time);
  d.points.by_day_observer[{day, p.observer}]++;
  if (!day.empty()) {
    if (d.points.first_day.empty() || day < d.points.first_day) d.points.first_day = day;
    if (d.points.last_day.empty() || day > d.points.last_day) d.points.last_day = day;
  }
  d.lat_sum += p.lat, d.lon_sum += p.lon, ++d.positions;
}

void write_report_html(std::ostream& o, const ReportData& d) {
  const Index ix(d);
  const std::string name = d.info.name.empty() ? std::string("Cairn project") : d.info.name;
  o << "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
    << "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
    << "<title>" << esc(name) << " – field report</title>\n<style>" << kCss << "</style>\n</head>\n<body>\n";
  o << "<header><h1>" << esc(name) << "</h1>\n<p class=\"meta\">Field report from " << esc(d.file) << " · generated "
    << esc(d.generated) << " by Cairn";
  if (!d.info.utm_zone.empty()) o << " · UTM zone " << esc(d.info.utm_zone);
  o << "</p></header>\n";
  write_summary(o, d, ix);
  write_declination(o, d);
  write_flags(o, d);
  write_plan(o, d, ix);
  write_fits(o, d, ix);
  write_unit_nets(o, d, ix);
  write_contact_nets(o, d, ix);
  write_photos(o, d, ix);
  o << "<footer>Nets: " << (d.net == geo::NetKind::EqualArea ? "equal-area (Schmidt)" : "equal-angle (Wulff)")
    << ", lower hemisphere. Kamb (1959) contours at 2σ steps where a unit has 5 or more poles of one kind; "
       "Fisher (1953) mean with α95 and κ for clusters, π-girdle and β with a bootstrap 95% cone when Woodcock's "
       "(1977) K is below 1.</footer>\n";
  o << "</body>\n</html>\n";
}

}  // namespace cairn::cli
