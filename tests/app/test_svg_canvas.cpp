// SvgCanvas: what it writes must parse as XML and give back the text it was given.
//
// Outside references:
//  - W3C, Extensible Markup Language (XML) 1.0 (Fifth Edition): section 2.2 (the
//    characters a document may hold) and 2.4 (&lt; &amp; &gt; &apos; &quot;);
//  - Python's xml.etree.ElementTree (Debian /usr/bin/python3) as the parser;
//  - Unicode Standard, section 3.9 "U+FFFD Substitution of Maximal Subparts" and
//    RFC 3629 (UTF-8: no overlong forms, no surrogates) for broken input;
//  - SVG 1.1 (W3C), the element and attribute names.
#include <gtest/gtest.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <memory>
#include <string>
#include <unistd.h>

#include <sstream>
#include <stdexcept>

#include "app/plot/svg_canvas.h"
#include "app/plot/symbols.h"

using namespace cairn::plot;

namespace {

// Runs Debian's python3 on a file and returns its standard output.
std::string run_python(const std::string& script, const std::string& file) {
  const std::string cmd = "/usr/bin/python3 -c '" + script + "' '" + file + "' 2>&1";
  std::unique_ptr<FILE, int (*)(FILE*)> p(popen(cmd.c_str(), "r"), pclose);
  if (!p) return "popen failed";
  std::string out;
  std::array<char, 4096> buf{};
  size_t n;
  while ((n = fread(buf.data(), 1, buf.size(), p.get())) > 0) out.append(buf.data(), n);
  return out;
}

std::string temp_file(const std::string& name, const std::string& text) {
  const auto path = std::filesystem::temp_directory_path() / (name + "-" + std::to_string(::getpid()));
  std::ofstream f(path, std::ios::binary);
  f << text;
  return path.string();
}

}  // namespace

TEST(SvgCanvas, NumbersHaveLimitedDecimals) {
  // C printf "%.Nf" rounding, then trailing zeros dropped (common practice, no
  // published source); "-0" would be legal SVG but is noise.
  EXPECT_EQ(svg_number(1.5), "1.5");
  EXPECT_EQ(svg_number(2.0), "2");
  EXPECT_EQ(svg_number(1234.5678), "1234.57");
  EXPECT_EQ(svg_number(-0.0001), "0");
  EXPECT_EQ(svg_number(-12.25, 1), "-12.2");  // 12.25 is not exact in binary: 12.2499...
  EXPECT_EQ(svg_number(0.333333, 3), "0.333");
  EXPECT_EQ(svg_number(100.0, 0), "100");
}

TEST(SvgCanvas, EscapesTheFivePredefinedEntities) {
  // XML 1.0 section 2.4.
  EXPECT_EQ(xml_escape("a<b & c>d \"e\" 'f'"), "a&lt;b &amp; c&gt;d &quot;e&quot; &apos;f&apos;");
  // Valid UTF-8 passes unchanged: α (2 bytes), € (3), 𝛼 (4).
  EXPECT_EQ(xml_escape("\xCE\xB1 \xE2\x82\xAC \xF0\x9D\x9B\xBC"), "\xCE\xB1 \xE2\x82\xAC \xF0\x9D\x9B\xBC");
}

TEST(SvgCanvas, RepairsWhatXmlCannotHold) {
  // XML 1.0 section 2.2: no C0 controls but tab, LF, CR.
  EXPECT_EQ(xml_escape(std::string("a\x01"
                                   "b\x1F"
                                   "c\td",
                                   7)),
            "abc\td");
  // Unicode 3.9 / RFC 3629: a stray continuation byte, an invalid lead byte, an
  // overlong "/" and an encoded surrogate each become U+FFFD per bad byte.
  EXPECT_EQ(xml_escape("x\x80y"), "x\xEF\xBF\xBDy");
  EXPECT_EQ(xml_escape("x\xFFy"), "x\xEF\xBF\xBDy");
  EXPECT_EQ(xml_escape("\xC0\xAF"), "\xEF\xBF\xBD\xEF\xBF\xBD");
  EXPECT_EQ(xml_escape("\xED\xA0\x80"), "\xEF\xBF\xBD\xEF\xBF\xBD\xEF\xBF\xBD");
  // A sequence cut short by the end of the text.
  EXPECT_EQ(xml_escape("ab\xE2\x82"), "ab\xEF\xBF\xBD\xEF\xBF\xBD");
}

