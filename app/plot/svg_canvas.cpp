#include "app/plot/svg_canvas.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <stdexcept>
#include <fmt/format.h>

#include "app/plot/symbols.h"

namespace cairn::plot {

namespace {

bool finite(Pt p) { return std::isfinite(p.x) && std::isfinite(p.y); }

bool all_finite(const std::vector<Pt>& pts) {
  for (const auto& p : pts)
    if (!finite(p)) return false;
  return true;
}

// ' fill-opacity="0.5"' (or stroke-opacity) for a colour that is not opaque.
std::string opacity(const char* attr, Rgba c) {
  if (c.a == 255) return "";
  return std::string(" ") + attr + "=\"" + svg_number(c.a / 255.0, 3) + "\"";
}

}  // namespace

std::string svg_number(double v, int decimals) {
  if (!std::isfinite(v)) return "0";
  if (decimals < 0) decimals = 0;
  if (decimals > 9) decimals = 9;
  std::string s = fmt::format("{:.{}f}", v, decimals);
  if (s.find('.') != std::string::npos) {
    while (s.back() == '0') s.pop_back();
    if (s.back() == '.') s.pop_back();
  }
  if (s == "-0") s = "0";
  return s;
}

std::string svg_colour(Rgba c) { return fmt::format("#{:02x}{:02x}{:02x}", c.r, c.g, c.b); }

std::string xml_escape(std::string_view text) {
  std::string out;
  out.reserve(text.size() + 8);
  const auto* s = reinterpret_cast<const unsigned char*>(text.data());
  const size_t n = text.size();
  size_t i = 0;
  while (i < n) {
    const unsigned char b = s[i];
    unsigned cp = 0;
    size_t len = 0;
    // Decode one UTF-8 sequence (RFC 3629): reject overlong forms, surrogates and
    // values beyond U+10FFFF; a bad sequence costs one byte and becomes U+FFFD.
    if (b < 0x80) {
      cp = b, len = 1;
    } else if (b >= 0xC2 && b <= 0xDF) {
      cp = b & 0x1F, len = 2;
    } else if (b >= 0xE0 && b <= 0xEF) {
      cp = b & 0x0F, len = 3;
    } else if (b >= 0xF0 && b <= 0xF4) {
      cp = b & 0x07, len = 4;
    }
    bool ok = len > 0 && i + len <= n;
    for (size_t k = 1; ok && k < len; ++k) {
      if ((s[i + k] & 0xC0) != 0x80)
        ok = false;
      else
        cp = (cp << 6) | (s[i + k] & 0x3F);
    }
    if (ok && len == 3 && (cp < 0x800 || (cp >= 0xD800 && cp <= 0xDFFF))) ok = false;
    if (ok && len == 4 && (cp < 0x10000 || cp > 0x10FFFF)) ok = false;
    if (!ok) {
      out += "\xEF\xBF\xBD";
      ++i;
      continue;
    }
    i += len;
    switch (cp) {
      case '&': out += "&amp;"; continue;
      case '<': out += "&lt;"; continue;
      case '>': out += "&gt;"; continue;
      case '"': out += "&quot;"; continue;
      case '\'': out += "&apos;"; continue;
      default: break;
    }
    // XML 1.0 Char: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]
    if ((cp < 0x20 && cp != 0x9 && cp != 0xA && cp != 0xD) || cp == 0xFFFE || cp == 0xFFFF) continue;
    out.append(text.substr(i - len, len));  // valid: the bytes as they came
  }
  return out;
}

SvgCanvas::SvgCanvas(double width, double height, int decimals)
    : width_(width), height_(height), decimals_(decimals), body_(&kept_) {}

std::string SvgCanvas::num(double v) const { return svg_number(v, decimals_); }

std::string SvgCanvas::points(const std::vector<Pt>& pts) const {
  std::string s;
  for (size_t i = 0; i < pts.size(); ++i) {
    if (i) s += ' ';
    s += num(pts[i].x) + ',' + num(pts[i].y);
  }
  return s;
}

void SvgCanvas::polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed) {
  if (pts.size() < 2 || !all_finite(pts) || !std::isfinite(width)) return;
  *body_ << '<' << (closed ? "polygon" : "polyline") << " points=\"" << points(pts) << "\" fill=\"none\" stroke=\""
         << svg_colour(stroke) << '"' << opacity("stroke-opacity", stroke) << " stroke-width=\"" << num(width)
         << "\" stroke-linejoin=\"round\" stroke-linecap=\"round\"/>\n";
  ++elements_;
}

