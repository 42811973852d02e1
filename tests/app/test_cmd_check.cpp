// `cairn check` from the shell: exit status, and the warning for readings dated
// outside the magnetic model's validity (WMM2025 is valid from 2025.0 to 2030.0,
// as the WMM2025 technical report states; the same range is in
// ../shared/reference/README.md).
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <string>
#include <sys/wait.h>
#include <unistd.h>

namespace {

struct ShellRun {
  int status;
  std::string out;  // stdout and stderr together
};

ShellRun sh(const std::string& cmd) {
  ShellRun r{0, ""};
  FILE* f = ::popen((cmd + " 2>&1").c_str(), "r");
  char buf[4096];
  size_t n;
  while ((n = std::fread(buf, 1, sizeof buf, f)) > 0) r.out.append(buf, n);
  r.status = WEXITSTATUS(::pclose(f));
  return r;
}

std::string project_with_reading_on(const std::string& dir, const std::string& time) {
  const std::string path = dir + "/p.cairn", bin = CAIRN_BINARY;
  std::ofstream(dir + "/s.csv") << "station,lat,lon,elevation\nS1,61.2,-135.6,900\n";
  std::ofstream(dir + "/p.csv") << "station,kind,strike,dip,time\nS1,bedding,30,40," << time << "\n";
  EXPECT_EQ(sh(bin + " new " + path + " --name t --utm 8N").status, 0);
  EXPECT_EQ(sh(bin + " import " + path + " stations " + dir + "/s.csv").status, 0);
  EXPECT_EQ(sh(bin + " import " + path + " planes " + dir + "/p.csv").status, 0);
  return path;
}

}  // namespace

TEST(CmdCheck, WarnsForReadingsOutsideTheModelsValidity) {
  const auto dir = std::filesystem::temp_directory_path() / ("cairn-check-" + std::to_string(::getpid()));
  for (const char* sub : {"old", "new"}) std::filesystem::create_directories(dir / sub);
  const std::string bin = CAIRN_BINARY;
  const ShellRun old = sh(bin + " check " + project_with_reading_on((dir / "old").string(), "2021-06-01T10:00:00Z"));
  EXPECT_EQ(old.status, 0);
  EXPECT_NE(old.out.find("warning: 1 reading is dated outside WMM2025's validity (2025 to 2030)"), std::string::npos)
      << old.out;
  const ShellRun now = sh(bin + " check " + project_with_reading_on((dir / "new").string(), "2026-07-06T10:00:00Z"));
  EXPECT_EQ(now.status, 0);
  EXPECT_EQ(now.out.find("validity"), std::string::npos) << now.out;
  EXPECT_NE(now.out.find("0 flags"), std::string::npos) << now.out;
  std::filesystem::remove_all(dir);
}

TEST(CmdCheck, NearbyComparisonIsAProjectSetting) {
  // A bedding reading that names no contact, at demo station MT-18 beside the Tolm
  // unconformity (laid out 200/20, demo_project/README.md), dipping 60 degrees to
  // 190: 45 degrees or more from the contact's plane, so once compared it is a misfit.
  // The setting is stored in the project file, so a camp file made with it checks
  // the same as `--nearby`.
  const auto dir = std::filesystem::temp_directory_path() / ("cairn-nearby-" + std::to_string(::getpid()));
  std::filesystem::create_directories(dir);
  const std::string bin = CAIRN_BINARY, d = dir.string();
  ASSERT_EQ(sh(bin + " demo " + d + "/demo").status, 0);
  std::ofstream(d + "/odd.csv") << "station,kind,strike,dip,ref\nMT-18,bedding,100,60,MT-18x\n";
  ASSERT_EQ(sh(bin + " import " + d + "/demo/camp.cairn planes " + d + "/odd.csv").status, 0);
  ASSERT_EQ(sh(bin + " new " + d + "/camp.cairn --name camp --utm 8N --nearby 300").status, 0);
  ASSERT_EQ(sh(bin + " merge " + d + "/camp.cairn " + d + "/demo/camp.cairn").status, 0);
  const ShellRun off = sh(bin + " check " + d + "/demo/camp.cairn --json");
  const ShellRun on = sh(bin + " check " + d + "/demo/camp.cairn --json --nearby 300");
  const ShellRun setting = sh(bin + " check " + d + "/camp.cairn --json");
  // The flags part of the JSON (the fits and where-next lists follow the files' record order).
  auto flags = [](const std::string& j) {
    const size_t a = j.find("\"flags\":"), b = j.find("\"where_next\":");
    return a == std::string::npos || b == std::string::npos ? std::string() : j.substr(a, b - a);
  };
  EXPECT_EQ(off.out.find("MT-18x"), std::string::npos);
  EXPECT_NE(on.out.find("\"rule\":\"misfit\",\"severity\":\"conflict\",\"station\":\"MT-18\",\"ref\":\"MT-18x\""),
            std::string::npos);
  EXPECT_FALSE(flags(on.out).empty());
  EXPECT_EQ(flags(setting.out), flags(on.out));
  // A bad radius is refused and nothing is made.
  const ShellRun bad = sh(bin + " new " + d + "/bad.cairn --name bad --nearby -5");
  EXPECT_EQ(bad.status, 2);
  EXPECT_NE(bad.out.find("--nearby '-5' must be a distance from 0 to 100000 metres"), std::string::npos) << bad.out;
  EXPECT_FALSE(std::filesystem::exists(d + "/bad.cairn"));
  std::filesystem::remove_all(dir);
}
