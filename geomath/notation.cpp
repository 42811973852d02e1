#include "geomath/notation.h"

#include <cctype>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <vector>

#include "geomath/angles.h"
#include "geomath/decimal.h"

namespace cairn::geo {

namespace {

// Text normalised for scanning: upper case, degree signs removed (° and º in
// UTF-8, and the ASCII stand-in 'd' is NOT accepted: it would hide typos).
std::string normalise(std::string_view in) {
  std::string out;
  for (size_t i = 0; i < in.size(); ++i) {
    const unsigned char c = static_cast<unsigned char>(in[i]);
    if (c == 0xC2 && i + 1 < in.size() &&
        (static_cast<unsigned char>(in[i + 1]) == 0xB0 || static_cast<unsigned char>(in[i + 1]) == 0xBA)) {
      out += ' ';
      ++i;
      continue;
    }
    out += static_cast<char>(std::toupper(c));
  }
  return out;
}

std::string quoted(std::string_view s) { return "'" + std::string(s) + "'"; }

// A left-to-right scanner over normalised text.
class Scanner {
 public:
  explicit Scanner(std::string s) : s_(std::move(s)) {}
  void skip_space() {
    while (i_ < s_.size() && std::isspace(static_cast<unsigned char>(s_[i_]))) ++i_;
  }
  // Skips blanks and at most one '/' or ','.
  void skip_separator() {
    skip_space();
    if (i_ < s_.size() && (s_[i_] == '/' || s_[i_] == ',')) ++i_;
    skip_space();
  }
  bool at_end() {
    skip_space();
    return i_ >= s_.size();
  }
  char peek() const { return i_ < s_.size() ? s_[i_] : '\0'; }
  char peek2() const { return i_ + 1 < s_.size() ? s_[i_ + 1] : '\0'; }
  void advance() { ++i_; }
  std::string rest() const { return s_.substr(i_); }
  // A plain decimal number: digits with at most one point; no sign, exponent, NaN or inf.
  std::optional<double> number() {
    size_t j = i_;
    bool digits = false, point = false;
    while (j < s_.size()) {
      const char c = s_[j];
      if (std::isdigit(static_cast<unsigned char>(c)))
        digits = true;
      else if (c == '.' && !point)
        point = true;
      else
        break;
      ++j;
    }
    if (!digits) return std::nullopt;
    const auto v = parse_decimal(std::string_view(s_).substr(i_, j - i_));
    if (!v) return std::nullopt;
    i_ = j;
    return *v;
  }
  // The run of compass letters N, E, S, W at the cursor.
  std::string letters() {
    std::string out;
    while (i_ < s_.size() && std::string("NESW").find(s_[i_]) != std::string::npos) out += s_[i_++];
    return out;
  }
  // Whatever word stands at the cursor (for error messages).
  std::string word() const {
    size_t j = i_;
    while (j < s_.size() && !std::isspace(static_cast<unsigned char>(s_[j])) && s_[j] != '/') ++j;
    return s_.substr(i_, j - i_);
  }

