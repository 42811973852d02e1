#include "formats/gpx_write.h"

#include <charconv>
#include <cmath>
#include <stdexcept>

namespace cairn::formats {

namespace {

// Text for an XML attribute or element (XML 1.0, section 2.4: &, <, > and quotes escaped).
std::string xml_text(const std::string& s) {
  std::string out;
  for (char c : s) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&apos;"; break;
      default:
        // Control characters other than tab and newline are not allowed in XML 1.0.
        if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n')
          out += ' ';
        else
          out += c;
    }
  }
  return out;
}

// A decimal number with a point whatever the locale (std::to_chars).
std::string decimal(double v, int places) {
  char buf[64];
  const auto r = std::to_chars(buf, buf + sizeof buf, v, std::chars_format::fixed, places);
  return std::string(buf, r.ptr);
}

}  // namespace

std::string write_gpx_tracks(const std::vector<GpxTrack>& tracks, const std::string& creator) {
  std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  out += "<gpx version=\"1.1\" creator=\"" + xml_text(creator) + "\" xmlns=\"http://www.topografix.com/GPX/1/1\">\n";
  for (const auto& t : tracks) {
    out += "  <trk>\n    <name>" + xml_text(t.name) + "</name>\n";
    for (const auto& seg : t.segments) {
      out += "    <trkseg>\n";
      for (size_t i = 0; i < seg.size(); ++i) {
        const GpxTrackPoint& p = seg[i];
        if (!std::isfinite(p.lat) || p.lat < -90 || p.lat > 90 || !std::isfinite(p.lon) || p.lon < -180 || p.lon >= 180)
          throw std::invalid_argument("track '" + t.name + "' point " + std::to_string(i + 1) +
                                      ": latitude must be within -90..90 and longitude within -180..180 (GPX 1.1)");
        // 8 decimals of a degree: about a millimetre.
        out += "      <trkpt lat=\"" + decimal(p.lat, 8) + "\" lon=\"" + decimal(p.lon, 8) + "\">";
        if (p.elevation && std::isfinite(*p.elevation)) out += "<ele>" + decimal(*p.elevation, 2) + "</ele>";
        if (!p.time.empty()) out += "<time>" + xml_text(p.time) + "</time>";
        out += "</trkpt>\n";
      }
      out += "    </trkseg>\n";
    }
    out += "  </trk>\n";
  }
  out += "</gpx>\n";
  return out;
}

}  // namespace cairn::formats
