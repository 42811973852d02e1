// The Canvas as SVG 1.1 elements, for the report (and anything else that wants a
// picture in a file). Coordinates are user units with y down, as the Canvas has
// them; numbers are written with a limited number of decimals; text is escaped
// for XML (and repaired where it is not valid UTF-8), so the result always
// parses as XML (W3C, Extensible Markup Language 1.0, section 2.2 Characters).
//
// Text: `at` is the top of the line of text and `size` its font size; the
// baseline is drawn 0.8 size below `at` (about where Dear ImGui, which places
// text by its top-left corner, draws it with DejaVu Sans).
//
//   SvgCanvas svg(400, 300);
//   svg.set_title("Bedding, unit Kls");
//   draw_net(svg, {0, 0, 400, 300}, data, options);
//   std::string xml = svg.svg();
//
// A large picture (a season's plan, hundreds of thousands of elements) can be
// written into a stream as it is drawn instead of being held whole:
//
//   svg.stream_to(out);   // writes the <svg> start tag; set the title and class first
//   draw_plan(svg, ...);  // each element goes straight into `out`
//   svg.finish();         // closes open groups and the <svg> element
#pragma once
#include <sstream>
#include <string>
#include <string_view>
#include <vector>

#include "app/plot/canvas.h"

namespace cairn::plot {

class SvgCanvas : public Canvas {
 public:
  // A picture `width` x `height` user units; coordinates get `decimals` decimals.
  SvgCanvas(double width, double height, int decimals = 2);
  SvgCanvas(const SvgCanvas&) = delete;  // it points into itself (body_)
  SvgCanvas& operator=(const SvgCanvas&) = delete;

  void polyline(const std::vector<Pt>& pts, Rgba stroke, double width, bool closed = false) override;
  void fill_polygon(const std::vector<Pt>& pts, Rgba fill) override;
  void circle(Pt centre, double radius, Rgba stroke, double width, std::optional<Rgba> fill = std::nullopt) override;
  void marker(Pt centre, Shape shape, double size, Rgba colour, bool filled = true) override;
  void text(Pt at, const std::string& s, Rgba colour, double size, Anchor anchor = Anchor::Start) override;

  // <g class="..."> ... </g> around what is drawn in between (nested groups allowed).
  void begin_group(const std::string& css_class);
  void end_group();

  // Read by screen readers (<title> and aria-label); "" for none.
  void set_title(const std::string& title) { title_ = title; }
  // class attribute of the <svg> element.
  void set_class(const std::string& css_class) { class_ = css_class; }
  // Write width/height attributes (true, the default) or leave the size to CSS.
  void set_fixed_size(bool fixed) { fixed_size_ = fixed; }

  // The whole <svg> element (unclosed groups are closed). Not for a streamed
  // picture (std::logic_error).
  std::string svg() const;

  // From now on, elements are written into `out` (which must outlive the
  // drawing), after the <svg> start tag written here. Only before anything is
  // drawn (std::logic_error otherwise).
  void stream_to(std::ostream& out);
  // Ends a streamed picture: closes open groups and the <svg> element. Once.
  void finish();
  // Number of elements drawn (for tests and for skipping empty pictures).
  std::size_t elements() const { return elements_; }

 private:
  std::string num(double v) const;
  std::string points(const std::vector<Pt>& pts) const;
  void write_start(std::ostream& o) const;

  double width_, height_;
  int decimals_;
  std::ostringstream kept_;  // the body of a picture that is not streamed
  std::ostream* body_;       // kept_, or the stream of stream_to()
  bool streamed_ = false, finished_ = false;
  std::size_t elements_ = 0;
  int open_groups_ = 0;
  std::string title_, class_;
  bool fixed_size_ = true;
};

// Text safe for XML character data and attribute values: & < > " ' become
// entities; bytes that are not valid UTF-8 become U+FFFD; characters XML 1.0 does
// not allow (controls other than tab, newline and carriage return, U+FFFE, U+FFFF)
// are dropped.
std::string xml_escape(std::string_view text);

// v with at most `decimals` decimals, trailing zeros and a lone "-" of "-0"
// removed: 1.5 -> "1.5", 2.0 -> "2", -0.0001 -> "0". Non-finite values give "0"
// (callers skip them before they get here).
std::string svg_number(double v, int decimals = 2);

// "#rrggbb".
std::string svg_colour(Rgba c);

}  // namespace cairn::plot
