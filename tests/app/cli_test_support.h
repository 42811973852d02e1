// Running the real `cairn` command in tests, as a user runs it: a private
// temporary folder per test, `cairn ARGS` run there with stdout and stderr
// kept apart, and the exit status. It holds no checks of its own: each test
// names its outside source (exit statuses as in BSD sysexits and GNU tools,
// common practice; the standards behind each format).
#pragma once
#include <gtest/gtest.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <sys/wait.h>

namespace cairn::cli_test {

struct Outcome {
  int status;
  std::string out, err;
};

class CliTest : public ::testing::Test {
 protected:
  void SetUp() override {
    std::string tmpl = (std::filesystem::temp_directory_path() / "cairn-cli-XXXXXX").string();
    ASSERT_NE(mkdtemp(tmpl.data()), nullptr);
    dir_ = tmpl;
  }
  void TearDown() override { std::filesystem::remove_all(dir_); }

  std::string file(const std::string& name) const { return (dir_ / name).string(); }
  void write(const std::string& name, const std::string& text) const { std::ofstream(file(name)) << text; }
  static std::string slurp(const std::string& path) {
    std::ifstream f(path, std::ios::binary);
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
  }
  // Runs `cairn ARGS` in the temporary folder, with ENV ("NAME=value ...") before it.
  Outcome cairn(const std::string& args, const std::string& env = "") const {
    const std::string cmd = "cd '" + dir_.string() + "' && " + env + " '" + std::string(CAIRN_BINARY) + "' " + args +
                            " >stdout.txt 2>stderr.txt";
    const int rc = std::system(cmd.c_str());
    return {WIFEXITED(rc) ? WEXITSTATUS(rc) : -1, slurp(file("stdout.txt")), slurp(file("stderr.txt"))};
  }

  std::filesystem::path dir_;
};

}  // namespace cairn::cli_test
