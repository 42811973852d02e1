#include "formats/gpx.h"

#include "formats/limits.h"
#include "formats/utf8.h"
#include "formats/validate.h"
#include "formats/xml.h"

namespace cairn::formats {

namespace {
const char* const kGpx11 = "http://www.topografix.com/GPX/1/1";

std::string trimmed(const std::string& s) {
  const size_t b = s.find_first_not_of(" \t\r\n");
  if (b == std::string::npos) return "";
  return s.substr(b, s.find_last_not_of(" \t\r\n") - b + 1);
}
}  // namespace

GpxFile parse_gpx(std::string_view text, const std::string& filename) {
  GpxFile out;
  auto xml = parse_xml(text, filename);
  if (!xml) {
    out.errors.push_back(xml.error());
    return out;
  }
  const XmlElement& root = *xml;
  auto at = [&](const XmlElement& e, const std::string& rule, const std::string& msg) {
    out.errors.push_back(filename + ":" + std::to_string(e.line) + ":" + std::to_string(e.column) + ": " + rule + ": " +
                         msg);
  };
  if (root.local != "gpx" || root.ns != kGpx11) {
    at(root, "gpx",
       "the root element is <" + root.local + "> in namespace '" + root.ns + "', not <gpx> in the GPX 1.1 namespace " +
           kGpx11);
    return out;
  }
  if (const auto* v = root.attribute("version"); v && *v != "1.1")
    at(root, "gpx", "GPX version '" + *v + "' is not 1.1");
  if (const auto* c = root.attribute("creator")) out.creator = *c;
  for (const XmlElement& w : root.children) {
    if (w.ns != kGpx11 || w.local != "wpt") continue;
    if (out.waypoints.size() >= kMaxImportRows) {
      at(w, "too-large",
         "more than " + std::to_string(kMaxImportRows) + " waypoints, the most Cairn imports from one file; split it");
      break;
    }
    GpxWaypoint p;
    p.line = w.line;
    p.column = w.column;
    const size_t errors_before = out.errors.size();
    auto coordinate = [&](const char* name, double& v, Check (*range)(double)) {
      const std::string* a = w.attribute(name);
      if (!a) {
        at(w, "required", std::string("waypoint has no ") + name + " attribute");
        return;
      }
      if (auto b = check_number_text(*a, name == std::string("lat") ? "latitude" : "longitude", &v)) {
        at(w, b->rule, b->message);
        return;
      }
      if (auto b = range(v)) at(w, b->rule, b->message);
    };
    coordinate("lat", p.lat, check_latitude);
    coordinate("lon", p.lon, check_longitude);
    if (const XmlElement* e = w.child(kGpx11, "ele")) {
      double v = 0;
      if (auto b = check_number_text(trimmed(e->text), "elevation", &v))
        at(*e, b->rule, b->message);
      else if (auto r = check_elevation(v))
        at(*e, r->rule, r->message);
      else
        p.elevation = v;
    }
    if (const XmlElement* e = w.child(kGpx11, "time")) {
      std::string norm;
      if (auto b = check_time(trimmed(e->text), &norm))
        at(*e, b->rule, b->message);
      else
        p.time = norm;
    }
    // Text fields: XML already refuses C0 controls; DEL and C1 controls
    // (allowed by XML 1.0) are refused here, line breaks only in comments.
    auto text = [&](const char* tag, bool multiline, std::string& to) {
      const XmlElement* e = w.child(kGpx11, tag);
      if (!e) return;
      const std::string v = trimmed(e->text);
      if (auto b = check_text(v, tag, multiline))
        at(*e, b->rule, b->message);
      else
        to = v;
    };
    text("name", false, p.name);
    text("cmt", true, p.comment);
    text("desc", true, p.description);
    text("sym", false, p.symbol);
    if (out.errors.size() == errors_before) out.waypoints.push_back(std::move(p));
  }
  return out;
}

}  // namespace cairn::formats
