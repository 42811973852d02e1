// `cairn fit POINTS.csv`: the best-fit plane through points on a contact (the
// three-point / strike-line method generalised to N points), with its
// uncertainty, quality and strike-line spacing.
#include <cerrno>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <iostream>
#include <map>
#include <sstream>
#include <string>
#include <vector>
#include <fmt/printf.h>

#include "app/cli/command.h"
#include "formats/json.h"
#include "geomath/angles.h"
#include "geomath/geodesy.h"
#include "geomath/notation.h"
#include "geomath/plane_fit.h"
#include "geomath/strike_lines.h"
#include "formats/csv.h"
#include "geomath/decimal.h"

namespace cairn::cli {

using namespace cairn::formats;  // file formats and value rules (formats/)
namespace {

using geo::FitPoint;

const char* kColumns = "easting,northing,elevation or lat,lon,elevation, optionally h_accuracy,v_accuracy (metres)";

struct Input {
  std::vector<FitPoint> points;
  std::vector<int> lines;        // file line of each point
  std::vector<geo::LatLon> geo;  // when given as lat/lon
  bool latlon = false;
  bool accuracies = false;
  std::optional<geo::UtmZone> zone;
};

std::string lower(std::string s) {
  for (auto& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

// A decimal number taking the whole field (geomath/decimal.h has the rules).
std::optional<double> parse_number(const std::string& s) { return geo::parse_decimal(s); }

// The columns of a points file, by header name, checked for the combinations
// `cairn fit` understands. On failure the message names the file and line 1.
using Columns = std::map<std::string, int>;

Result<Columns> locate_columns(const std::vector<std::string>& header, const std::string& path,
                               const std::optional<geo::UtmZoneSpec>& utm) {
  using R = Result<Columns>;
  static const char* known[] = {"easting", "northing", "elevation", "lat", "lon", "h_accuracy", "v_accuracy"};
  Columns col;
  for (size_t i = 0; i < header.size(); ++i) {
    const std::string name = lower(header[i]);
    bool ok = false;
    for (const char* k : known) ok = ok || name == k;
    if (!ok) return R::failure(path + ":1: unknown column '" + header[i] + "' (expected " + kColumns + ")");
    if (col.count(name)) return R::failure(path + ":1: column '" + name + "' appears twice");
    col[name] = static_cast<int>(i);
  }
  const bool en = col.count("easting") || col.count("northing");
  const bool ll = col.count("lat") || col.count("lon");
  if (en && ll) return R::failure(path + ":1: give either easting,northing or lat,lon, not both");
  if (!en && !ll) return R::failure(path + ":1: no position columns (expected " + kColumns + ")");
  for (const char* need : en ? std::vector<const char*>{"easting", "northing", "elevation"}
                             : std::vector<const char*>{"lat", "lon", "elevation"})
    if (!col.count(need)) return R::failure(path + ":1: missing column '" + need + "'");
  if (col.count("h_accuracy") != col.count("v_accuracy"))
    return R::failure(path + ":1: column '" + std::string(col.count("h_accuracy") ? "h_accuracy" : "v_accuracy") +
                      "' needs its partner '" + std::string(col.count("h_accuracy") ? "v_accuracy" : "h_accuracy") +
                      "'");
  if (utm && !ll) return R::failure("--utm applies only to lat,lon input; this file gives easting,northing");
  return col;
}

// One row of a points file into `in` (a point, its line, its lat/lon); sets
// `accuracies_given` when the row states accuracies. Failure: "FILE:LINE: ...".
std::optional<std::string> read_row(const std::vector<std::string>& row, int line, const Columns& col,
                                    const std::string& path, Input& in, bool& accuracies_given) {
  auto number = [&](const char* name, double& out) -> std::optional<std::string> {
    const std::string& s = row[static_cast<size_t>(col.at(name))];
    auto v = parse_number(s);
    if (!v)
      return path + ":" + std::to_string(line) + ": column " + name + ": " +
             (s.empty() ? std::string("empty") : "'" + s + "' is not a number");
    out = *v;
    return std::nullopt;
  };
  FitPoint p;
  double a = 0, b = 0;
  if (auto e = number(in.latlon ? "lat" : "easting", a)) return e;
  if (auto e = number(in.latlon ? "lon" : "northing", b)) return e;
  if (auto e = number("elevation", p.z)) return e;
  if (in.latlon) {
    if (a < -90 || a > 90)
      return path + ":" + std::to_string(line) + ": column lat: " + geo::format_decimal("%g", a) +
             " is outside -90..90";
    if (b < -180 || b > 180)
      return path + ":" + std::to_string(line) + ": column lon: " + geo::format_decimal("%g", b) +
             " is outside -180..180";
    in.geo.push_back(geo::LatLon{a, b});
  } else {
    p.e = a;
    p.n = b;
  }
  accuracies_given = false;
  if (in.accuracies) {
    const std::string& hs = row[static_cast<size_t>(col.at("h_accuracy"))];
    const std::string& vs = row[static_cast<size_t>(col.at("v_accuracy"))];
    if (!hs.empty() || !vs.empty()) {
      for (const char* name : {"h_accuracy", "v_accuracy"}) {
        double v = 0;
        if (auto e = number(name, v)) return e;
        if (v <= 0)
          return path + ":" + std::to_string(line) + ": column " + name + ": must be greater than 0 metres, not " +
                 geo::format_decimal("%g", v);
        (std::string(name) == "h_accuracy" ? p.h_acc : p.v_acc) = v;
      }
      accuracies_given = true;
    }
  }
  in.points.push_back(p);
  in.lines.push_back(line);
  return std::nullopt;
}

// Lat/lon points into UTM metres: the standard zone of the mean position unless
// --utm names one. Failure names the first point that cannot be projected.
std::optional<std::string> project_to_utm(Input& in, const std::string& path,
                                          const std::optional<geo::UtmZoneSpec>& utm) {
  auto chosen = geo::utm_zone_for(in.geo);
  if (!chosen) {
    for (size_t i = 0; i < in.geo.size(); ++i)
      if (auto z = geo::utm_zone_for(in.geo[i]); !z) return path + ":" + std::to_string(in.lines[i]) + ": " + z.error();
    return path + ": " + chosen.error();
  }
  geo::UtmZone zone = *chosen;
  if (utm) {
    zone.zone = utm->zone;
    if (utm->northp) zone.northp = *utm->northp;
  }
  in.zone = zone;
  for (size_t i = 0; i < in.geo.size(); ++i) {
    auto u = geo::to_utm(in.geo[i], zone);
    if (!u) return path + ":" + std::to_string(in.lines[i]) + ": " + u.error();
    in.points[i].e = u->easting;
    in.points[i].n = u->northing;
  }
  return std::nullopt;
}

// Reads and checks the CSV; on failure returns the message ("FILE:LINE: ...").
Result<Input> read_points(const std::string& path, std::optional<geo::UtmZoneSpec> utm) {
  using R = Result<Input>;
  std::ifstream f(path, std::ios::binary);
  if (!f) return R::failure(path + ": cannot open the file");
  std::stringstream ss;
  ss << f.rdbuf();
  auto table = formats::parse_csv(ss.str(), path);
  if (!table) return R::failure(table.error());
  const auto& t = *table;
  auto col = locate_columns(t.header, path, utm);
  if (!col) return R::failure(col.error());

  Input in;
  in.latlon = col->count("lat") > 0;
  in.accuracies = col->count("h_accuracy") > 0;
  int blank_line = 0, given_line = 0;  // the first row without and with accuracies
  for (size_t r = 0; r < t.rows.size(); ++r) {
    bool given = false;
    if (auto e = read_row(t.rows[r], t.row_lines[r], *col, path, in, given)) return R::failure(*e);
    int& first = given ? given_line : blank_line;
    if (in.accuracies && !first) first = t.row_lines[r];
  }
  if (blank_line && given_line)
    return R::failure(path + ":" + std::to_string(blank_line) +
                      ": columns h_accuracy,v_accuracy are blank while line " + std::to_string(given_line) +
                      " gives them; give accuracies for every point or for none");
  if (blank_line) in.accuracies = false;
  if (in.latlon && !in.geo.empty())
    if (auto e = project_to_utm(in, path, utm)) return R::failure(*e);
  return in;
}

struct FitArgs {
  std::string path;
  bool json = false;
  std::optional<std::string> interval, utm;
};

// The fitted plane as reported: against true north for lat/lon input (the fit
// lives in UTM grid metres, so azimuths gain the meridian convergence and tan(dip)
// the scale factor at the centroid); easting/northing input stays against grid north.
struct Oriented {
  geo::Plane plane;
  geo::Vec3 normal;
  std::optional<geo::GridFactors> factors;  // set for lat/lon input
};

Result<Oriented> orient(const Input& in, const geo::PlaneFit& fit) {
  Oriented o{fit.plane, fit.normal, std::nullopt};
  if (!in.zone) return o;
  if (auto c = geo::from_utm(geo::UtmPoint{in.zone->zone, in.zone->northp, fit.centroid.x(), fit.centroid.y()}))
    if (auto gf = geo::utm_grid_factors(*c, *in.zone)) o.factors = *gf;
  if (!o.factors) return Result<Oriented>::failure("cannot find the grid convergence at the points' centroid");
  o.normal = geo::grid_normal_to_true(fit.normal, *o.factors);
  o.plane = geo::plane_from_normal(o.normal);
  return o;
}

// What both reports show: the fit, oriented, with its strike lines.
struct FitReport {
  std::string path;
  const Input& in;
  const geo::PlaneFit& fit;
  geo::Plane plane;
  geo::Vec3 normal;
  std::optional<geo::GridFactors> factors;
  double interval;
  Result<double> spacing;
  Result<double> strike_az;
  size_t N;  // the number of points

  void print_json(std::ostream& out) const;
  void print_text(std::ostream& out) const;
};

void FitReport::print_json(std::ostream& out) const {
  JsonWriter j(out);
  j.begin_object();
  j.key("file").value(path);
  j.key("strike").value(plane.strike);
  j.key("dip").value(plane.dip);
  j.key("dip_direction").value(plane.dip_direction());
  j.key("strike_dip").value(geo::format_strike_dip(plane));
  j.key("quadrant").value(geo::format_quadrant(plane));
  j.key("north").value(in.zone ? "true" : "grid");
  j.key("normal").array(std::vector<double>{normal.x(), normal.y(), normal.z()});
  j.key("centroid").array(std::vector<double>{fit.centroid.x(), fit.centroid.y(), fit.centroid.z()});
  if (in.zone) {
    j.key("utm").begin_object();
    j.key("zone").value(in.zone->zone);
    j.key("hemisphere").value(in.zone->northp ? "N" : "S");
    j.key("convergence").value(factors->convergence);
    j.key("scale").value(factors->scale);
    j.end_object();
  } else {
    j.key("utm").null();
  }
  j.key("cone95").value(fit.cone95);
  j.key("cone_source").value(geo::cone_source_name(fit.cone_source));
  j.key("sigma_normal").value(fit.sigma_normal);
  j.key("cone95_known").value(fit.cone95_known);
  j.key("degrees_of_freedom").value(fit.dof);
  j.key("variance_factor").value(fit.variance_factor);
  j.key("interval_k95").value(fit.interval_k95);
  j.key("draws").value(fit.draws.size());
  j.key("weighted").value(fit.weighted);
  j.key("eigenvalues").array(std::vector<double>{fit.eigenvalues(0), fit.eigenvalues(1), fit.eigenvalues(2)});
  j.key("M").value(fit.M);
  j.key("K").value(fit.K);
  j.key("verdict").value(fit.verdict);
  j.key("weakness").value(fit.weakness);
  j.key("weak_geometry").value(fit.weak_geometry);
  j.key("not_planar").value(fit.not_planar);
  j.key("rms").value(fit.rms);
  j.key("misfit_ratio").value(fit.misfit_ratio);
  j.key("worst").begin_object();
  j.key("point").value(fit.worst_index + 1);
  j.key("line").value(in.lines[fit.worst_index]);
  j.key("residual").value(fit.worst_residual);
  j.end_object();
  j.key("interval").value(interval);
  if (strike_az)
    j.key("strike_line_azimuth").value(*strike_az);
  else
    j.key("strike_line_azimuth").null();
  if (spacing) {
    j.key("strike_line_spacing").value(*spacing);
    j.key("strike_line_note").null();
  } else {
    j.key("strike_line_spacing").null();
    j.key("strike_line_note").value(spacing.error());
  }
  j.key("points").begin_array();
  for (size_t i = 0; i < N; ++i) {
    const auto& p = in.points[i];
    j.begin_object();
    j.key("line").value(in.lines[i]);
    if (in.latlon) {
      j.key("lat").value(in.geo[i].lat);
      j.key("lon").value(in.geo[i].lon);
    }
    j.key("easting").value(p.e);
    j.key("northing").value(p.n);
    j.key("elevation").value(p.z);
    if (in.accuracies) {
      j.key("h_accuracy").value(p.h_acc);
      j.key("v_accuracy").value(p.v_acc);
    }
    j.key("residual").value(fit.residuals[i]);
    j.end_object();
  }
  j.end_array();
  j.end_object();
  out << "\n";
}

void FitReport::print_text(std::ostream& out) const {
  auto row = [&](const std::string& label, const std::string& value) {
    // Pad by characters, not bytes (labels may hold UTF-8 such as "á").
    size_t chars = 0;
    for (unsigned char ch : label) chars += (ch & 0xC0) != 0x80;
    out << "  " << label << ":" << std::string(chars < 30 ? 30 - chars : 1, ' ') << value << "\n";
  };
  out << "Best-fit plane through " << N << " points of " << path << " (total least squares, "
      << (fit.weighted ? "weighted by the points' accuracies" : "unweighted") << ")\n";
  row("Strike/dip (right-hand rule)", geo::format_strike_dip(plane));
  row("Quadrant notation", geo::format_quadrant(plane));
  row("Dip direction/dip", geo::format_dip_direction(plane));
  if (fit.cone95) {
    const std::string from =
        fit.cone_source == geo::ConeSource::Accuracies
            ? "from the stated accuracies"
            : "from the residual scatter, " + geo::format_decimal("%.3g", *fit.sigma_normal) + " m";
    row("95% confidence cone", geo::format_decimal("%.2f", *fit.cone95) + "° (Monte Carlo, " +
                                   std::to_string(fit.draws.size()) + " draws, " + from + ")");
    if (fit.dof > 0 && fit.cone95_known)
      row("Small-sample correction",
          "x" + geo::format_decimal("%.2f", fit.cone_scale) + " of " + geo::format_decimal("%.2f", *fit.cone95_known) +
              "° (F and t quantiles for " + std::to_string(fit.dof) + " degrees of freedom" +
              (fit.cone_source == geo::ConeSource::Accuracies
                   ? ", accuracies scaled by " + geo::format_decimal("%.2f", fit.variance_factor) +
                         " from the residuals)"
                   : ")"));
  } else {
    row("95% confidence cone", "unknown (the points fit exactly and carry no accuracies)");
  }
  row("Fernández M, K", (fit.M ? geo::format_decimal("%.2f", *fit.M) : std::string("unbounded")) + ", " +
                            (fit.K ? geo::format_decimal("%.2f", *fit.K) : std::string("-")) +
                            (fit.M ? "" : " (points exactly coplanar)"));
  row("Verdict", fit.verdict);
  row("RMS residual", geo::format_decimal("%.3f", fit.rms) + " m");
  if (fit.misfit_ratio) row("Residuals / stated accuracy", geo::format_decimal("%.2f", *fit.misfit_ratio));
  if (fit.weakness) out << "  " << *fit.weakness << "\n";
  if (in.zone)
    out << "  Azimuths against true north (UTM zone " << in.zone->zone << (in.zone->northp ? "N" : "S")
        << ", grid convergence " << geo::format_decimal("%+.4f", factors->convergence) << "°, scale "
        << geo::format_decimal("%.6f", factors->scale) << ").\n";
  else
    out << "  Azimuths against grid north (the file gives easting/northing).\n";

  out << "\nResiduals (perpendicular distance to the plane, + above it, metres):\n";
  out << fmt::sprintf("  %5s %5s %14s %14s %10s %9s\n", "point", "line", "easting", "northing", "elevation",
                      "residual");
  for (size_t i = 0; i < N; ++i) {
    const auto& p = in.points[i];
    out << fmt::sprintf("  %5d %5d %14.3f %14.3f %10.3f %+9.3f%s\n", i + 1, in.lines[i], p.e, p.n, p.z,
                        fit.residuals[i], i == fit.worst_index && N > 3 ? "  worst" : "");
  }
  out << "\nStrike lines: ";
  if (spacing && strike_az)
    out << "azimuth " << geo::format_quadrant_azimuth(*strike_az) << " (" << geo::format_decimal("%05.1f", *strike_az)
        << "), " << geo::format_decimal("%.1f", *spacing) << " m apart horizontally for a "
        << geo::format_decimal("%g", interval) << " m contour interval\n";
  else
    out << (spacing ? strike_az.error() : spacing.error()) << "\n";
}

int run_fit(const FitArgs& a, std::ostream& out, std::ostream& err) {
  double interval = 100.0;
  if (const auto& v = a.interval) {
    auto d = parse_number(*v);
    if (!d || *d <= 0) throw std::invalid_argument("--interval must be a positive number of metres, not '" + *v + "'");
    interval = *d;
  }
  std::optional<geo::UtmZoneSpec> utm;
  if (const auto& v = a.utm) {
    auto z = geo::parse_utm_zone(*v);
    if (!z) throw std::invalid_argument("--utm: " + z.error());
    utm = *z;
  }
  auto input = read_points(a.path, utm);
  if (!input) {
    err << "cairn fit: " << input.error() << "\n";
    return 1;
  }
  auto fitted = geo::fit_plane(input->points);
  if (!fitted) {
    err << "cairn fit: " << a.path << ": " << fitted.error() << "\n";
    return 1;
  }
  auto oriented = orient(*input, *fitted);
  if (!oriented) {
    err << "cairn fit: " << a.path << ": " << oriented.error() << "\n";
    return 1;
  }
  const FitReport report{a.path,
                         *input,
                         *fitted,
                         oriented->plane,
                         oriented->normal,
                         oriented->factors,
                         interval,
                         geo::strike_line_spacing(oriented->plane, interval),
                         geo::strike_line_azimuth(oriented->plane),
                         fitted->count};
  if (a.json)
    report.print_json(out);
  else
    report.print_text(out);
  return 0;
}

Runner define(CLI::App& app) {
  auto a = std::make_shared<FitArgs>();
  positional(app, "POINTS.csv", a->path, std::string("a CSV with columns ") + kColumns);
  option(app, "--interval", a->interval, "contour interval in metres for the strike lines (default 100)");
  option(app, "--utm", a->utm, "the UTM zone of lat/lon points, e.g. 33N (default: from the first point)");
  flag(app, "--json", a->json, "print JSON");
  return [a](std::ostream& out, std::ostream& err) { return run_fit(*a, out, err); };
}

}  // namespace

CAIRN_COMMAND(Command{"fit", "best-fit plane through points on a contact: strike/dip, 95% cone, quality, strike lines",
                      define});

}  // namespace cairn::cli
