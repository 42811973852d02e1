// The World Magnetic Model (WMM): a spherical-harmonic model of the Earth's
// main magnetic field and its secular variation, as published by NOAA NCEI and
// the British Geological Survey (WMM2025 Technical Report). Cairn uses it for
// the declination to set on a compass (magnetic north -> true north).
//
// Pure computation: the caller reads the coefficient file (the model's usual
// ".cof" text layout) and hands its text to MagneticModel::parse.
#pragma once
#include <string>
#include <string_view>
#include <vector>

#include "geomath/calendar.h"  // decimal_year: the time the model is evaluated at
#include "geomath/result.h"

namespace cairn::geo {

// The field at a point, in the local geodetic frame (north, east, down).
struct MagneticField {
  double declination;  // D, degrees east of true north (east positive)
  double inclination;  // I, degrees below the horizontal (down positive)
  double X;            // north component, nT
  double Y;            // east component, nT
  double Z;            // down component, nT
  double H;            // horizontal intensity, nT
  double F;            // total intensity, nT
};

// One set of Gauss coefficients with their secular variation, e.g. WMM2025.
class MagneticModel {
 public:
  // Parses the coefficient text: a header line "EPOCH NAME DATE", then one line
  // "n m g h g_dot h_dot" per degree n >= 1 and order 0 <= m <= n, in order,
  // closed by a line of 9s. Fails naming the offending line.
  static Result<MagneticModel> parse(std::string_view cof_text);

  // The field at a geodetic point on WGS84 (latitude in [-90, 90], any
  // longitude, height above the ellipsoid in metres) at a decimal year.
  // Works outside the validity interval too (the caller decides whether to
  // warn). Throws std::domain_error for a latitude beyond +-90 or a
  // non-finite argument.
  MagneticField evaluate(double lat_deg, double lon_deg, double height_m_above_ellipsoid, double decimal_year) const;

  double epoch() const { return epoch_; }
  double valid_from() const { return epoch_; }
  // The WMM is issued for five years from its epoch (WMM2025 Technical Report).
  double valid_to() const { return epoch_ + 5.0; }
  // The model's name without punctuation, e.g. "WMM2025" for "WMM-2025".
  std::string name() const { return name_; }
  int degree() const { return nmax_; }
  bool in_validity(double decimal_year) const;

 private:
  MagneticModel() = default;
  static int index(int n, int m) { return n * (n + 1) / 2 + m; }  // triangular storage
  double epoch_ = 0;
  std::string name_;
  int nmax_ = 0;
  std::vector<double> g_, h_, gdot_, hdot_;  // index(n, m), n from 0 (n = 0 unused)
};

}  // namespace cairn::geo
