// GeoJSON as RFC 7946 defines it: one FeatureCollection (section 3.3) of Point
// (3.1.2), MultiLineString and MultiPolygon features in WGS84 longitude, latitude (section 4; no "crs" member),
// each feature's layer in its "layer" property (RFC 7946 has no layers).
#include "formats/geojson.h"

#include <cmath>

#include "formats/json.h"

namespace cairn::formats {

namespace {

void put_value(JsonWriter& j, const FieldValue& v) {
  if (std::holds_alternative<std::monostate>(v))
    j.null();
  else if (auto s = std::get_if<std::string>(&v))
    j.value(*s);
  else if (auto d = std::get_if<double>(&v))
    j.value(*d);
  else if (auto n = std::get_if<int64_t>(&v))
    j.value(static_cast<long long>(*n));
  else if (auto b = std::get_if<bool>(&v))
    j.value(*b);
}

// Coordinates rounded to 7 decimals (about 1 cm), beyond what RFC 7946 section
// 11.2 suggests (6 decimals, about 10 cm) and below any field GPS's accuracy.
double coordinate(double v) { return std::round(v * 1e7) / 1e7; }

}  // namespace

GeoJsonWriter::GeoJsonWriter(std::ostream& out) : out_(out) {}
GeoJsonWriter::~GeoJsonWriter() = default;

void GeoJsonWriter::begin(const geo::UtmZone&) {
  j_ = std::make_unique<JsonWriter>(out_, 15);
  j_->begin_object().key("type").value("FeatureCollection").key("features").begin_array();
}

void GeoJsonWriter::begin_layer(const Layer& l) {
  layer_ = Layer{l.name, l.title, l.description, l.fields, {}, l.geometry};
  uuid_field_ = -1;
  for (size_t i = 0; i < l.fields.size(); ++i)
    if (l.fields[i].name == "uuid") {
      uuid_field_ = static_cast<int>(i);
      break;
    }
}

void GeoJsonWriter::feature(Feature&& f) {
  JsonWriter& j = *j_;
  const Layer& l = layer_;
  std::ostream& out = out_;
  out << '\n';
  j.begin_object().key("type").value("Feature");
  // RFC 7946 section 3.2: a commonly used identifier goes in "id".
  if (uuid_field_ >= 0) {
    j.key("id");
    put_value(j, f.values[static_cast<size_t>(uuid_field_)]);
  }
  j.key("geometry");
  if (!f.lonlat_parts.empty()) {
    // RFC 7946 3.1.4 LineString, 3.1.5 MultiLineString, 3.1.7 MultiPolygon (rings closed, exterior
    // counter-clockwise, 3.1.6).
    const bool poly = l.geometry == "MULTIPOLYGON", single = l.geometry == "LINESTRING";
    if (single) {
      j.begin_object().key("type").value("LineString").key("coordinates").begin_array();
      for (const auto& q : f.lonlat_parts.front())
        j.begin_array().value(coordinate(q[0])).value(coordinate(q[1])).end_array();
      j.end_array().end_object();
    } else {
      j.begin_object().key("type").value(poly ? "MultiPolygon" : "MultiLineString").key("coordinates").begin_array();
      for (const auto& part : f.lonlat_parts) {
        j.begin_array();
        if (poly) j.begin_array();
        for (const auto& q : part) j.begin_array().value(coordinate(q[0])).value(coordinate(q[1])).end_array();
        if (poly) j.end_array();
        j.end_array();
      }
      j.end_array().end_object();
    }
  } else if (f.where) {
    // section 3.1.1: longitude first
    j.begin_object().key("type").value("Point").key("coordinates").begin_array();
    j.value(coordinate(f.where->lon)).value(coordinate(f.where->lat)).end_array().end_object();
  } else {
    j.null();  // section 3.2: a feature without a place has a null geometry
  }
  j.key("properties").begin_object().key("layer").value(l.name);
  for (size_t i = 0; i < l.fields.size(); ++i) {
    j.key(l.fields[i].name);
    put_value(j, f.values[i]);
  }
  j.end_object().end_object();
}

void GeoJsonWriter::end_layer() { out_.flush(); }

void GeoJsonWriter::finish() {
  out_ << '\n';
  j_->end_array().end_object();
  out_ << '\n';
  out_.flush();
}

void write_geojson(std::ostream& out, const LayerSet& set) {
  GeoJsonWriter w(out);
  send_layers(set, w);
  w.finish();
}

}  // namespace cairn::formats
