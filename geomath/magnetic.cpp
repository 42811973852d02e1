// World Magnetic Model evaluator.
//
// References (equation numbers as in the WMM Technical Reports, NOAA NCEI and
// BGS, the 2015-2025 editions share the layout; numbering is value from memory):
//   eq. 2   V = a sum_n (a/r)^(n+1) sum_m (g cos m.lambda + h sin m.lambda) P~_n^m(sin phi')
//   eq. 3-5 Schmidt semi-normalised associated Legendre functions P~_n^m
//   eq. 7-8 geodetic -> geocentric (spherical) coordinates on WGS84
//   eq. 9   g(t) = g(t0) + (t - t0) g_dot(t0), likewise h
//   eq. 10-12 X', Y', Z' in the geocentric frame (north, east, down)
//   eq. 16  rotation of X', Z' into the ellipsoidal (geodetic) frame
//   eq. 18  H, F, I, D from X, Y, Z
// The Legendre recursions are the usual ones for Schmidt semi-normalised
// functions (Langel 1987, "The main field", in Jacobs (ed.), Geomagnetism
// vol. 1, ch. 4; value from memory).
#include "geomath/magnetic.h"

#include <cctype>
#include <charconv>
#include <cmath>
#include <sstream>
#include <stdexcept>

#include "geomath/angles.h"

