#include "app/core/export_layers.h"

#include "app/core/export_track.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <stdexcept>
#include <unordered_map>

#include "geomath/angles.h"
#include "formats/ids.h"
#include "geomath/terrain.h"
#include "storage/each.h"
#include "storage/repository.h"
#include "storage/terrain.h"

namespace fs = std::filesystem;

namespace cairn::core {

using namespace cairn::store;  // the project file and its records (storage/)

using namespace cairn::formats;  // file formats and value rules (formats/)

namespace {

// Every record, deleted ones too (references from live records may point at them).
ListOptions with_deleted() {
  ListOptions o;
  o.include_deleted = true;
  return o;
}

FieldValue text(const std::string& s) { return s.empty() ? FieldValue{} : FieldValue{s}; }
FieldValue real(const std::optional<double>& v) { return v ? FieldValue{*v} : FieldValue{}; }
FieldValue integer(const std::optional<int>& v) { return v ? FieldValue{static_cast<int64_t>(*v)} : FieldValue{}; }

std::string lookup(const std::unordered_map<std::string, std::string>& m, const std::string& k) {
  auto it = m.find(k);
  return it == m.end() ? std::string() : it->second;
}

// The flags of one thing, worst first: "conflict misfit; query duplicate".
struct FlagText {
  std::string list;
  std::string worst;
};
FlagText flag_text(std::vector<const geo::Flag*> flags) {
  std::stable_sort(flags.begin(), flags.end(),
                   [](const geo::Flag* a, const geo::Flag* b) { return a->severity > b->severity; });
  FlagText t;
  for (const auto* f : flags)
    t.list += (t.list.empty() ? "" : "; ") + std::string(geo::severity_name(f->severity)) + " " + f->rule;
  if (!flags.empty()) t.worst = geo::severity_name(flags.front()->severity);
  return t;
}

class Builder {
 public:
  Builder(Project& p, const ExportOptions& o, RotationFrame frame, LayerSink& sink)
      : p_(p), frame_(frame), sink_(sink), progress_(o.progress) {
    data_ = load_check_input(p, o.local_declination);
    report_ = geo::run_crosscheck(data_.input, o.check);
    zone_ = data_.zone;
    for (const auto& d : list_devices(p)) device_[d.meta.uuid] = d.name;
    for (const auto& x : list_people(p, with_deleted())) initials_[x.meta.uuid] = x.initials;
    for (const auto& u : list_units(p, with_deleted())) unit_[u.meta.uuid] = u.code;
    for (const auto& c : list_contacts(p, with_deleted())) contact_[c.meta.uuid] = c.name;
    if (progress_)
      total_ = count_stations(p) + count_planes(p) + count_lines(p) + count_points(p) + list_photos(p).size() +
               report_.fits.size() + report_.flags.size();
  }

  // The layers in their order, each feature sent as soon as it is made.
  void build() {
    sink_.begin(zone_);
    if (progress_) progress_(0, total_);
    stations();
    planes();
    lines();
    points();
    photos();
    fitted_contacts();
    flags();
    terrain_layers();
    whole(day_track_layer(p_, zone_));
    if (progress_) progress_(done_, std::max(done_, total_));
  }

 private:
  Feature at(double lat, double lon, const std::string& what) {
    Feature f;
    f.where = geo::LatLon{lat, lon};
    auto u = geo::to_utm(*f.where, zone_);
    if (!u) throw std::runtime_error(what + ": " + u.error());
    f.grid = *u;
    return f;
  }
  Feature at_grid(double e, double n) {
    Feature f;
    const geo::UtmPoint u{zone_.zone, zone_.northp, e, n};
    auto ll = geo::from_utm(u);
    if (!ll) return f;  // no geometry rather than a wrong one
    f.where = *ll;
    f.grid = u;
    return f;
  }

  // Clockwise from the layer grid's north to a true azimuth (see export.h).
  double rotation(double azimuth, const Feature& f) const {
    if (frame_ == RotationFrame::TrueNorth || !f.where) return geo::wrap360(azimuth);
    auto g = geo::utm_grid_factors(*f.where, zone_);
    // Convergence: the azimuth of grid north measured clockwise from true north,
    // so a true azimuth A is A - convergence from grid north.
    return geo::wrap360(azimuth - (g ? g->convergence : 0.0));
  }

