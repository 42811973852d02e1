#include "app/cli/assets.h"

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <sstream>
#include <stdexcept>
#include <system_error>

namespace fs = std::filesystem;

namespace cairn::cli {

namespace {

// Folder of the running executable (Linux: /proc/self/exe); empty if unknown.
fs::path executable_dir() {
  std::error_code ec;
  fs::path exe = fs::read_symlink("/proc/self/exe", ec);
  if (ec) return {};
  return exe.parent_path();
}

}  // namespace

std::vector<std::string> asset_dirs() {
  std::vector<std::string> dirs;
  if (const char* env = std::getenv("CAIRN_ASSETS"); env && *env) dirs.emplace_back(env);
  fs::path exe_dir = executable_dir();
  if (!exe_dir.empty()) {
    dirs.push_back((exe_dir / ".." / "share" / "cairn").lexically_normal().string());
    dirs.push_back((exe_dir / ".." / "assets").lexically_normal().string());
  }
  return dirs;
}

std::string asset_path(const std::string& name) {
  for (const auto& dir : asset_dirs()) {
    std::error_code ec;
    fs::path p = fs::path(dir) / name;
    if (fs::is_regular_file(p, ec)) return p.string();
  }
  return {};
}

std::string read_asset(const std::string& name) {
  const std::string path = asset_path(name);
  if (path.empty()) {
    std::ostringstream os;
    os << "data file '" << name << "' not found; looked in:";
    for (const auto& dir : asset_dirs()) os << " " << dir;
    os << " (set CAIRN_ASSETS to the folder that holds it)";
    throw std::runtime_error(os.str());
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) throw std::runtime_error("cannot open data file " + path);
  std::string text((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  if (in.bad()) throw std::runtime_error("cannot read data file " + path);
  return text;
}

}  // namespace cairn::cli
