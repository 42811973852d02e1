// The CSV reader (formats/csv.h) against RFC 4180 ("Common Format and MIME
// Type for Comma-Separated Values (CSV) Files", section 2, rules 1-7), with the
// line ends of older spreadsheets (a lone CR, common practice, no published
// source), and the writer's formula neutralisation from OWASP's "CSV
// Injection" guidance (cells beginning with = + - @ tab CR).
#include <gtest/gtest.h>
#include <unistd.h>

#include <cstdio>
#include <filesystem>
#include <fstream>

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

namespace {
// Writes TEXT to a new file in the temporary folder and gives its path.
std::string write_temp(const std::string& name, const std::string& text) {
  const std::string path =
      (std::filesystem::temp_directory_path() / (name + "-" + std::to_string(::getpid()) + "-" +
                                                 ::testing::UnitTest::GetInstance()->current_test_info()->name()))
          .string();
  std::ofstream(path, std::ios::binary) << text;
  return path;
}
}  // namespace

TEST(Csv, AFileIsCheckedInPiecesWithTheLineAndColumnOfTheWholeText) {
  // The file is read in 64 KiB pieces; a fault far past the first piece keeps
  // the line and column counted from the top (LF, CRLF and lone-CR line ends,
  // RFC 4180 and common practice; 0xE9 alone is not UTF-8, RFC 3629).
  for (const std::string end : {"\n", "\r\n", "\r"}) {
    std::string text = "a,b" + end;
    for (int i = 0; i < 20000; ++i) text += "S" + std::to_string(i) + ",x" + end;  // lines 2..20001
    text += "x,caf\xE9" + end;                                                     // line 20002, column 6
    const std::string path = write_temp("fault", text);
    EXPECT_EQ(check_csv_file(path, "t.csv"), "t.csv:20002:6: utf8: invalid UTF-8 (byte 0xE9); save the file as UTF-8");
    EXPECT_EQ(check_csv_text(text, "t.csv"), check_csv_file(path, "t.csv"));
    std::remove(path.c_str());
  }
  // ECMA-48: ESC is a control character; the byte-order mark is not counted as a column.
  const std::string path = write_temp("esc", "\xEF\xBB\xBF" + std::string("a,b\nx,y\n\x1B,z\n"));
  EXPECT_EQ(check_csv_file(path, "t.csv"), "t.csv:3:1: control: control character U+001B is not allowed in text");
  std::remove(path.c_str());
  const std::string clean = write_temp("clean", "a,b\n1,2\n");
  EXPECT_EQ(check_csv_file(clean, "t.csv"), std::nullopt);
  std::remove(clean.c_str());
  EXPECT_EQ(check_csv_file("/nonexistent/x.csv", "x.csv").value_or("").rfind("cannot read /nonexistent/x.csv: ", 0),
            0u);
}

TEST(Csv, TheReaderGivesRowsOneByOneAcrossPieces) {
  // RFC 4180 rules 6 and 7: a quoted field holds line breaks and doubled
  // quotes; here one longer than a 64 KiB piece, so it is cut between pieces.
  std::string big;
  for (int i = 0; i < 30000; ++i) big += i % 1000 == 999 ? "\"\"\n" : "ab";
  const std::string expected_big = [&] {
    std::string s;
    for (int i = 0; i < 30000; ++i) s += i % 1000 == 999 ? "\"\n" : "ab";
    return s;
  }();
  const std::string text = "\xEF\xBB\xBF" + std::string("name,notes\r\nS1,\"") + big + "\"\r\n\r\nS2,plain\r\n";
  const std::string path = write_temp("rows", text);
  auto r = CsvReader::open(path, "t.csv");
  ASSERT_TRUE(r.ok()) << r.error();
  CsvReader& in = r.value();
  ASSERT_TRUE(in.read_header()) << in.error();
  EXPECT_EQ(in.header(), (std::vector<std::string>{"name", "notes"}));
  EXPECT_EQ(in.header_line(), 1);
  ASSERT_TRUE(in.next()) << in.error();
  EXPECT_EQ(in.line(), 2);
  EXPECT_EQ(in.row()[0], "S1");
  EXPECT_EQ(in.row()[1], expected_big);
  ASSERT_TRUE(in.next()) << in.error();
  EXPECT_EQ(in.line(), 2 + 30 + 2);  // the 30 line breaks inside the field, then a blank line
  EXPECT_EQ(in.row(), (std::vector<std::string>{"S2", "plain"}));
  EXPECT_FALSE(in.next());
  EXPECT_EQ(in.error(), "");
  EXPECT_EQ(in.rows(), 2u);
  std::remove(path.c_str());
  // A malformed row stops the reader with parse_csv's message.
  const std::string bad = write_temp("bad", "a,b\n1,2\n3\n");
  auto b = CsvReader::open(bad, "t.csv");
  ASSERT_TRUE(b.ok());
  ASSERT_TRUE(b.value().read_header());
  EXPECT_TRUE(b.value().next());
  EXPECT_FALSE(b.value().next());
  EXPECT_EQ(b.value().error(), "t.csv:3:1: csv: 1 fields, but the header has 2");
  std::remove(bad.c_str());
}
