// The CSV reader (formats/csv.h) against RFC 4180 ("Common Format and MIME
// Type for Comma-Separated Values (CSV) Files", section 2, rules 1-7), with the
// line ends of older spreadsheets (a lone CR, common practice, no published
// source), and the writer's formula neutralisation from OWASP's "CSV
// Injection" guidance (cells beginning with = + - @ tab CR).
#include <gtest/gtest.h>

#include "formats/csv.h"

using namespace cairn::formats;

namespace {
CsvTable ok(std::string_view text) {
  auto t = parse_csv(text, "t.csv");
  EXPECT_TRUE(t.ok()) << t.error();
  return t.ok() ? *t : CsvTable{};
}
std::string error(std::string_view text) {
  auto t = parse_csv(text, "t.csv");
  return t.ok() ? "no error" : t.error();
}
}  // namespace

TEST(Csv, Rfc4180Rule1And2_CrlfLineEndsAndAnOptionalLastLineEnd) {
  const CsvTable a = ok("a,b\r\n1,2\r\n3,4");
  ASSERT_EQ(a.rows.size(), 2u);
  EXPECT_EQ(a.rows[1], (std::vector<std::string>{"3", "4"}));
  EXPECT_EQ(a.row_lines, (std::vector<int>{2, 3}));
}

TEST(Csv, ALoneCrEndsALineToo) {
  // Today's bug: a CR-only file read as one header row.
  const CsvTable a = ok("a,b\r1,2\r3,4\r");
  EXPECT_EQ(a.header, (std::vector<std::string>{"a", "b"}));
  ASSERT_EQ(a.rows.size(), 2u);
  EXPECT_EQ(a.rows[0], (std::vector<std::string>{"1", "2"}));
  EXPECT_EQ(a.row_lines, (std::vector<int>{2, 3}));
  // Errors name the right line in a CR-only file.
  EXPECT_EQ(error("a,b\r1,2\r3\r"), "t.csv:3:1: csv: 1 fields, but the header has 2");
}

TEST(Csv, Rfc4180Rule3_TheHeaderHasTheSameNumberOfFields) {
  EXPECT_EQ(error("a,b\n1,2,3\n"), "t.csv:2:1: csv: 3 fields, but the header has 2");
  EXPECT_EQ(error("a,a\n1,2\n"), "t.csv:1:1: csv: column 'a' appears twice in the header");
  EXPECT_EQ(error(""), "t.csv:1:1: csv: the file is empty (no header line)");
}

TEST(Csv, Rfc4180Rule5To7_QuotedFieldsWithCommasLineBreaksAndDoubledQuotes) {
  const CsvTable a = ok("a,b\n\"x, y\",\"say \"\"hi\"\"\"\n\"two\nlines\",z\n");
  ASSERT_EQ(a.rows.size(), 2u);
  EXPECT_EQ(a.rows[0][0], "x, y");
  EXPECT_EQ(a.rows[0][1], "say \"hi\"");
  EXPECT_EQ(a.rows[1][0], "two\nlines");
  EXPECT_EQ(a.row_lines, (std::vector<int>{2, 3}));
  EXPECT_EQ(error("a\n\"open\n"), "t.csv:2:1: csv: a quoted field is not closed before the end of the file");
  EXPECT_EQ(error("a,b\nx\"y\",1\n"), "t.csv:2:1: csv: a quote inside an unquoted field (column 1)");
}

TEST(Csv, SpacesAfterAClosingQuoteAreNotPartOfTheField) {
  // RFC 4180 rule 4: spaces are part of a field; a quoted field ends at its
  // closing quote, so spaces after it are padding (today's bug: they were kept).
  const CsvTable a = ok("a,b\n\"x\"  ,\"y\"\t\n");
  EXPECT_EQ(a.rows[0], (std::vector<std::string>{"x", "y"}));
  EXPECT_EQ(error("a,b\n\"x\" z,1\n"), "t.csv:2:1: csv: text after a closing quote (column 1)");
}

TEST(Csv, Utf16InputGetsAClearError) {
  // UTF-16LE with its byte-order mark (FF FE), as spreadsheets write "Unicode text".
  const std::string utf16(
      "\xFF\xFE"
      "a\0,\0b\0\n\0",
      10);
  EXPECT_EQ(error(utf16),
            "t.csv:1:1: encoding: the file is UTF-16 or UTF-32 text; save it as UTF-8 (\"CSV UTF-8\") and import it "
            "again");
  const std::string utf16be("\0a\0,\0b\0\n", 8);  // no byte-order mark
  EXPECT_NE(error(utf16be).find(": encoding: "), std::string::npos);
}

TEST(Csv, InvalidUtf8AndControlCharactersAreRefusedWithLineAndColumn) {
  // RFC 3629: 0xE9 alone (Latin-1 "é") is not UTF-8.
  EXPECT_EQ(error("a,b\nx,caf\xE9\n"), "t.csv:2:6: utf8: invalid UTF-8 (byte 0xE9); save the file as UTF-8");
  // ECMA-48: ESC (0x1B) starts a terminal control sequence.
  EXPECT_EQ(error("a,b\r\nx,\x1B[2J\r\n"), "t.csv:2:3: control: control character U+001B is not allowed in text");
  // A UTF-8 byte-order mark is ignored, and UTF-8 text is kept as it is.
  EXPECT_EQ(ok("\xEF\xBB\xBF"
               "a\ncaf\xC3\xA9\n")
                .rows[0][0],
            "caf\xC3\xA9");
}

TEST(Csv, FormulaPrefixesAreNeutralisedOnWritingAndUndoneOnReading) {
  EXPECT_EQ(csv_record({"=HYPERLINK(\"x\")", "+1+2", "@SUM(A1)", "-12.5", "12", "-", "'=x"}),
            "\"'=HYPERLINK(\"\"x\"\")\",'+1+2,'@SUM(A1),-12.5,12,'-,''=x\n");
  for (const char* cell : {"=1+2", "+1", "-12.5", "-x", "@a", "'=x", "''+y", "plain", "'quoted", ""})
    EXPECT_EQ(from_formula_safe(formula_safe(cell)), cell);
}
