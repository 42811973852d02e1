#!/usr/bin/env bash
# Installs what is missing (test dependencies too), builds, and runs the whole suite with ctest.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
bash "$here/scripts/install-deps.sh" --test
# CI (CI=true) also fails on any compiler warning.
# CI also fails on a source file that is not formatted as .clang-format asks.
werror=OFF
if [ "${CI:-}" = "true" ]; then
  werror=ON
  bash "$here/scripts/format.sh" --check
fi
# ccache (installed with the test dependencies) makes a second run cheap.
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache)
cmake -S "$here" -B "$here/build" -DCMAKE_BUILD_TYPE=Release -DCAIRN_WERROR=$werror "${launcher[@]}" >/dev/null
cmake --build "$here/build" -j"$(nproc)"
cd "$here/build"
ctest --output-on-failure -j"$(nproc)" --timeout 900
# Then the suite once more under ASan+UBSan, and each fuzzer briefly (about 10 min on 2 cores).
bash "$here/scripts/ci-sanitize.sh"
