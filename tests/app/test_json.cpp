// app/cli/json.h against the standard RFC 8259 (The JSON Data Interchange Format):
// section 7 (strings: quotation mark, reverse solidus and control characters
// U+0000..U+001F must be escaped; the two-character forms \" \\ \b \f \n \r \t
// may be used), section 6 (numbers: no NaN or Infinity, so those become null),
// sections 4-5 (objects and arrays, members separated by commas).
#include <gtest/gtest.h>

#include <cmath>
#include <optional>
#include <sstream>

#include "app/cli/json.h"

using cairn::cli::JsonWriter;

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
