// formats/json.h against the standard RFC 8259 (The JSON Data Interchange Format):
// section 7 (strings: quotation mark, reverse solidus and control characters
// U+0000..U+001F must be escaped; the two-character forms \" \\ \b \f \n \r \t
// may be used), section 6 (numbers: no NaN or Infinity, so those become null),
// sections 4-5 (objects and arrays, members separated by commas).
#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <sstream>

#include "formats/json.h"

using cairn::formats::flat_json_object;
using cairn::formats::JsonWriter;

TEST(JsonWriter, EscapesStringsPerRfc8259) {
  EXPECT_EQ(JsonWriter::escape("plain"), "plain");
  EXPECT_EQ(JsonWriter::escape("a\"b"), "a\\\"b");
  EXPECT_EQ(JsonWriter::escape("a\\b"), "a\\\\b");
  EXPECT_EQ(JsonWriter::escape("\n\r\t\b\f"), "\\n\\r\\t\\b\\f");
  EXPECT_EQ(JsonWriter::escape(std::string("\x01\x1f", 2)), "\\u0001\\u001f");
  EXPECT_EQ(JsonWriter::escape(std::string("\0", 1)), "\\u0000");
  EXPECT_EQ(JsonWriter::escape("Fernández 10.5°"), "Fernández 10.5°");  // UTF-8 passes through
}

TEST(JsonWriter, NestsWithCommasAndNulls) {
  std::ostringstream s;
  JsonWriter j(s);
  j.begin_object();
  j.key("dip").value(10.5);
  j.key("cone").value(std::optional<double>{});
  j.key("nan").value(std::nan(""));
  j.key("inf").value(INFINITY);
  j.key("ok").value(true);
  j.key("n").value(3);
  j.key("list").begin_array();
  j.begin_object().key("a").value("x").end_object();
  j.value(-0.0);
  j.array(std::vector<double>{1, 2.25});
  j.end_array();
  j.key("empty").begin_object().end_object();
  j.end_object();
  EXPECT_EQ(s.str(),
            "{\"dip\":10.5,\"cone\":null,\"nan\":null,\"inf\":null,\"ok\":true,\"n\":3,"
            "\"list\":[{\"a\":\"x\"},0,[1,2.25]],\"empty\":{}}");
}

TEST(JsonWriter, TwelveSignificantDigitsByDefault) {
  std::ostringstream s;
  JsonWriter j(s);
  j.begin_array().value(10.519940383).value(1.0 / 3.0).value(5200000.123456).end_array();
  EXPECT_EQ(s.str(), "[10.519940383,0.333333333333,5200000.12346]");
}

// RFC 8259 section 8.1: JSON text exchanged between systems is UTF-8. Text from a
// file that is not valid UTF-8 (here Latin-1 "é", 0xE9, and a lone continuation
// byte) must not make the output invalid: each bad byte becomes U+FFFD (the
// replacement character, The Unicode Standard, section 3.9, "U+FFFD Substitution").
TEST(JsonWriter, InvalidUtf8BecomesReplacementCharacter) {
  EXPECT_EQ(JsonWriter::escape(std::string("caf\xe9", 4)), "caf\xef\xbf\xbd");
  EXPECT_EQ(JsonWriter::escape(std::string("a\x80z", 3)), "a\xef\xbf\xbdz");
  EXPECT_EQ(JsonWriter::quote("x"), "\"x\"");
}

// RFC 8259 section 7: "\r" is carriage return and "\u0001" is U+0001 inside a
// string; an audit row written by SQLite's json_object (SQLite documentation,
// "JSON Functions") must read back with both intact.
TEST(FlatJsonObject, ReadsEscapesAsRfc8259Defines) {
  auto m = flat_json_object(R"({"notes":"a\rb\u0001c\u00e9","dip":40.5,"unit":null,"ok":true})");
  EXPECT_EQ(m["notes"], std::string("a\rb\x01"
                                    "c\xc3\xa9"));
  EXPECT_EQ(m["dip"], "40.5");
  EXPECT_EQ(m["unit"], "");
  EXPECT_EQ(m["ok"], "true");
}

TEST(FlatJsonObject, RefusesWhatIsNotOneObject) {
  EXPECT_TRUE(flat_json_object("[1,2]").empty());
  EXPECT_TRUE(flat_json_object("{\"a\":").empty());
  EXPECT_TRUE(flat_json_object(std::string(100, '{')).empty());
  EXPECT_TRUE(flat_json_object("{\"a\":1}", 3).empty());  // over the size bound
}
