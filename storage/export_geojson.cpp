// GeoJSON as RFC 7946 defines it: one FeatureCollection (section 3.3) of Point
// features (3.1.2) in WGS84 longitude, latitude (section 4; no "crs" member),
// each feature's layer in its "layer" property (RFC 7946 has no layers).
#include <cmath>
#include <cstdio>

#include "storage/export.h"
#include "storage/export_layers.h"

namespace cairn::store {

namespace {

// JSON strings (RFC 8259 section 7): quote, backslash and control characters escaped.
void put_string(std::string& out, const std::string& s) {
  out += '"';
  for (unsigned char c : s) {
    switch (c) {
      case '"': out += "\\\""; break;
      case '\\': out += "\\\\"; break;
      case '\n': out += "\\n"; break;
      case '\r': out += "\\r"; break;
      case '\t': out += "\\t"; break;
      default:
        if (c < 0x20) {
          char buf[8];
          std::snprintf(buf, sizeof buf, "\\u%04x", c);
          out += buf;
        } else {
          out += static_cast<char>(c);
        }
    }
  }
  out += '"';
}

void put_number(std::string& out, double v, const char* format = "%.15g") {
  if (!std::isfinite(v)) {
    out += "null";
    return;
  }
  char buf[40];
  std::snprintf(buf, sizeof buf, format, v == 0 ? 0.0 : v);
  out += buf;
}

void put_value(std::string& out, const FieldValue& v) {
  if (std::holds_alternative<std::monostate>(v)) out += "null";
  else if (auto s = std::get_if<std::string>(&v)) put_string(out, *s);
  else if (auto d = std::get_if<double>(&v)) put_number(out, *d);
  else if (auto n = std::get_if<int64_t>(&v)) out += std::to_string(*n);
  else if (auto b = std::get_if<bool>(&v)) out += *b ? "true" : "false";
}

// Coordinates with 7 decimals (about 1 cm), beyond what RFC 7946 section 11.2
// suggests (6 decimals, about 10 cm) and below any field GPS's accuracy.
void put_coordinate(std::string& out, double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.7f", v);
  std::string s = buf;
  while (!s.empty() && s.back() == '0') s.pop_back();
  if (!s.empty() && s.back() == '.') s.pop_back();
  if (s == "-0") s = "0";
  out += s;
}

}  // namespace

ExportSummary export_geojson(Project& p, const std::string& path, const ExportOptions& o) {
  const LayerSet set = build_layers(p, o, RotationFrame::TrueNorth);
  std::string out = "{\"type\":\"FeatureCollection\",\"features\":[";
  bool first = true;
  ExportSummary sum;
  sum.format = ExportFormat::GeoJson;
  sum.path = path;
  sum.epsg = 4326;
  for (const Layer& l : set.layers) {
    sum.layers.push_back({l.name, l.features.size()});
    const int uuid_field = [&] {
      for (size_t i = 0; i < l.fields.size(); ++i)
        if (l.fields[i].name == "uuid") return static_cast<int>(i);
      return -1;
    }();
    for (const Feature& f : l.features) {
      out += first ? "\n" : ",\n";
      first = false;
      out += "{\"type\":\"Feature\"";
      // RFC 7946 section 3.2: a commonly used identifier goes in "id".
      if (uuid_field >= 0) {
        out += ",\"id\":";
        put_value(out, f.values[static_cast<size_t>(uuid_field)]);
      }
      out += ",\"geometry\":";
      if (!f.lonlat_parts.empty()) {
        // RFC 7946 3.1.5 MultiLineString, 3.1.7 MultiPolygon (rings closed, exterior counter-clockwise, 3.1.6).
        const bool poly = l.geometry == "MULTIPOLYGON";
        out += poly ? "{\"type\":\"MultiPolygon\",\"coordinates\":[" : "{\"type\":\"MultiLineString\",\"coordinates\":[";
        for (size_t k = 0; k < f.lonlat_parts.size(); ++k) {
          out += k ? ",[" : "[";
          if (poly) out += "[";
          for (size_t m = 0; m < f.lonlat_parts[k].size(); ++m) {
            out += m ? ",[" : "[";
            put_coordinate(out, f.lonlat_parts[k][m][0]);
            out += ",";
            put_coordinate(out, f.lonlat_parts[k][m][1]);
            out += "]";
          }
          out += poly ? "]]" : "]";
        }
        out += "]}";
      } else if (f.where) {
        out += "{\"type\":\"Point\",\"coordinates\":[";
        put_coordinate(out, f.where->lon);  // section 3.1.1: longitude first
        out += ",";
        put_coordinate(out, f.where->lat);
        out += "]}";
      } else {
        out += "null";  // section 3.2: a feature without a place has a null geometry
      }
      out += ",\"properties\":{\"layer\":";
      put_string(out, l.name);
      for (size_t i = 0; i < l.fields.size(); ++i) {
        out += ",";
        put_string(out, l.fields[i].name);
        out += ":";
        put_value(out, f.values[i]);
      }
      out += "}}";
    }
  }
  out += "\n]}\n";
  write_file_atomically(path, out);
  return sum;
}

}  // namespace cairn::store
