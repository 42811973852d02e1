// Finding the data files Cairn ships (e.g. the magnetic model's coefficients)
// at run time, whether the program runs from its build tree or an install.
#pragma once
#include <string>
#include <vector>

namespace cairn::cli {

// The folders searched for an asset, in order:
//   1. $CAIRN_ASSETS (when set and not empty),
//   2. next to the executable: ../share/cairn (an install: bin/cairn) and
//      ../assets (the build tree: build/app/cairn, with build/assets copied
//      there by the build). No path of the source tree is compiled in.
std::vector<std::string> asset_dirs();

// Full path of the first existing file NAME in asset_dirs(); "" when none has it.
std::string asset_path(const std::string& name);

// Whole text of asset NAME. Throws std::runtime_error naming the file and
// every folder searched when it is missing or unreadable.
std::string read_asset(const std::string& name);

}  // namespace cairn::cli
