// The verbs' argument rules (app/cli/command.h), checked in-process through the
// verbs library. Source: the POSIX Utility Syntax Guidelines (POSIX.1-2017, XBD
// 12.2: guideline 7, option-arguments are not optional; an option's argument is
// the next word) and common practice for GNU-style long options ("--opt=VALUE");
// the rules that a repeated option is an error and that a value may not itself be
// a long option are the project's own (common practice, no published source).
#include <gtest/gtest.h>

#include <sstream>

#include "app/cli/command.h"

using namespace cairn::cli;

namespace {

struct Ran {
  int status;
  std::string out, err;
};

Ran run(const std::string& verb, const Args& args) {
  const Command* c = find_command(verb);
  EXPECT_NE(c, nullptr) << verb;
  std::ostringstream out, err;
  const int status = c ? run_command(*c, args, out, err) : -1;
  return {status, out.str(), err.str()};
}

}  // namespace

TEST(CliArguments, EveryVerbHasGeneratedUsage) {
  ASSERT_GE(commands().size(), 10u);
  for (const auto& c : commands()) {
    const std::string u = usage_of(c);
    EXPECT_NE(u.find("Usage: cairn " + c.name), std::string::npos) << u;
    EXPECT_NE(u.find("--help"), std::string::npos) << u;
    EXPECT_FALSE(c.summary.empty()) << c.name;
  }
}

TEST(CliArguments, AFlagGivenTwiceIsNamed) {
  const Ran r = run("check", {"x.cairn", "--json", "--json"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("--json given more than once"), std::string::npos) << r.err;
}

TEST(CliArguments, AnOptionsValueMayNotBeAnOption) {
  const Ran r = run("fit", {"points.csv", "--interval", "--json"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("--interval: needs a value, not the option --json"), std::string::npos) << r.err;
}

TEST(CliArguments, UnknownOptionsAndSurplusArgumentsAreNamed) {
  Ran r = run("list", {"a.cairn", "stations", "--bogus"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("unknown option --bogus"), std::string::npos) << r.err;
  r = run("list", {"a.cairn", "stations", "extra"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("unexpected argument extra"), std::string::npos) << r.err;
  r = run("list", {"a.cairn"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("KIND is required"), std::string::npos) << r.err;
}

TEST(CliArguments, NumbersGoThroughTheOneNumberReader) {
  // geomath/decimal.h refuses exponents and hexadecimal everywhere.
  for (const char* bad : {"1e3", "0x10", "nan"}) {
    const Ran r = run("check", {"x.cairn", "--nearby", bad});
    EXPECT_EQ(r.status, 2) << bad;
    EXPECT_NE(r.err.find("is not a number"), std::string::npos) << r.err;
  }
  const Ran r = run("check", {"x.cairn", "--friction=95"});
  EXPECT_EQ(r.status, 2);
  EXPECT_NE(r.err.find("95 is outside 0 to 89"), std::string::npos) << r.err;
}

TEST(CliArguments, HelpGoesToStandardOutputWithStatusZero) {
  const Ran r = run("export", {"--help"});
  EXPECT_EQ(r.status, 0);
  EXPECT_NE(r.out.find("OUT.gpkg"), std::string::npos) << r.out;
  EXPECT_TRUE(r.err.empty()) << r.err;
}
