// Text entering the program: UTF-8 validation (RFC 3629 section 4, and the
// cases of Markus Kuhn's "UTF-8 decoder capability and stress test":
// overlong forms, surrogates, code points above U+10FFFF), control
// characters (ECMA-48), terminal escaping, and the XML reader's limits and
// encodings (XML 1.0 Fifth Edition section 4.3.3 "Character Encoding in
// Entities"; ISO-8859-1 maps byte 0xE9 to U+00E9).
#include <gtest/gtest.h>

#include <string>

#include "formats/gpx.h"
#include "formats/limits.h"
#include "formats/utf8.h"
#include "formats/xml.h"

using namespace cairn::formats;

TEST(Utf8, AcceptsUtf8AndRefusesWhatRfc3629Forbids) {
  EXPECT_FALSE(find_invalid_utf8("plain"));
  EXPECT_FALSE(find_invalid_utf8("caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x98\x80"));  // é € U+1F600
  EXPECT_FALSE(find_invalid_utf8("\xF4\x8F\xBF\xBF"));                           // U+10FFFF, the last one
  for (const char* bad : {"\xC0\xAF",                                            // overlong '/'
                          "\xE0\x80\xAF",                                        // overlong '/'
                          "\xED\xA0\x80",                                        // U+D800, a surrogate
                          "\xF4\x90\x80\x80",                                    // above U+10FFFF
                          "\xFE", "\x80", "\xC3"}) {  // never in UTF-8; a lone continuation; cut short
    auto f = find_invalid_utf8(std::string("ab\n") + bad);
    ASSERT_TRUE(f) << bad;
    EXPECT_EQ(f->rule, "utf8");
    EXPECT_EQ(f->line, 2);
    EXPECT_EQ(f->column, 1);
  }
}

TEST(Utf8, ControlCharactersAndTerminalEscaping) {
  EXPECT_FALSE(find_text_fault("a\tb", false));
  EXPECT_TRUE(find_text_fault("a\nb", false));
  EXPECT_FALSE(find_text_fault("a\r\nb", true));
  for (const char* c : {"\x1B", "\x07", "\x7F", "\xC2\x9B"}) {  // ESC, BEL, DEL, CSI (C1)
    auto f = find_text_fault(std::string("x") + c, true);
    ASSERT_TRUE(f);
    EXPECT_EQ(f->rule, "control");
    EXPECT_EQ(f->column, 2);
  }
  EXPECT_EQ(terminal_safe("S1\x1B[2J\xC2\x9B"
                          "1m caf\xC3\xA9 \xE9"),
            "S1\\x1B[2J\\u009B1m caf\xC3\xA9 \\xE9");
  auto b = check_text("spur\x1B", "notes");
  ASSERT_TRUE(b);
  EXPECT_EQ(b->rule, "control");
  EXPECT_EQ(b->message, "notes: control character U+001B is not allowed in text at character 5");
}

TEST(Xml, DeepNestingIsRefusedNotACrash) {
  // Today's bug: a stack overflow in the recursive reader.
  std::string deep;
  for (int i = 0; i < 200000; ++i) deep += "<a>";
  auto r = parse_xml(deep, "deep.gpx");
  ASSERT_FALSE(r);
  EXPECT_NE(r.error().find("xml: elements are nested deeper than " + std::to_string(kMaxXmlDepth) + " levels"),
            std::string::npos)
      << r.error();
}

TEST(Xml, ManyAttributesAreRefused) {
  std::string tag = "<a";
  for (int i = 0; i < 5000; ++i) tag += " x" + std::to_string(i) + "='1'";
  auto r = parse_xml(tag + "/>", "many.gpx");
  ASSERT_FALSE(r);
  EXPECT_NE(r.error().find("has more than " + std::to_string(kMaxXmlAttributes) + " attributes"), std::string::npos);
}

TEST(Xml, DoctypesAndEntityDeclarationsAreRefused) {
  // The "billion laughs" entity expansion needs a DTD: none is accepted.
  auto r = parse_xml("<?xml version='1.0'?>\n<!DOCTYPE a [<!ENTITY l 'lol'>]><a>&l;</a>", "e.gpx");
  ASSERT_FALSE(r);
  EXPECT_EQ(r.error().rfind("e.gpx:2:", 0), 0u) << r.error();
  EXPECT_NE(r.error().find(": xml: a DOCTYPE is not accepted"), std::string::npos) << r.error();
}

TEST(Xml, TheDeclaredEncodingIsHonouredOrRefused) {
  auto latin = parse_xml("<?xml version='1.0' encoding='ISO-8859-1'?><a>caf\xE9</a>", "l.gpx");
  ASSERT_TRUE(latin) << latin.error();
  EXPECT_EQ(latin->text, "caf\xC3\xA9");                   // read as U+00E9, held as UTF-8
  auto utf8_wrong = parse_xml("<a>caf\xE9</a>", "u.gpx");  // no declaration: UTF-8, and 0xE9 alone is not
  EXPECT_FALSE(utf8_wrong);
  auto unknown = parse_xml("<?xml version='1.0' encoding='x-unknown-7'?><a/>", "x.gpx");
  ASSERT_FALSE(unknown);
  EXPECT_NE(unknown.error().find("x.gpx:1:"), std::string::npos);
  // UTF-16LE with a byte-order mark (XML 1.0, 4.3.3).
  const std::string u16("\xFF\xFE<\0a\0>\0x\0<\0/\0a\0>\0", 18);
  auto w = parse_xml(u16, "w.gpx");
  ASSERT_TRUE(w) << w.error();
  EXPECT_EQ(w->text, "x");
}

TEST(Gpx, ControlCharactersInWaypointTextAreRefused) {
  // GPX 1.1 schema: name is xsd:string; XML 1.0 allows DEL and C1 characters,
  // which still drive terminals (ECMA-48), so they are refused.
  GpxFile g = parse_gpx(
      "<gpx xmlns='http://www.topografix.com/GPX/1/1' version='1.1' creator='x'>\n"
      "<wpt lat='1' lon='2'><name>S\xC2\x9B"
      "1</name></wpt></gpx>",
      "c.gpx");
  ASSERT_EQ(g.errors.size(), 1u);
  EXPECT_NE(g.errors[0].find("c.gpx:2:22: control: name: control character U+009B"), std::string::npos) << g.errors[0];
  EXPECT_TRUE(g.waypoints.empty());
}
