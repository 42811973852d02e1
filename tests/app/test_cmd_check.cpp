// `cairn check` from the shell: exit status, the warning for readings dated
// outside the magnetic model's validity (WMM2025 is valid from 2025.0 to 2030.0,
// as the WMM2025 technical report states; the same range is in
// tests/reference/data/README.md), the project's nearby and screening settings
// (flexural toppling after Goodman & Bray, 1976: layers dipping into a face
// within the window of its opposite dip direction, (90 - dip) + friction <= face
// dip), and repeats marked in a planes CSV.
#include "tests/app/cli_test_support.h"

using cairn::cli_test::CliTest;
using cairn::cli_test::Outcome;

namespace {

class CmdCheck : public CliTest {
 protected:
  // A project with one station and one bedding reading taken at TIME.
  std::string project_with_reading_on(const std::string& name, const std::string& time) {
    write(name + "-s.csv", "station,lat,lon,elevation\nS1,61.2,-135.6,900\n");
    write(name + "-p.csv", "station,kind,strike,dip,time\nS1,bedding,30,40," + time + "\n");
    EXPECT_EQ(cairn("new " + name + ".cairn --name t --utm 8N").status, 0);
    EXPECT_EQ(cairn("import " + name + ".cairn stations " + name + "-s.csv").status, 0);
    EXPECT_EQ(cairn("import " + name + ".cairn planes " + name + "-p.csv").status, 0);
    return name + ".cairn";
  }
};

// The flags part of `check --json` (the fits and where-next lists follow the
// files' record order, which a merge may change).
std::string flags_of(const std::string& json) {
  const size_t a = json.find("\"flags\":"), b = json.find("\"where_next\":");
  return a == std::string::npos || b == std::string::npos ? std::string() : json.substr(a, b - a);
}

}  // namespace

TEST_F(CmdCheck, WarnsForReadingsOutsideTheModelsValidity) {
  const Outcome old = cairn("check " + project_with_reading_on("old", "2021-06-01T10:00:00Z"));
  EXPECT_EQ(old.status, 0);
  EXPECT_NE(old.err.find("warning: 1 reading is dated outside WMM2025's validity (2025 to 2030)"), std::string::npos)
      << old.err;
  const Outcome now = cairn("check " + project_with_reading_on("new", "2026-07-06T10:00:00Z"));
  EXPECT_EQ(now.status, 0);
  EXPECT_EQ(now.err.find("validity"), std::string::npos) << now.err;
  EXPECT_NE(now.out.find("0 flags"), std::string::npos) << now.out;
}

TEST_F(CmdCheck, NearbyComparisonIsAProjectSetting) {
  // A bedding reading that names no contact, at demo station MT-18 beside the Tolm
  // unconformity (laid out 200/20, demo_project/README.md), dipping 60 degrees to
  // 190: 45 degrees or more from the contact's plane, so once compared it is a misfit.
  // The setting is stored in the project file, so a camp file made with it checks
  // the same as `--nearby`.
  ASSERT_EQ(cairn("demo demo").status, 0);
  write("odd.csv", "station,kind,strike,dip,ref\nMT-18,bedding,100,60,MT-18x\n");
  ASSERT_EQ(cairn("import demo/camp.cairn planes odd.csv").status, 0);
  ASSERT_EQ(cairn("new camp.cairn --name camp --utm 8N --nearby 300").status, 0);
  ASSERT_EQ(cairn("merge camp.cairn demo/camp.cairn").status, 0);
  const Outcome off = cairn("check demo/camp.cairn --json");
  const Outcome on = cairn("check demo/camp.cairn --json --nearby 300");
  const Outcome setting = cairn("check camp.cairn --json");
  EXPECT_EQ(off.out.find("MT-18x"), std::string::npos);
  EXPECT_NE(on.out.find("\"rule\":\"misfit\",\"severity\":\"conflict\",\"station\":\"MT-18\",\"ref\":\"MT-18x\""),
            std::string::npos);
  EXPECT_FALSE(flags_of(on.out).empty());
  EXPECT_EQ(flags_of(setting.out), flags_of(on.out));
  // A bad radius is refused and nothing is made.
  const Outcome bad = cairn("new bad.cairn --name bad --nearby -5");
  EXPECT_EQ(bad.status, 2);
  EXPECT_NE(bad.err.find("--nearby '-5' must be a distance from 0 to 100000 metres"), std::string::npos) << bad.err;
  EXPECT_FALSE(std::filesystem::exists(file("bad.cairn")));
}