namespace cairn::geo {

namespace {

// WGS84 ellipsoid (NIMA TR8350.2) and the WMM reference radius (WMM report, Table 1;
// value from memory).
constexpr double kWgs84A = 6378137.0;                   // semi-major axis, m
constexpr double kWgs84F = 1.0 / 298.257223563;         // flattening
constexpr double kWgs84E2 = kWgs84F * (2.0 - kWgs84F);  // first eccentricity squared
constexpr double kGeomagneticRadius = 6371200.0;        // a, mean Earth radius, m

// Splits a line into whitespace-separated fields.
std::vector<std::string_view> fields(std::string_view line) {
  std::vector<std::string_view> out;
  size_t i = 0;
  while (i < line.size()) {
    while (i < line.size() && std::isspace(static_cast<unsigned char>(line[i]))) ++i;
    size_t j = i;
    while (j < line.size() && !std::isspace(static_cast<unsigned char>(line[j]))) ++j;
    if (j > i) out.push_back(line.substr(i, j - i));
    i = j;
  }
  return out;
}

bool to_double(std::string_view s, double& v) {
  if (!s.empty() && s.front() == '+') s.remove_prefix(1);
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  return ec == std::errc() && p == s.data() + s.size() && std::isfinite(v);
}

bool to_int(std::string_view s, int& v) {
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  return ec == std::errc() && p == s.data() + s.size();
}

bool all_nines(std::string_view s) {
  if (s.size() < 4) return false;
  for (char c : s)
    if (c != '9') return false;
  return true;
}

std::string at_line(size_t line_no) { return "coefficients line " + std::to_string(line_no) + ": "; }

}  // namespace

Result<MagneticModel> MagneticModel::parse(std::string_view text) {
  using R = Result<MagneticModel>;
  MagneticModel model;
  // Degree 12 for WMM; the layout allows any degree, read until the 9s line.
  constexpr int kMaxDegree = 720;
  int expect_n = 1, expect_m = 0;
  bool have_header = false, closed = false;
  size_t line_no = 0;
  size_t pos = 0;
  while (pos < text.size() && !closed) {
    size_t eol = text.find('\n', pos);
    std::string_view line = text.substr(pos, eol == std::string_view::npos ? text.size() - pos : eol - pos);
    pos = eol == std::string_view::npos ? text.size() : eol + 1;
    ++line_no;
    auto f = fields(line);
    if (f.empty()) continue;
    if (!have_header) {
      // "    2025.0            WMM-2025     11/13/2024"
      if (f.size() < 2 || !to_double(f[0], model.epoch_))
        return R::failure(at_line(line_no) + "expected a header 'EPOCH NAME DATE', got '" + std::string(line) + "'");
      if (model.epoch_ < 1900.0 || model.epoch_ > 2200.0)
        return R::failure(at_line(line_no) + "epoch " + std::string(f[0]) + " is not a plausible year");
      for (char c : f[1])
        if (c != '-' && c != '_') model.name_ += c;
      have_header = true;
      continue;
    }
    if (all_nines(f[0])) {
      closed = true;
      break;
    }
    if (f.size() != 6)
      return R::failure(at_line(line_no) + "expected 6 fields 'n m g h g_dot h_dot', got " + std::to_string(f.size()));
    int n = 0, m = 0;
    if (!to_int(f[0], n) || !to_int(f[1], m))
      return R::failure(at_line(line_no) + "degree and order must be whole numbers, got '" + std::string(f[0]) + " " +
                        std::string(f[1]) + "'");
    if (n != expect_n || m != expect_m)
      return R::failure(at_line(line_no) + "expected n=" + std::to_string(expect_n) + " m=" + std::to_string(expect_m) +
                        ", got n=" + std::to_string(n) + " m=" + std::to_string(m));
    double v[4];
    static const char* names[4] = {"g", "h", "g_dot", "h_dot"};
    for (int k = 0; k < 4; ++k)
      if (!to_double(f[2 + k], v[k]))
        return R::failure(at_line(line_no) + "bad number '" + std::string(f[2 + k]) + "' for " + names[k] +
                          " (n=" + std::to_string(n) + " m=" + std::to_string(m) + ")");
    int idx = index(n, m);
    if (static_cast<int>(model.g_.size()) <= idx) {
      size_t sz = static_cast<size_t>(index(n + 1, 0));
      model.g_.resize(sz, 0.0);
      model.h_.resize(sz, 0.0);
      model.gdot_.resize(sz, 0.0);
      model.hdot_.resize(sz, 0.0);
    }
    model.g_[idx] = v[0];
    model.h_[idx] = v[1];
    model.gdot_[idx] = v[2];
    model.hdot_[idx] = v[3];
    if (m == n) {
      model.nmax_ = n;
      ++expect_n;
      expect_m = 0;
      if (expect_n > kMaxDegree) return R::failure(at_line(line_no) + "degree beyond " + std::to_string(kMaxDegree));
    } else {
      ++expect_m;
    }
  }
  if (!have_header) return R::failure("coefficients: empty text, no header line");
  if (!closed) {
    std::ostringstream os;
    os << "coefficients line " << line_no << ": text ends before the closing line of 9s";
    if (expect_m != 0) os << " (degree " << expect_n << " stops at order " << expect_m - 1 << ")";
    return R::failure(os.str());
  }
  if (expect_m != 0)
    return R::failure(at_line(line_no) + "degree " + std::to_string(expect_n) +
                      " is incomplete (expected order m=" + std::to_string(expect_m) + ")");
  if (model.nmax_ < 1) return R::failure(at_line(line_no) + "no coefficients before the closing line");
  return model;
}

bool MagneticModel::in_validity(double t) const { return t >= valid_from() && t <= valid_to(); }

MagneticField MagneticModel::evaluate(double lat_deg, double lon_deg, double height_m, double t) const {
  if (!std::isfinite(lat_deg) || !std::isfinite(lon_deg) || !std::isfinite(height_m) || !std::isfinite(t))
    throw std::domain_error("magnetic field: latitude, longitude, height and date must be finite");
  if (lat_deg < -90.0 || lat_deg > 90.0)
    throw std::domain_error("magnetic field: latitude " + std::to_string(lat_deg) + " is outside -90..90");

  // eq. 7-8: geodetic (phi, h) -> geocentric radius r and latitude phi'.
  const double phi = deg2rad(lat_deg);
  const double lambda = deg2rad(lon_deg);
  const double sin_phi = std::sin(phi), cos_phi = std::cos(phi);
  const double rc = kWgs84A / std::sqrt(1.0 - kWgs84E2 * sin_phi * sin_phi);
  const double p = (rc + height_m) * cos_phi;
  const double z = (rc * (1.0 - kWgs84E2) + height_m) * sin_phi;
  const double r = std::hypot(p, z);
  const double phi_c = std::atan2(z, p);
  // With theta the geocentric colatitude: x = cos(theta) = sin(phi'), s = sin(theta) = cos(phi').
  const double x = std::sin(phi_c);
  const double s = std::cos(phi_c);

  // eq. 3-5 by recursion: P[n,m] = P~_n^m(x) and dP[n,m] = dP~_n^m/d(theta).
  //   P~_n^n = sqrt((2n-1)/(2n)) s P~_{n-1}^{n-1}     (n >= 2; P~_1^1 = s)
  //   P~_n^m = ((2n-1) x P~_{n-1}^m - sqrt((n-1)^2 - m^2) P~_{n-2}^m) / sqrt(n^2 - m^2)
  const int N = nmax_;
  std::vector<double> P(static_cast<size_t>(index(N + 1, 0)), 0.0), dP(P.size(), 0.0);
  P[index(0, 0)] = 1.0;
  dP[index(0, 0)] = 0.0;
  for (int n = 1; n <= N; ++n) {
    const double k = n == 1 ? 1.0 : std::sqrt((2.0 * n - 1.0) / (2.0 * n));
    P[index(n, n)] = k * s * P[index(n - 1, n - 1)];
    dP[index(n, n)] = k * (x * P[index(n - 1, n - 1)] + s * dP[index(n - 1, n - 1)]);
    for (int m = 0; m < n; ++m) {
      const double a = (2.0 * n - 1.0) / std::sqrt(double(n * n - m * m));
      const double b = n - 1 > m ? std::sqrt(double((n - 1) * (n - 1) - m * m) / double(n * n - m * m)) : 0.0;
      const double p2 = n - 1 > m ? P[index(n - 2, m)] : 0.0;
      const double dp2 = n - 1 > m ? dP[index(n - 2, m)] : 0.0;
      P[index(n, m)] = a * x * P[index(n - 1, m)] - b * p2;
      dP[index(n, m)] = a * (x * dP[index(n - 1, m)] - s * P[index(n - 1, m)]) - b * dp2;
    }
  }

  // At a geographic pole cos(phi') -> 0 and eq. 11 divides by it. As in the WMM
  // software's pole branch, take the limit instead: only order m = 1 survives,
  // with P~_n^1(x)/s -> sqrt(2/(n(n+1))) dP_n/dx at x = +-1
  //                  = sqrt(n(n+1)/2) (+-1)^(n+1)   (since P_n'(1) = n(n+1)/2).
  constexpr double kPoleEps = 1e-10;
  const bool at_pole = std::abs(s) < kPoleEps;

  // eq. 9 (time), eq. 10-12 (field in the geocentric frame).
  const double dt = t - epoch_;
  double Xp = 0, Yp = 0, Zp = 0;
  const double ratio = kGeomagneticRadius / r;
  double ratio_pow = ratio * ratio;  // (a/r)^(n+2) starts at n = 0
  for (int n = 1; n <= N; ++n) {
    ratio_pow *= ratio;
    double sx = 0, sy = 0, sz = 0;
    for (int m = 0; m <= n; ++m) {
      const int i = index(n, m);
      const double g = g_[i] + dt * gdot_[i];
      const double h = h_[i] + dt * hdot_[i];
      const double cm = std::cos(m * lambda), sm = std::sin(m * lambda);
      const double gh_c = g * cm + h * sm;
      // X' = -sum (a/r)^(n+2) (g cos + h sin) dP~/dphi', and dP~/dphi' = -dP~/dtheta.
      sx += gh_c * dP[i];
      sz += gh_c * P[i];
      if (!at_pole) {
        sy += m * (g * sm - h * cm) * P[i];
      } else if (m == 1) {
        const double sign = (x > 0 || (n + 1) % 2 == 0) ? 1.0 : -1.0;
        sy += (g * sm - h * cm) * sign * std::sqrt(n * (n + 1) / 2.0);
      }
    }
    Xp += ratio_pow * sx;
    Yp += ratio_pow * sy;
    Zp -= (n + 1) * ratio_pow * sz;
  }
  if (!at_pole) Yp /= s;

  // eq. 16: rotate from the geocentric to the ellipsoidal frame.
  const double psi = phi_c - phi;
  MagneticField out{};
  out.X = Xp * std::cos(psi) - Zp * std::sin(psi);
  out.Y = Yp;
  out.Z = Xp * std::sin(psi) + Zp * std::cos(psi);
  // eq. 18: the derived elements.
  out.H = std::hypot(out.X, out.Y);
  out.F = std::hypot(out.H, out.Z);
  out.inclination = rad2deg(std::atan2(out.Z, out.H));
  out.declination = rad2deg(std::atan2(out.Y, out.X));
  return out;
}

}  // namespace cairn::geo
