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
