// The cross-check engine: measured attitudes against planes fitted to the
// points mapped along each contact, with a diagnosis for every disagreement and
// field-safety screening of slope faces.
//
// Pure computation: records in memory in (positions already projected to UTM
// metres by the caller), findings ("flags") out. The rule ids are part of
// Cairn's interface: misfit, reversed-dip, declination-suspect, compass-offset,
// weak-geometry, not-planar, facing-conflict, daylighting, toppling, duplicate.
#pragma once
#include <optional>
#include <string>
#include <vector>

#include "geomath/geodesy.h"
#include "geomath/orientation.h"
#include "geomath/plane_fit.h"

namespace cairn::geo {

// ---- input -------------------------------------------------------------------

struct CheckStation {
  std::string uuid, code;
  double e = 0, n = 0;          // UTM metres (grid)
  std::optional<double> z;      // elevation, metres
  double h_acc = 0, v_acc = 0;  // 1-sigma metres (0: not given)
  std::string unit;             // unit id or ""
};

enum class CheckFacing { Unknown, Upright, Overturned };

struct CheckPlane {
  std::string uuid, station, ref;  // station: CheckStation::uuid
  std::string kind;                // bedding, foliation, ..., contact, slope
  Plane plane;                     // against TRUE north, right-hand rule
  bool magnetic = false;           // measured against magnetic north
  double declination_applied = 0;  // degrees east, already in `plane`
  // Declination of the magnetic model at the station and date (degrees east),
  // when the caller could evaluate one.
  std::optional<double> local_declination;
  std::optional<int> quality;  // 1 (poorest) .. 5 (best)
  CheckFacing facing = CheckFacing::Unknown;
  std::string contact;                 // contact id or ""
  std::optional<double> time_minutes;  // minutes since any fixed epoch (for duplicates)
  // Who took it, on which day and with which device, for the systematic
  // compass check (all may be ""; readings with no observer are not grouped).
  std::string observer;  // a name to show (initials or name)
  std::string day;       // "YYYY-MM-DD"
  std::string device;    // device id
  // The first reading of the same surface when this one measures it again, or "":
  // repeats are combined into their Fisher mean before the comparison.
  std::string repeat_of;
};

struct CheckContact {
  std::string uuid, name;
  std::string type;                    // depositional, unconformity, fault, intrusive
  std::string lower_unit, upper_unit;  // unit ids or ""
  std::vector<FitPoint> points;        // UTM metres (grid)
  std::vector<std::string> point_ids;  // same order as points (may be empty)
  // Grid convergence and scale at this contact's points, when the caller
  // computed them per contact (a project spanning a zone boundary needs it);
  // otherwise CheckInput::grid is used.
  std::optional<GridFactors> grid;
};

struct CheckInput {
  std::vector<CheckStation> stations;
  std::vector<CheckPlane> planes;
  std::vector<CheckContact> contacts;
  // Grid convergence and scale of the working UTM zone in the project area:
  // fitted planes are turned from grid to true north with them.
  GridFactors grid;
};

struct CheckOptions {
  // Angular uncertainty (1 sigma, degrees) of a hand compass-clinometer reading of
  // quality 5 or of unstated quality (common practice, no published source);
  // poorer grades widen it (see reading_sigma()).
  double compass_sigma = 3.0;
  double confidence = 0.99;  // of the comparison tolerance
  // Compare bedding/contact readings that name no contact with the nearest contact
  // whose points lie within this distance (metres); 0 turns the option off.
  double nearby_radius = 0;
  double friction_angle = 30.0;  // degrees, for the Markland test
  double sliding_window = 20.0;  // +/- degrees of dip direction (Markland test; Hoek & Bray)
  // +/- degrees of the layers' dip direction from the opposite of the face's.
  // The literature gives 10 (Wyllie & Mah, Rock Slope Engineering, 4th ed.,
  // 2004) to 30 (Goodman & Bray, 1976; values from memory); screening takes the
  // wider window, so that it errs towards pointing out a possible hazard.
  double toppling_window = 30.0;
  double steep_slope = 35.0;      // degrees: re-measure actions on steeper ground carry a caution
  double terrain_radius = 150.0;  // metres, for estimating the ground slope from nearby stations
  // Only stations this close (metres) to one of a contact's points say which side
  // of it they are on: a plane fitted to one stretch of a contact says nothing
  // about rocks far along strike (common practice, no published source).
  double facing_radius = 400.0;
  double duplicate_angle = 2.0;  // degrees
  double duplicate_minutes = 10.0;
  double min_declination = 2.0;  // smaller declinations cannot be told from compass error
  // Systematic compass error: an observer's day (and device) needs at least this
  // many compared readings, and a rotation whose interval at this confidence
  // excludes zero, before it is flagged.
  size_t group_min_readings = 3;
  double group_confidence = 0.95;
  // A bedding or contact reading with no usable contact fit is compared with
  // other observers' readings within this distance (metres) that lie within
  // this angle of it (the same surface); our own choices, no published source.
  double crew_reference_radius = 100.0;
  double crew_reference_angle = 30.0;
};

// ---- output ------------------------------------------------------------------

enum class Severity { Note = 0, Query = 1, Conflict = 2, Hazard = 3 };
const char* severity_name(Severity s);
std::optional<Severity> parse_severity(const std::string& s);

struct Flag {
  std::string rule;  // one of the rule ids above
  Severity severity = Severity::Note;
  std::string station, station_id;         // station code and id ("" for contact-wide flags)
  std::string ref, reading;                // notebook ref and reading id ("" when not about one reading)
  std::string contact;                     // contact name ("" when none)
  std::optional<double> misfit;            // degrees between poles, as recorded
  std::optional<double> misfit_corrected;  // degrees after the suggested correction
  std::optional<Plane> corrected;          // the reading as the suggested correction has it (true north)
  std::string message;                     // one line, in the field's words
  std::string action;                      // what to do next
  std::string caution;                     // field-safety caution, "" when none
  // The diagnosis where the rule has one: "declination-not-applied",
  // "declination-applied-twice", "right-hand-rule", "compass-offset",
  // "facing-undecided"; "" otherwise.
  std::string cause;
  // Group flags (a systematic compass error): every reading concerned, the
  // observer, the day, the common rotation about the vertical that brings the
  // readings onto the reference (degrees, clockwise positive: add it to their
  // azimuths) and its confidence interval [low, high].
  std::vector<std::string> refs, readings;  // notebook refs ("" when none) and reading ids, same order
  std::vector<std::string> stations;        // station codes of the readings, same order
  std::string observer, day;
  std::optional<double> rotation;
  std::optional<std::pair<double, double>> rotation_interval;
};

struct ContactFit {
  std::string contact, contact_id;
  size_t points = 0;
  std::optional<PlaneFit> fit;       // grid frame, as fitted
  std::optional<Plane> plane;        // against true north
  std::string verdict;               // plain words; the reason when there is no fit
  bool usable = false;               // readings are compared against it
  std::vector<size_t> worst_points;  // indices of points that break planarity
};

struct CheckReport {
  std::vector<ContactFit> fits;
  std::vector<Flag> flags;  // ordered by station code, then severity (worst first), then rule
};

// Standard deviation (degrees) of a reading of the given quality grade.
double reading_sigma(std::optional<int> quality, const CheckOptions& o);
// The largest angle between poles that the comparison accepts, from the reading's and
// the fit's uncertainties at the stated confidence (see crosscheck.cpp).
double comparison_tolerance(double reading_sigma_deg, std::optional<double> fit_cone95, double confidence);

// Markland test for planar sliding on a plane below a slope face (Hoek & Bray,
// Rock Slope Engineering): true when the plane daylights and can slide.
bool planar_sliding_possible(const Plane& plane, const Plane& slope, double friction_angle, double window);
// Kinematic test for flexural toppling (Goodman & Bray, 1976).
bool flexural_toppling_possible(const Plane& plane, const Plane& slope, double friction_angle, double window);

// A common rotation about the vertical of a set of readings: the circular mean
// of the rotations each needs to fit its reference, with its standard error
// (Fisher, Statistical Analysis of Circular Data, 1993, 4.4.4; Mardia & Jupp,
// Directional Statistics, 2000, 4.8) and a confidence interval mean +/- t * SE
// with n - 1 degrees of freedom. Angles in degrees. Fails for fewer than 2.
struct CircularMean {
  size_t n = 0;
  double mean = 0;            // degrees, (-180, 180]
  double resultant = 0;       // mean resultant length R-bar, 0..1
  double standard_error = 0;  // degrees
  double low = 0, high = 0;   // confidence interval, degrees
};
Result<CircularMean> circular_mean_rotation(const std::vector<double>& degrees, double confidence = 0.95);

// Readings of one surface measured several times: the Fisher (1953) mean of
// their poles as a plane, with alpha95 (absent when they are too dispersed for a
// cone). Fails for fewer than 2 readings.
struct RepeatMean {
  Plane plane;
  size_t n = 0;
  std::optional<double> alpha95;  // degrees
};
Result<RepeatMean> repeat_mean(const std::vector<Plane>& readings);
// Standard deviation (degrees) of a repeat set's mean pole for the comparison
// tolerance: alpha95 turned into a sigma the way a fit's cone is (Rayleigh, see
// comparison_tolerance), but never below 1 degree / sqrt(n) (a hand compass reads
// to about a degree: common practice), nor, without alpha95, the grade's sigma / sqrt(n).
double repeat_sigma(const RepeatMean& m, double reading_sigma_deg);

CheckReport run_crosscheck(const CheckInput& input, const CheckOptions& options = {});

// The field-safety caution carried by hazard flags and by re-measure actions on steep ground.
extern const char* const kSlopeCaution;
extern const char* const kSteepGroundCaution;
// Carried by contact-wide flags whose action sends someone back along a contact.
extern const char* const kRevisitCaution;

}  // namespace cairn::geo