TEST(SvgCanvas, OutputParsesAsXmlAndKeepsTheText) {
  SvgCanvas c(200, 100, 2);
  c.set_title("Title with <tags> & \"quotes\"");
  c.set_class("net");
  c.begin_group("poles");
  c.polyline({{0, 0}, {10.123456, 20}, {30, 40}}, kInk, 1.5);
  c.polyline({{0, 0}, {10, 0}, {10, 10}}, Rgba{1, 2, 3, 128}, 1, true);
  c.fill_polygon({{0, 0}, {5, 0}, {5, 5}}, kOkabeIto[1]);
  c.circle({50, 50}, 20, kInk, 1);
  c.circle({50, 50}, 5, kInk, 0, kOkabeIto[2]);
  for (Shape s : {Shape::Circle, Shape::Square, Shape::Triangle, Shape::Diamond, Shape::Cross, Shape::Plus}) {
    c.marker({20, 20}, s, 8, kInk, true);
    c.marker({20, 20}, s, 8, kInk, false);
  }
  // Open group left for svg() to close.
  c.begin_group("labels");
  c.text({10, 10},
         "Unit <Kb> & \"marl\" 'q' \xCE\xB1"
         "95 \x01 \xFF",
         kInk, 11, Anchor::Middle);
  // Non-finite coordinates are skipped, not written as "nan".
  c.polyline({{0, 0}, {std::nan(""), 1}}, kInk, 1);
  c.text({std::nan(""), 0}, "lost", kInk, 11);

  const std::string svg = c.svg();
  EXPECT_EQ(svg.find("nan"), std::string::npos);
  EXPECT_EQ(svg.find("lost"), std::string::npos);
  EXPECT_NE(svg.find("10.12,20"), std::string::npos) << "two decimals";
  const std::string file = temp_file("cairn-svg-test.svg", svg);
  // Parse with Python's XML parser; print the root tag, the number of elements of each
  // kind, the title and the text back (as code points, to compare exactly).
  const std::string script =
      "import sys, xml.etree.ElementTree as ET\n"
      "ns = \"{http://www.w3.org/2000/svg}\"\n"
      "root = ET.parse(sys.argv[1]).getroot()\n"
      "print(root.tag)\n"
      "for k in (\"polyline\", \"polygon\", \"circle\", \"text\", \"g\"):\n"
      "    print(k, len(root.findall(\".//\" + ns + k)))\n"
      "print(\"title\", ascii(root.find(ns + \"title\").text))\n"
      "print(\"text\", ascii(root.find(\".//\" + ns + \"text\").text))\n";
  std::string script_quoted;
  for (char ch : script) script_quoted += ch == '\'' ? std::string("'\\''") : std::string(1, ch);
  const std::string out = run_python(script_quoted, file);
  std::filesystem::remove(file);
  EXPECT_NE(out.find("{http://www.w3.org/2000/svg}svg\n"), std::string::npos) << out;
  // 1 open polyline, the open outlines of square, triangle and diamond, and two
  // strokes each for Cross and Plus, filled or not: 1 + 3 + 4 + 4 = 12. Polygons: the
  // closed polyline, the filled polygon and three filled markers; circles: 2 + 2.
  EXPECT_NE(out.find("polyline 12\n"), std::string::npos) << out;
  EXPECT_NE(out.find("polygon 5\n"), std::string::npos) << out;
  EXPECT_NE(out.find("circle 4\n"), std::string::npos) << out;
  EXPECT_NE(out.find("g 2\n"), std::string::npos) << out;
  EXPECT_NE(out.find("text 1\n"), std::string::npos) << out;
  EXPECT_NE(out.find("title 'Title with <tags> & \"quotes\"'"), std::string::npos) << out;
  // The control character is dropped and the bad byte becomes U+FFFD.
  EXPECT_NE(out.find("text 'Unit <Kb> & \"marl\" \\'q\\' \\u03b195  \\ufffd'"), std::string::npos) << out;
}