TEST_F(CmdCheck, ScreeningSettingsAreStoredAndOverriddenAndRepeatsImported) {
  // A face dipping 60 towards 150 and a joint dipping 75 towards 350: 20 degrees
  // from the face's opposite (330), and (90 - 75) + 30 = 45 <= 60. Toppling with
  // a 30 degree window, not with a 12 degree one.
  write("t-s.csv", "station,lat,lon,elevation\nS1,61.2,-135.6,900\n");
  write("t-p.csv",
        "station,kind,strike,dip,ref,repeat_of,time\nS1,slope,60,60,F,,\nS1,joint,260,75,J,,\n"
        "S1,bedding,30,40,A,,2026-07-06T10:00:00Z\nS1,bedding,31,40.5,B,A,2026-07-06T10:03:00Z\n");
  ASSERT_EQ(cairn("new t.cairn --name t --utm 8N --toppling-window 12").status, 0);
  ASSERT_EQ(cairn("import t.cairn stations t-s.csv").status, 0);
  const Outcome imported = cairn("import t.cairn planes t-p.csv");
  ASSERT_EQ(imported.status, 0) << imported.err;
  EXPECT_EQ(cairn("check t.cairn --json").out.find("\"rule\":\"toppling\""), std::string::npos);
  EXPECT_NE(cairn("check t.cairn --json --toppling-window 25").out.find("\"rule\":\"toppling\""), std::string::npos);
  ASSERT_EQ(cairn("new d.cairn --name d --utm 8N").status, 0);
  ASSERT_EQ(cairn("import d.cairn stations t-s.csv").status, 0);
  ASSERT_EQ(cairn("import d.cairn planes t-p.csv").status, 0);
  EXPECT_NE(cairn("check d.cairn --json").out.find("\"rule\":\"toppling\""), std::string::npos);  // default 30
  // The marked repeat B (3 minutes and about a degree from A) is not taken for an
  // entry made twice, though unmarked it would be (u.cairn); a repeat of a ref
  // that does not exist is refused naming file, line and column, nothing written.
  EXPECT_EQ(cairn("check t.cairn --json").out.find("\"rule\":\"duplicate\""), std::string::npos);
  write("u-p.csv",
        "station,kind,strike,dip,ref,time\nS1,bedding,30,40,A,2026-07-06T10:00:00Z\n"
        "S1,bedding,31,40.5,B,2026-07-06T10:03:00Z\n");
  ASSERT_EQ(cairn("new u.cairn --name u --utm 8N").status, 0);
  ASSERT_EQ(cairn("import u.cairn stations t-s.csv").status, 0);
  ASSERT_EQ(cairn("import u.cairn planes u-p.csv").status, 0);
  EXPECT_NE(cairn("check u.cairn --json").out.find("\"rule\":\"duplicate\""), std::string::npos);
  write("bad.csv", "station,kind,strike,dip,ref,repeat_of\nS1,bedding,30,40,C,Z\n");
  const Outcome bad = cairn("import t.cairn planes bad.csv");
  EXPECT_NE(bad.status, 0);
  EXPECT_NE(bad.err.find("bad.csv:2:6: unknown-reading: station S1 has no planar reading 'Z'"), std::string::npos)
      << bad.err;
  const Outcome refused = cairn("new w.cairn --name w --toppling-window 0");
  EXPECT_EQ(refused.status, 2);
  EXPECT_NE(refused.err.find("--toppling-window: 0 is outside 1 to 90"), std::string::npos) << refused.err;
}