  void meta_values(Feature& f, const RecordMeta& m) {
    f.values.push_back(text(lookup(device_, m.device)));
    f.values.push_back(m.created);
    f.values.push_back(m.updated);
  }
  static void meta_fields(Layer& l) {
    for (const char* n : {"device", "created", "updated"}) l.fields.push_back({n, FieldType::Text});
  }

  // One feature of the current layer, to the sink.
  void emit(Feature&& f) {
    sink_.feature(std::move(f));
    ++done_;
    if (progress_ && done_ % 1000 == 0) progress_(std::min(done_, total_), total_);
  }
  // A layer built whole (a few features per contact or day).
  void whole(Layer&& l) {
    sink_.begin_layer(l);
    for (auto& f : l.features) emit(std::move(f));
    sink_.end_layer();
  }

  void stations() {
    Layer l{"stations", "Stations", "Where readings were taken (WGS84 positions as recorded).", {}, {}};
    using T = FieldType;
    l.fields = {{"uuid", T::Text},      {"code", T::Text},       {"lat", T::Real},        {"lon", T::Real},
                {"elevation", T::Real}, {"h_accuracy", T::Real}, {"v_accuracy", T::Real}, {"source", T::Text},
                {"unit", T::Text},      {"observer", T::Text},   {"time", T::Text},       {"notes", T::Text}};
    meta_fields(l);
    sink_.begin_layer(l);
    // Live stations by creation time, then UUID; their places are kept for the
    // readings and photos that follow.
    for_each_station(
        p_, {},
        [&](const Station& s) {
          station_[s.meta.uuid] = StationPlace{s.lat, s.lon, s.code};
          Feature f = at(s.lat, s.lon, "station " + s.code);
          f.values = {s.meta.uuid,
                      s.code,
                      s.lat,
                      s.lon,
                      real(s.elevation),
                      real(s.h_accuracy),
                      real(s.v_accuracy),
                      std::string(to_string(s.source)),
                      text(lookup(unit_, s.unit)),
                      text(lookup(initials_, s.observer)),
                      text(s.time),
                      text(s.notes)};
          meta_values(f, s.meta);
          emit(std::move(f));
        },
        Ties::Uuid);
    sink_.end_layer();
  }

  Feature at_station(const std::string& station_uuid) {
    auto it = station_.find(station_uuid);
    if (it == station_.end()) return Feature{};
    return at(it->second.lat, it->second.lon, "station " + it->second.code);
  }
  std::string station_code(const std::string& uuid) const {
    auto it = station_.find(uuid);
    return it == station_.end() ? std::string() : it->second.code;
  }

  // Photo references at their station's position (a photo of no station has no geometry).
  void photos() {
    Layer l{"photos",
            "Photos",
            "Photo references, at their station's position (path relative to the project file).",
            {},
            {}};
    using T = FieldType;
    l.fields = {{"uuid", T::Text},    {"station", T::Text}, {"path", T::Text},
                {"caption", T::Text}, {"sha256", T::Text},  {"time", T::Text}};
    meta_fields(l);
    sink_.begin_layer(l);
    for_each_photo(p_, {}, [&](const Photo& ph) {
      Feature f = at_station(ph.station);
      f.values = {ph.meta.uuid, text(station_code(ph.station)), ph.path, text(ph.caption), ph.sha256, text(ph.time)};
      meta_values(f, ph.meta);
      emit(std::move(f));
    });
    sink_.end_layer();
  }