// A picture written into a stream as it is drawn (the report's plan) is the
// same document, byte for byte, as the one held whole and parsed as XML above.
TEST(SvgCanvas, AStreamedPictureIsTheSameDocument) {
  auto draw = [](SvgCanvas& c) {
    c.begin_group("points");
    for (int i = 0; i < 50; ++i) c.marker({i * 1.5, 100 - i * 0.75}, Shape::Diamond, 6, kOkabeIto[i % 3], i % 2 == 0);
    c.end_group();
    c.begin_group("labels");  // left open: svg() and finish() close it
    c.text({5, 5}, "K<b> & \"q\"", kInk, 10);
    c.polyline({{0, 0}, {std::nan(""), 1}}, kInk, 1);
  };
  SvgCanvas whole(200, 100, 1), streamed(200, 100, 1);
  for (SvgCanvas* c : {&whole, &streamed}) {
    c->set_title("Plan & key");
    c->set_class("plan");
    c->set_fixed_size(false);
  }
  draw(whole);
  std::ostringstream out;
  out << "<figure>";
  streamed.stream_to(out);
  draw(streamed);
  streamed.finish();
  EXPECT_EQ(out.str(), "<figure>" + whole.svg());
  EXPECT_EQ(streamed.elements(), whole.elements());
  // Held whole and streamed are not mixed up: a streamed picture has no svg(),
  // and a picture already drawn into cannot start streaming.
  EXPECT_THROW((void)streamed.svg(), std::logic_error);
  EXPECT_THROW(streamed.finish(), std::logic_error);
  std::ostringstream late;
  EXPECT_THROW(whole.stream_to(late), std::logic_error);
  EXPECT_TRUE(late.str().empty());
}

TEST(SvgCanvas, FixedOrFluidSize) {
  SvgCanvas c(320.5, 100);
  EXPECT_NE(c.svg().find("viewBox=\"0 0 320.5 100\" width=\"320.5\" height=\"100\""), std::string::npos);
  c.set_fixed_size(false);
  EXPECT_EQ(c.svg().find("width="), std::string::npos);
  EXPECT_EQ(c.elements(), 0u);
}

TEST(Symbols, SeveritiesDifferInShape) {
  // The naming sheet's rule: severities are told apart by word and shape, never by
  // colour alone - so the four shapes must all differ.
  const Shape a = severity_shape("note"), b = severity_shape("query"), c = severity_shape("conflict"),
              d = severity_shape("hazard");
  EXPECT_NE(a, b);
  EXPECT_NE(a, c);
  EXPECT_NE(a, d);
  EXPECT_NE(b, c);
  EXPECT_NE(b, d);
  EXPECT_NE(c, d);
  // ISO 3864-1: the warning sign is a triangle.
  EXPECT_EQ(d, Shape::Triangle);
}

TEST(Symbols, UnitColoursComeFromOkabeIto) {
  // Okabe & Ito (2008): orange #E69F00, sky blue #56B4E9, ..., after black.
  const Rgba orange = unit_colour("", 0), sky = unit_colour("", 1);
  EXPECT_EQ(svg_colour(orange), "#e69f00");
  EXPECT_EQ(svg_colour(sky), "#56b4e9");
  EXPECT_EQ(svg_colour(unit_colour("", 7)), "#e69f00") << "seven colours, then round again";
  EXPECT_EQ(svg_colour(unit_colour("#123ABC", 0)), "#123abc") << "a unit's own colour wins";
  EXPECT_EQ(svg_colour(unit_colour("red", 2)), "#009e73") << "unparseable: palette";
}

TEST(Symbols, MarkerOutlinesFillTheirSize) {
  // Plain geometry: a marker `size` wide spans size in x (value from the definition).
  for (Shape s : {Shape::Circle, Shape::Square, Shape::Triangle, Shape::Diamond, Shape::Cross, Shape::Plus}) {
    double lo = 1e9, hi = -1e9;
    for (const auto& part : marker_outline(s, {100, 50}, 10))
      for (const auto& p : part) lo = std::min(lo, p.x), hi = std::max(hi, p.x);
    EXPECT_NEAR(hi - lo, 10, 1e-9) << static_cast<int>(s);
    EXPECT_NEAR((hi + lo) / 2, 100, 1e-9) << static_cast<int>(s);
  }
  EXPECT_FALSE(marker_fillable(Shape::Cross));
  EXPECT_TRUE(marker_fillable(Shape::Triangle));
}