void SvgCanvas::fill_polygon(const std::vector<Pt>& pts, Rgba fill) {
  if (pts.size() < 3 || !all_finite(pts)) return;
  *body_ << "<polygon points=\"" << points(pts) << "\" fill=\"" << svg_colour(fill) << '"'
         << opacity("fill-opacity", fill) << " stroke=\"none\"/>\n";
  ++elements_;
}

void SvgCanvas::circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill) {
  if (!finite(centre) || !std::isfinite(radius) || radius <= 0 || !std::isfinite(width)) return;
  *body_ << "<circle cx=\"" << num(centre.x) << "\" cy=\"" << num(centre.y) << "\" r=\"" << num(radius) << '"';
  if (fill)
    *body_ << " fill=\"" << svg_colour(*fill) << '"' << opacity("fill-opacity", *fill);
  else
    *body_ << " fill=\"none\"";
  if (width > 0) {
    *body_ << " stroke=\"" << svg_colour(stroke) << '"' << opacity("stroke-opacity", stroke) << " stroke-width=\""
           << num(width) << '"';
  }
  *body_ << "/>\n";
  ++elements_;
}

void SvgCanvas::marker(Pt centre, Shape shape, double size, Rgba colour, bool filled) {
  if (!finite(centre) || !std::isfinite(size) || size <= 0) return;
  const double stroke = std::max(1.0, size / 7);
  if (shape == Shape::Circle) {
    if (filled)
      circle(centre, size / 2, colour, 0, colour);
    else
      circle(centre, size / 2 - stroke / 2, colour, stroke);
    return;
  }
  for (const auto& part : marker_outline(shape, centre, size)) {
    if (filled && marker_fillable(shape))
      fill_polygon(part, colour);
    else
      polyline(part, colour, stroke, false);
  }
}

void SvgCanvas::text(Pt at, const std::string& s, Rgba colour, double size, Anchor anchor) {
  if (!finite(at) || s.empty() || !std::isfinite(size) || size <= 0) return;
  const char* a = anchor == Anchor::Start ? "start" : anchor == Anchor::Middle ? "middle" : "end";
  *body_ << "<text x=\"" << num(at.x) << "\" y=\"" << num(at.y + 0.8 * size) << "\" font-size=\"" << num(size)
         << "\" text-anchor=\"" << a << "\" fill=\"" << svg_colour(colour) << '"' << opacity("fill-opacity", colour)
         << '>' << xml_escape(s) << "</text>\n";
  ++elements_;
}

void SvgCanvas::begin_group(const std::string& css_class) {
  *body_ << "<g";
  if (!css_class.empty()) *body_ << " class=\"" << xml_escape(css_class) << '"';
  *body_ << ">\n";
  ++open_groups_;
}

void SvgCanvas::end_group() {
  if (open_groups_ == 0) return;
  *body_ << "</g>\n";
  --open_groups_;
}

void SvgCanvas::write_start(std::ostream& o) const {
  o << "<svg xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 " << num(width_) << ' ' << num(height_) << '"';
  if (fixed_size_) o << " width=\"" << num(width_) << "\" height=\"" << num(height_) << '"';
  if (!class_.empty()) o << " class=\"" << xml_escape(class_) << '"';
  o << " font-family=\"DejaVu Sans, Verdana, sans-serif\"";
  if (!title_.empty()) o << " role=\"img\" aria-label=\"" << xml_escape(title_) << '"';
  o << ">\n";
  if (!title_.empty()) o << "<title>" << xml_escape(title_) << "</title>\n";
}

std::string SvgCanvas::svg() const {
  if (streamed_) throw std::logic_error("SvgCanvas::svg: this picture was written into a stream");
  std::ostringstream o;
  write_start(o);
  o << kept_.str();
  for (int i = 0; i < open_groups_; ++i) o << "</g>\n";
  o << "</svg>";
  return o.str();
}

void SvgCanvas::stream_to(std::ostream& out) {
  if (streamed_ || elements_ > 0 || open_groups_ > 0 || kept_.tellp() > 0)
    throw std::logic_error("SvgCanvas::stream_to: only before anything is drawn, and once");
  write_start(out);
  body_ = &out;
  streamed_ = true;
}

void SvgCanvas::finish() {
  if (!streamed_ || finished_) throw std::logic_error("SvgCanvas::finish: only once, after stream_to");
  for (; open_groups_ > 0; --open_groups_) *body_ << "</g>\n";
  *body_ << "</svg>";
  finished_ = true;
}

}  // namespace cairn::plot