  void planes() {
    Layer l{"planar_readings",
            "Planar readings",
            "Strike (right-hand rule) and dip against true north; symbol_rotation: clockwise from the layer grid's "
            "north to the strike (draw the strike-dip symbol pointing up, dip tick on the right, then rotate).",
            {},
            {}};
    using T = FieldType;
    l.fields = {{"uuid", T::Text},
                {"station", T::Text},
                {"kind", T::Text},
                {"strike", T::Real},
                {"dip", T::Real},
                {"dip_direction", T::Real},
                {"symbol_rotation", T::Real},
                {"quality", T::Integer},
                {"facing", T::Text},
                {"north", T::Text},
                {"declination", T::Real},
                {"declination_source", T::Text},
                {"measured_strike", T::Real},
                {"measured_dip", T::Real},
                {"typed", T::Text},
                {"contact", T::Text},
                {"ref", T::Text},
                {"time", T::Text},
                {"observer", T::Text},
                {"notes", T::Text},
                {"flags", T::Text},
                {"worst_flag", T::Text}};
    meta_fields(l);
    sink_.begin_layer(l);
    std::unordered_map<std::string, std::vector<const geo::Flag*>> by_reading;
    for (const auto& f : report_.flags)
      if (!f.reading.empty()) by_reading[f.reading].push_back(&f);
    for_each_plane(p_, {}, [&](const PlanarReading& r) {
      Feature f = at_station(r.station);
      const geo::Plane pl{r.strike, r.dip};
      const FlagText ft = flag_text(by_reading[r.meta.uuid]);
      f.values = {r.meta.uuid,
                  station_code(r.station),
                  std::string(to_string(r.kind)),
                  r.strike,
                  r.dip,
                  pl.dip_direction(),
                  rotation(r.strike, f),
                  integer(r.quality),
                  std::string(to_string(r.facing)),
                  std::string(to_string(r.north)),
                  r.declination,
                  text(r.declination_source),
                  r.measured_strike,
                  r.measured_dip,
                  r.typed,
                  text(lookup(contact_, r.contact)),
                  text(r.ref),
                  text(r.time),
                  text(lookup(initials_, r.observer)),
                  text(r.notes),
                  text(ft.list),
                  text(ft.worst)};
      meta_values(f, r.meta);
      emit(std::move(f));
    });
    sink_.end_layer();
  }

  void lines() {
    Layer l{"linear_readings",
            "Linear readings",
            "Trend and plunge against true north; symbol_rotation: clockwise from the layer grid's north to the trend.",
            {},
            {}};
    using T = FieldType;
    l.fields = {{"uuid", T::Text},
                {"station", T::Text},
                {"kind", T::Text},
                {"trend", T::Real},
                {"plunge", T::Real},
                {"symbol_rotation", T::Real},
                {"rake", T::Real},
                {"plane_ref", T::Text},
                {"north", T::Text},
                {"declination", T::Real},
                {"declination_source", T::Text},
                {"measured_trend", T::Real},
                {"measured_plunge", T::Real},
                {"typed", T::Text},
                {"ref", T::Text},
                {"time", T::Text},
                {"observer", T::Text},
                {"notes", T::Text}};
    meta_fields(l);
    sink_.begin_layer(l);
    // Only the planes with a ref (the ones a line can name by it).
    std::unordered_map<std::string, std::string> plane_ref;
    for_each_plane(p_, with_deleted(), [&](const PlanarReading& pl) {
      if (!pl.ref.empty()) plane_ref[pl.meta.uuid] = pl.ref;
    });
    for_each_line(p_, {}, [&](const LinearReading& r) {
      Feature f = at_station(r.station);
      f.values = {r.meta.uuid,
                  station_code(r.station),
                  std::string(to_string(r.kind)),
                  r.trend,
                  r.plunge,
                  rotation(r.trend, f),
                  real(r.rake),
                  text(lookup(plane_ref, r.host_plane)),
                  std::string(to_string(r.north)),
                  r.declination,
                  text(r.declination_source),
                  r.measured_trend,
                  r.measured_plunge,
                  r.typed,
                  text(r.ref),
                  text(r.time),
                  text(lookup(initials_, r.observer)),
                  text(r.notes)};
      meta_values(f, r.meta);
      emit(std::move(f));
    });
    sink_.end_layer();
  }

