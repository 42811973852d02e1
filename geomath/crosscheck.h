// The cross-check engine: measured attitudes against planes fitted to the
// points mapped along each contact, with a diagnosis for every disagreement and
// field-safety screening of slope faces.
//
// Pure computation: records in memory in (positions already projected to UTM
// metres by the caller), findings ("flags") out. The rule ids are part of
// Cairn's interface: misfit, reversed-dip, declination-suspect, weak-geometry,
// not-planar, facing-conflict, daylighting, toppling, duplicate.
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
  double e = 0, n = 0;             // UTM metres (grid)
  std::optional<double> z;         // elevation, metres
  double h_acc = 0, v_acc = 0;     // 1-sigma metres (0: not given)
  std::string unit;                // unit id or ""
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
  std::optional<int> quality;      // 1 (poorest) .. 5 (best)
  CheckFacing facing = CheckFacing::Unknown;
  std::string contact;             // contact id or ""
  std::optional<double> time_minutes;  // minutes since any fixed epoch (for duplicates)
};

struct CheckContact {
  std::string uuid, name;
  std::string type;                   // depositional, unconformity, fault, intrusive
  std::string lower_unit, upper_unit; // unit ids or ""
  std::vector<FitPoint> points;       // UTM metres (grid)
  std::vector<std::string> point_ids; // same order as points (may be empty)
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
  double confidence = 0.99;          // of the comparison tolerance
  // Compare bedding/contact readings that name no contact with the nearest contact
  // whose points lie within this distance (metres); 0 turns the option off.
  double nearby_radius = 0;
  double friction_angle = 30.0;      // degrees, for the Markland test
  double sliding_window = 20.0;      // +/- degrees of dip direction (Markland test; Hoek & Bray)
  double toppling_window = 10.0;     // +/- degrees (Goodman & Bray, 1976)
  double steep_slope = 35.0;         // degrees: re-measure actions on steeper ground carry a caution
  double terrain_radius = 150.0;     // metres, for estimating the ground slope from nearby stations
  // Only stations this close (metres) to one of a contact's points say which side
  // of it they are on: a plane fitted to one stretch of a contact says nothing
  // about rocks far along strike (common practice, no published source).
  double facing_radius = 400.0;
  double duplicate_angle = 2.0;      // degrees
  double duplicate_minutes = 10.0;
  double min_declination = 2.0;      // smaller declinations cannot be told from compass error
};

// ---- output ------------------------------------------------------------------

enum class Severity { Note = 0, Query = 1, Conflict = 2, Hazard = 3 };
const char* severity_name(Severity s);
std::optional<Severity> parse_severity(const std::string& s);

struct Flag {
  std::string rule;                 // one of the rule ids above
  Severity severity = Severity::Note;
  std::string station, station_id;  // station code and id ("" for contact-wide flags)
  std::string ref, reading;         // notebook ref and reading id ("" when not about one reading)
  std::string contact;              // contact name ("" when none)
  std::optional<double> misfit;            // degrees between poles, as recorded
  std::optional<double> misfit_corrected;  // degrees after the suggested correction
  std::optional<Plane> corrected;          // the reading as the suggested correction has it (true north)
  std::string message;              // one line, in the field's words
  std::string action;               // what to do next
  std::string caution;              // field-safety caution, "" when none
};

struct ContactFit {
  std::string contact, contact_id;
  size_t points = 0;
  std::optional<PlaneFit> fit;  // grid frame, as fitted
  std::optional<Plane> plane;   // against true north
  std::string verdict;          // plain words; the reason when there is no fit
  bool usable = false;          // readings are compared against it
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
double comparison_tolerance(double reading_sigma_deg, std::optional<double> fit_cone95,
                            double confidence);

// Markland test for planar sliding on a plane below a slope face (Hoek & Bray,
// Rock Slope Engineering): true when the plane daylights and can slide.
bool planar_sliding_possible(const Plane& plane, const Plane& slope, double friction_angle,
                             double window);
// Kinematic test for flexural toppling (Goodman & Bray, 1976).
bool flexural_toppling_possible(const Plane& plane, const Plane& slope, double friction_angle,
                                double window);

CheckReport run_crosscheck(const CheckInput& input, const CheckOptions& options = {});

// The field-safety caution carried by hazard flags and by re-measure actions on steep ground.
extern const char* const kSlopeCaution;
extern const char* const kSteepGroundCaution;

}  // namespace cairn::geo
