#!/usr/bin/env bash
# Installs what is missing (test dependencies too), builds, and runs the whole suite with ctest.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
bash "$here/scripts/install-deps.sh" --test
cmake -S "$here" -B "$here/build" -DCMAKE_BUILD_TYPE=Release >/dev/null
cmake --build "$here/build" -j"$(nproc)"
cd "$here/build"
ctest --output-on-failure -j"$(nproc)" --timeout 900
# Then the suite once more under ASan+UBSan, and each fuzzer briefly (about 10 min on 2 cores).
bash "$here/scripts/ci-sanitize.sh"