  void points() {
    Layer l{"contact_points", "Contact points", "Points mapped along contacts (WGS84 positions as recorded).", {}, {}};
    using T = FieldType;
    l.fields = {{"uuid", T::Text},      {"contact", T::Text},    {"lat", T::Real},        {"lon", T::Real},
                {"elevation", T::Real}, {"h_accuracy", T::Real}, {"v_accuracy", T::Real}, {"source", T::Text},
                {"time", T::Text},      {"observer", T::Text},   {"notes", T::Text}};
    meta_fields(l);
    sink_.begin_layer(l);
    for_each_point(p_, {}, [&](const ContactPoint& q) {
      Feature f = at(q.lat, q.lon, "contact point " + q.meta.uuid);
      f.values = {q.meta.uuid,
                  text(lookup(contact_, q.contact)),
                  q.lat,
                  q.lon,
                  real(q.elevation),
                  real(q.h_accuracy),
                  real(q.v_accuracy),
                  std::string(to_string(q.source)),
                  text(q.time),
                  text(lookup(initials_, q.observer)),
                  text(q.notes)};
      meta_values(f, q.meta);
      emit(std::move(f));
    });
    sink_.end_layer();
  }

  // Where a contact's feature goes: the centroid its plane was fitted through,
  // else the mean of its mapped points.
  Feature contact_place(const std::string& name) {
    for (const auto& fit : report_.fits)
      if (fit.contact == name && fit.fit) return at_grid(fit.fit->centroid.x(), fit.fit->centroid.y());
    for (const auto& c : data_.input.contacts) {
      if (c.name != name || c.points.empty()) continue;
      double e = 0, n = 0;
      for (const auto& q : c.points) e += q.e, n += q.n;
      return at_grid(e / c.points.size(), n / c.points.size());
    }
    return Feature{};
  }

  // predicted_traces and trace_bands (app/core/export.h), when the project has a
  // terrain in the export's zone: each fitted contact's trace and 95% band.
  void terrain_layers() {
    const auto info = terrain_info(p_);
    if (!info || info->epsg != utm_epsg(zone_)) return;
    const auto grid = load_terrain(p_);
    Layer traces{"predicted_traces",
                 "Predicted outcrop traces",
                 "where each fitted contact's best plane meets the terrain; interval: mean half width (m) of "
                 "its 95% trace band across the trace",
                 {{"contact", FieldType::Text}, {"interval", FieldType::Real}},
                 {},
                 "MULTILINESTRING"};
    Layer bands{"trace_bands",
                "Trace bands",
                "where each fitted contact crops out with 95% probability (the terrain's cells)",
                {{"contact", FieldType::Text}, {"confidence", FieldType::Real}},
                {},
                "MULTIPOLYGON"};
    for (const auto& fit : report_.fits) {
      if (!fit.fit) continue;
      const auto pred = geo::predict_contact(*grid, *fit.fit, info->vertical_accuracy.value_or(0));
      if (!pred || pred->trace.empty()) continue;
      Feature t;
      for (const auto& l : pred->trace) t.grid_parts.push_back(l.pts);
      t.lonlat_parts = lonlat(t.grid_parts);
      t.values = {fit.contact, pred->mean_half_width ? FieldValue(*pred->mean_half_width) : FieldValue()};
      traces.features.push_back(std::move(t));
      if (!pred->has_band || pred->band.empty()) continue;
      Feature b;
      b.grid_parts = pred->band;
      b.lonlat_parts = lonlat(b.grid_parts);
      b.values = {fit.contact, 0.95};
      bands.features.push_back(std::move(b));
    }
    whole(std::move(traces));
    whole(std::move(bands));
  }

  Parts lonlat(const Parts& grid) const {
    Parts out;
    for (const auto& part : grid) {
      out.emplace_back();
      for (const auto& q : part) {
        const auto ll = geo::from_utm({zone_.zone, zone_.northp, q[0], q[1]});
        if (!ll) throw std::runtime_error("a predicted trace leaves UTM: " + ll.error());
        out.back().push_back({ll->lon, ll->lat});
      }
    }
    return out;
  }

