#!/usr/bin/env bash
# The test suite once more under AddressSanitizer and UndefinedBehaviorSanitizer,
# then each libFuzzer target for a short while (tests/fuzz/README.md).
#   build-asan/  geomath, formats and storage tests, and the fuzz corpora replayed, with ASan+UBSan (g++)
#   build-fuzz/  the libFuzzer targets (clang -fsanitize=fuzzer,address,undefined)
# CAIRN_FUZZ_SECONDS (default 20) is how long each fuzzer runs. Inputs a fuzzer
# finds go to a scratch folder, never into the committed corpus; a crash leaves
# its input in build-fuzz/crashes/ and fails the script.
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
secs=${CAIRN_FUZZ_SECONDS:-20}
jobs=$(nproc)
export ASAN_OPTIONS=abort_on_error=1:detect_leaks=1
export UBSAN_OPTIONS=print_stacktrace=1:halt_on_error=1
launcher=()
command -v ccache >/dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache -DCMAKE_C_COMPILER_LAUNCHER=ccache)

echo "== ASan+UBSan build of the test suite (build-asan)"
cmake -S "$here" -B "$here/build-asan" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCAIRN_SANITIZE=ON \
  -DCAIRN_BUILD_UI=OFF "${launcher[@]}" >/dev/null
replays=(fuzz_attitude_replay fuzz_gpx_replay fuzz_merge_replay fuzz_exif_replay fuzz_raster_replay)
for k in units contacts stations planes lines points; do replays+=("fuzz_csv_${k}_replay"); done
cmake --build "$here/build-asan" -j"$jobs" --target test_geomath test_formats test_storage "${replays[@]}"
# test_app, the reference checks and the benchmarks' smoke run (bench.quick) need the
# `cairn` binary with its UI: not part of this run (the Release suite runs them).
(cd "$here/build-asan" && ctest --output-on-failure -j"$jobs" --timeout 900 -E '(^reference\.|^bench\.|_NOT_BUILT)')

echo "== libFuzzer targets, ${secs} s each (build-fuzz)"
CC=clang CXX=clang++ cmake -S "$here" -B "$here/build-fuzz" -DCMAKE_BUILD_TYPE=RelWithDebInfo -DCAIRN_FUZZ=ON \
  -DCAIRN_BUILD_UI=OFF -DCAIRN_BUILD_TESTS=ON "${launcher[@]}" >/dev/null
targets=(attitude gpx merge exif raster)
for k in units contacts stations planes lines points; do targets+=("csv_$k"); done
cmake --build "$here/build-fuzz" -j"$jobs" --target "${targets[@]/#/fuzz_}"
mkdir -p "$here/build-fuzz/crashes"
scratch=$(mktemp -d)
trap 'rm -rf "$scratch"' EXIT
for t in "${targets[@]}"; do
  max_len=4096
  [ "$t" = merge ] && max_len=262144
  [ "$t" = raster ] && max_len=16384
  mkdir -p "$scratch/$t"
  echo "-- fuzz_$t"
  "$here/build-fuzz/tests/fuzz/fuzz_$t" -max_total_time="$secs" -max_len="$max_len" -timeout=10 -rss_limit_mb=2048 \
    -print_final_stats=1 -artifact_prefix="$here/build-fuzz/crashes/$t-" \
    "$scratch/$t" "$here/tests/fuzz/corpus/$t" 2>&1 | grep -E '^(stat::|==|SUMMARY|Done|INFO: (Loaded|seed))' || true
  if ls "$here/build-fuzz/crashes/$t-"* >/dev/null 2>&1; then
    echo "fuzz_$t found a crash: $(ls "$here/build-fuzz/crashes/$t-"*)" >&2
    exit 1
  fi
done
echo "sanitizers and fuzzers: no finding"