 private:
  std::string s_;
  size_t i_ = 0;
};

// Azimuth of compass letters: "N" 0, "NE" 45, "E" 90 ... ; nullopt when not a compass point.
std::optional<double> compass_azimuth(const std::string& l) {
  static const std::pair<const char*, double> table[] = {{"N", 0},   {"NE", 45},  {"E", 90},  {"SE", 135},
                                                         {"S", 180}, {"SW", 225}, {"W", 270}, {"NW", 315}};
  for (const auto& [name, az] : table)
    if (l == name) return az;
  return std::nullopt;
}

// Strike-line azimuth of quadrant text "N30E": first letter N or S, angle 0..90, then E or W.
Result<double> read_quadrant_azimuth(Scanner& sc, const char* what) {
  const char from = sc.peek();
  sc.advance();
  sc.skip_space();
  const std::string w = sc.word();
  const auto a = sc.number();
  if (!a)
    return Result<double>::failure(std::string(what) + ": expected an angle after " + from + ", found " + quoted(w));
  sc.skip_space();
  const char to = sc.peek();
  if (to != 'E' && to != 'W')
    return Result<double>::failure(std::string(what) + ": quadrant bearing " + quoted(std::string(1, from) + w) +
                                   " must end in E or W");
  sc.advance();
  if (*a > 90.0) {
    char buf[96];
    std::snprintf(buf, sizeof buf, "%s: quadrant angle %g is out of range: 0 to 90", what, *a);
    return Result<double>::failure(buf);
  }
  if (from == 'N') return wrap360(to == 'E' ? *a : 360.0 - *a);
  return to == 'E' ? 180.0 - *a : 180.0 + *a;
}

Result<double> read_number(Scanner& sc, const char* what, double lo, double hi) {
  sc.skip_space();
  const std::string w = sc.word();
  if (w.empty()) return Result<double>::failure(std::string("missing ") + what);
  const auto v = sc.number();
  if (!v) return Result<double>::failure(std::string(what) + " " + quoted(w) + " is not a number");
  if (*v < lo || *v > hi) {
    char buf[128];
    std::snprintf(buf, sizeof buf, "%s %g is out of range: %g to %g", what, *v, lo, hi);
    return Result<double>::failure(buf);
  }
  return *v;
}

std::string trailing_junk(Scanner& sc, const char* after) {
  if (sc.at_end()) return "";
  return "unexpected " + quoted(sc.rest()) + " after the " + after;
}

// Chooses the side of a strike line that the dip-quadrant letters name. Two
// letters name the quadrant the dip direction lies in, so they must point within
// 45 degrees of one of the two possible dip directions (strike +/- 90). A single
// letter only says which side of the strike line the beds dip to: "N30E 40S"
// is unambiguous (S lies on the south-east side), so it must point within 90
// degrees of one dip direction, and is refused only when it lies along the
// strike line itself ("N0E 40N").
Result<Plane> plane_with_quadrant(double strike_line, double dip, const std::string& letters,
                                  const std::string& strike_text) {
  const auto q = compass_azimuth(letters);
  if (!q)
    return Result<Plane>::failure("dip quadrant " + quoted(letters) +
                                  " is not a compass point (N, NE, E, SE, S, SW, W, NW)");
  const double d1 = wrap360(strike_line + 90.0), d2 = wrap360(strike_line - 90.0);
  const double e1 = std::abs(azimuth_difference(d1, *q)), e2 = std::abs(azimuth_difference(d2, *q));
  const double tol = letters.size() == 1 ? 90.0 - 1e-9 : 45.0 + 1e-9;
  if (std::min(e1, e2) > tol) {
    char buf[256];
    std::snprintf(
        buf, sizeof buf, "dip quadrant %s contradicts strike %s: a plane of that strike dips towards %s or %s",
        letters.c_str(), strike_text.c_str(), format_quadrant_azimuth(d1).c_str(), format_quadrant_azimuth(d2).c_str());
    return Result<Plane>::failure(buf);
  }
  return plane_from_dip_direction(e1 <= e2 ? d1 : d2, dip);
}

std::string fmt_angle(double v, int int_digits) {
  double r = std::round(v * 10.0) / 10.0;
  char buf[32];
  if (std::abs(r - std::round(r)) < 1e-9)
    std::snprintf(buf, sizeof buf, "%0*.0f", int_digits, r);
  else
    std::snprintf(buf, sizeof buf, "%0*.1f", int_digits + 2, r);
  return buf;
}

double round_azimuth(double az) { return wrap360(std::round(az * 10.0) / 10.0); }

// Compass letters for a dip direction: the nearest of the eight compass points
// (always within 22.5 degrees, so the parser's 45-degree rule reads it back).
std::string dip_letters(double dip_direction) {
  static const char* points[] = {"N", "NE", "E", "SE", "S", "SW", "W", "NW"};
  const int i = static_cast<int>(std::floor(round_azimuth(dip_direction) / 45.0 + 0.5)) % 8;
  return points[i];
}

bool is_quadrant_start(Scanner& sc) {
  const char c = sc.peek(), n = sc.peek2();
  return (c == 'N' || c == 'S') && (std::isdigit(static_cast<unsigned char>(n)) || n == ' ' || n == '.');
}

// What follows a plane's strike: a separator, the dip, optional dip-quadrant
// letters, and nothing else.
struct DipTail {
  double dip;
  std::string letters;
};
Result<DipTail> read_dip_tail(Scanner& sc) {
  sc.skip_separator();
  auto dip = read_number(sc, "dip", 0.0, 90.0);
  if (!dip) return Result<DipTail>::failure(dip.error());
  sc.skip_space();
  DipTail t{*dip, sc.letters()};
  if (auto junk = trailing_junk(sc, "dip"); !junk.empty()) return Result<DipTail>::failure(junk);
  return t;
}

}  // namespace

Result<double> parse_angle(std::string_view text, const char* what, double lo, double hi) {
  Scanner sc(normalise(text));
  if (sc.at_end()) return Result<double>::failure(std::string("empty ") + what);
  auto v = read_number(sc, what, lo, hi);
  if (!v) return v;
  if (auto junk = trailing_junk(sc, what); !junk.empty()) return Result<double>::failure(junk);
  return v;
}

Result<Plane> parse_plane(std::string_view text, PlaneConvention convention) {
  using R = Result<Plane>;
  Scanner sc(normalise(text));
  if (sc.at_end()) return R::failure("empty attitude: enter strike and dip, e.g. 030/40 or N30E 40SE");

  if (is_quadrant_start(sc)) {
    // Quadrant notation: strike line as a quadrant bearing, dip, dip quadrant.
    const std::string strike_text = sc.word();
    auto line = read_quadrant_azimuth(sc, "strike");
    if (!line) return R::failure(line.error());
    auto tail = read_dip_tail(sc);
    if (!tail) return R::failure(tail.error());
    const double* dip = &tail->dip;
    const std::string& letters = tail->letters;
    if (letters.empty()) {
      if (*dip == 0.0 || *dip == 90.0) return plane_from_dip_direction(*line + 90.0, *dip);
      return R::failure("quadrant notation needs the dip quadrant after the dip: " + strike_text + " " +
                        fmt_angle(*dip, 1) + dip_letters(*line + 90.0) + " or " + strike_text + " " +
                        fmt_angle(*dip, 1) + dip_letters(*line - 90.0) + "?");
    }
    return plane_with_quadrant(*line, *dip, letters, strike_text);
  }

  // Azimuth form: two numbers, optionally followed by a dip quadrant.
  sc.skip_space();
  const std::string first_text = sc.word();
  if (!std::isdigit(static_cast<unsigned char>(sc.peek())) && sc.peek() != '.')
    return R::failure("attitude " + quoted(text) +
                      " is not understood: expected strike/dip such as 030/40, or N30E 40SE");
  auto az = read_number(sc, convention == PlaneConvention::DipDirectionDip ? "dip direction" : "strike", 0.0, 360.0);
  if (!az) return R::failure(az.error());
  auto tail = read_dip_tail(sc);
  if (!tail) return R::failure(tail.error());
  const double* dip = &tail->dip;
  const std::string& letters = tail->letters;
  const double a = wrap360(*az);

  if (!letters.empty()) {
    if (convention == PlaneConvention::DipDirectionDip) {
      const auto q = compass_azimuth(letters);
      if (!q)
        return R::failure("dip quadrant " + quoted(letters) + " is not a compass point (N, NE, E, SE, S, SW, W, NW)");
      if (std::abs(azimuth_difference(a, *q)) > 45.0 + 1e-9)
        return R::failure("dip quadrant " + letters + " contradicts dip direction " + fmt_angle(a, 3));
      return plane_from_dip_direction(a, *dip);
    }
    // The number is read as the strike line (either end); the letters pick the side.
    return plane_with_quadrant(a, *dip, letters, fmt_angle(a, 3));
  }
  switch (convention) {
    case PlaneConvention::StrikeDipRHR: return Plane{a, *dip};
    case PlaneConvention::DipDirectionDip: return plane_from_dip_direction(a, *dip);
    case PlaneConvention::Unspecified: break;
  }
  const Plane as_strike{a, *dip};
  return R::failure("attitude " + quoted(text) + " is ambiguous: as strike/dip (right-hand rule) it dips " +
                    fmt_angle(*dip, 1) + " towards " + fmt_angle(as_strike.dip_direction(), 3) +
                    "; as dip direction/dip it dips " + fmt_angle(*dip, 1) + " towards " + fmt_angle(a, 3) +
                    ". Say which convention, or add the dip quadrant (e.g. " + first_text + "/" + fmt_angle(*dip, 1) +
                    dip_letters(as_strike.dip_direction()) + ")");
}

Result<Line> parse_line(std::string_view text) {
  using R = Result<Line>;
  Scanner sc(normalise(text));
  if (sc.at_end()) return R::failure("empty line attitude: enter trend/plunge, e.g. 120/35");
  double trend;
  if (is_quadrant_start(sc)) {
    auto t = read_quadrant_azimuth(sc, "trend");
    if (!t) return R::failure(t.error());
    trend = *t;
  } else {
    if (!std::isdigit(static_cast<unsigned char>(sc.peek())) && sc.peek() != '.')
      return R::failure("line attitude " + quoted(text) + " is not understood: expected trend/plunge such as 120/35");
    auto t = read_number(sc, "trend", 0.0, 360.0);
    if (!t) return R::failure(t.error());
    trend = *t;
  }
  sc.skip_separator();
  auto p = read_number(sc, "plunge", 0.0, 90.0);
  if (!p) return R::failure(p.error());
  if (auto junk = trailing_junk(sc, "plunge"); !junk.empty()) return R::failure(junk);
  return Line{wrap360(trend), *p};
}

Result<Line> parse_rake(std::string_view text, const Plane& host) {
  using R = Result<Line>;
  Scanner sc(normalise(text));
  if (sc.at_end()) return R::failure("empty rake: enter the rake in degrees, e.g. 40 or 40NE");
  auto r = read_number(sc, "rake", 0.0, 180.0);
  if (!r) return R::failure(r.error());
  sc.skip_space();
  const std::string letters = sc.letters();
  if (auto junk = trailing_junk(sc, "rake"); !junk.empty()) return R::failure(junk);
  if (letters.empty()) return line_from_rake(host, *r);
  // "40NE": measured from the end of the strike line that the letters name.
  if (*r > 90.0) return R::failure("a rake measured from a named strike end must be 0 to 90, not " + fmt_angle(*r, 1));
  const auto q = compass_azimuth(letters);
  if (!q) return R::failure("strike end " + quoted(letters) + " is not a compass point");
  const double along = std::abs(azimuth_difference(host.strike, *q));
  if (std::abs(along - 90.0) < 1e-9)
    return R::failure("strike end " + letters + " is ambiguous for strike " + fmt_angle(host.strike, 3));
  return line_from_rake(host, along < 90.0 ? *r : 180.0 - *r);
}

std::string format_strike_dip(const Plane& p) {
  return fmt_angle(round_azimuth(p.strike), 3) + "/" + fmt_angle(p.dip, 2);
}

std::string format_dip_direction(const Plane& p) {
  return fmt_angle(round_azimuth(p.dip_direction()), 3) + "/" + fmt_angle(p.dip, 2);
}

std::string format_trend_plunge(const Line& l) {
  return fmt_angle(round_azimuth(l.trend), 3) + "/" + fmt_angle(l.plunge, 2);
}

std::string format_rake(const Plane& host, const Line& l) {
  const double r = std::round(rake_of_line(host, l) * 10.0) / 10.0;
  return fmt_angle(r >= 180.0 ? 0.0 : r, 1);
}

std::string format_quadrant_azimuth(double azimuth) {
  const double a = round_azimuth(azimuth);
  if (a <= 90.0) return "N" + fmt_angle(a, 2) + "E";
  if (a < 180.0) return "S" + fmt_angle(180.0 - a, 2) + "E";
  if (a <= 270.0) return "S" + fmt_angle(a - 180.0, 2) + "W";
  return "N" + fmt_angle(360.0 - a, 2) + "W";
}

std::string format_quadrant(const Plane& p) {
  // The strike line is written from its north end (N..E or N..W).
  double s = round_azimuth(p.strike);
  if (s > 90.0 && s <= 270.0) s = wrap360(s - 180.0);
  const std::string strike = s <= 90.0 ? "N" + fmt_angle(s, 2) + "E" : "N" + fmt_angle(360.0 - s, 2) + "W";
  const std::string out = strike + " " + fmt_angle(p.dip, 1);
  const double rd = std::round(p.dip * 10.0) / 10.0;
  // Horizontal and vertical planes need no dip quadrant.
  if (rd == 0.0 || rd == 90.0) return out;
  return out + dip_letters(p.dip_direction());
}

}  // namespace cairn::geo