  void fitted_contacts() {
    Layer l{"fitted_contacts",
            "Fitted contacts",
            "One point per contact at the centroid of its mapped points: the plane fitted through them (strike by "
            "the right-hand rule, true north), its 95% cone, verdict and the cross-check's contact-wide flags.",
            {},
            {}};
    using T = FieldType;
    l.fields = {
        {"contact_uuid", T::Text},    {"contact", T::Text},         {"type", T::Text},   {"lower_unit", T::Text},
        {"upper_unit", T::Text},      {"points", T::Integer},       {"strike", T::Real}, {"dip", T::Real},
        {"dip_direction", T::Real},   {"symbol_rotation", T::Real}, {"cone95", T::Real}, {"rms", T::Real},
        {"verdict", T::Text},         {"usable", T::Boolean},       {"flags", T::Text},  {"worst_flag", T::Text},
        {"reading_flags", T::Integer}};
    sink_.begin_layer(l);
    for (const auto& fit : report_.fits) {
      Feature f = contact_place(fit.contact);
      const geo::CheckContact* cc = nullptr;
      for (const auto& c : data_.input.contacts)
        if (c.uuid == fit.contact_id) cc = &c;
      std::vector<const geo::Flag*> own;
      int64_t at_stations = 0;
      for (const auto& fl : report_.flags) {
        if (fl.contact != fit.contact) continue;
        if (fl.station.empty())
          own.push_back(&fl);
        else
          ++at_stations;
      }
      const FlagText ft = flag_text(own);
      std::optional<double> strike, dip, dd, rot, cone, rms;
      if (fit.plane) {
        strike = fit.plane->strike;
        dip = fit.plane->dip;
        dd = fit.plane->dip_direction();
        rot = rotation(fit.plane->strike, f);
        cone = fit.fit->cone95;
        rms = fit.fit->rms;
      }
      f.values = {fit.contact_id,
                  fit.contact,
                  text(cc ? cc->type : ""),
                  text(cc ? lookup(unit_, cc->lower_unit) : ""),
                  text(cc ? lookup(unit_, cc->upper_unit) : ""),
                  static_cast<int64_t>(fit.points),
                  real(strike),
                  real(dip),
                  real(dd),
                  real(rot),
                  real(cone),
                  real(rms),
                  text(fit.verdict),
                  fit.usable,
                  text(ft.list),
                  text(ft.worst),
                  at_stations};
      emit(std::move(f));
    }
    sink_.end_layer();
  }

  void flags() {
    Layer l{"flags",
            "Cross-check flags",
            "Findings of the cross-check at their station (or at the contact's centroid for contact-wide flags).",
            {},
            {}};
    using T = FieldType;
    l.fields = {{"rule", T::Text},    {"severity", T::Text}, {"station", T::Text}, {"ref", T::Text},
                {"reading", T::Text}, {"contact", T::Text},  {"misfit", T::Real},  {"misfit_corrected", T::Real},
                {"message", T::Text}, {"action", T::Text},   {"caution", T::Text}};
    sink_.begin_layer(l);
    for (const auto& fl : report_.flags) {
      Feature f = fl.station_id.empty() ? contact_place(fl.contact) : at_station(fl.station_id);
      f.values = {fl.rule,          std::string(geo::severity_name(fl.severity)),
                  text(fl.station), text(fl.ref),
                  text(fl.reading), text(fl.contact),
                  real(fl.misfit),  real(fl.misfit_corrected),
                  fl.message,       fl.action,
                  text(fl.caution)};
      emit(std::move(f));
    }
    sink_.end_layer();
  }

  // What the readings and photos need of their station.
  struct StationPlace {
    double lat, lon;
    std::string code;
  };

  Project& p_;
  RotationFrame frame_;
  CheckData data_;
  geo::CheckReport report_;
  LayerSink& sink_;
  std::function<void(size_t, size_t)> progress_;
  geo::UtmZone zone_;
  size_t done_ = 0, total_ = 0;
  std::unordered_map<std::string, std::string> device_, initials_, unit_, contact_;
  std::unordered_map<std::string, StationPlace> station_;
};

}  // namespace

void stream_layers(Project& p, const ExportOptions& o, RotationFrame frame, LayerSink& sink) {
  Builder(p, o, frame, sink).build();
}

LayerSet build_layers(Project& p, const ExportOptions& o, RotationFrame frame) {
  LayerCollector c;
  stream_layers(p, o, frame, c);
  return std::move(c.set);
}

}  // namespace cairn::core
