#!/usr/bin/env bash
# Formats every C++ source of the repository with clang-format (.clang-format).
#   bash scripts/format.sh          rewrite the files in place
#   bash scripts/format.sh --check  list unformatted files and fail (CI)
set -euo pipefail
here=$(cd "$(dirname "$0")/.." && pwd)
cd "$here"
mapfile -t files < <(git ls-files --cached --others --exclude-standard '*.cpp' '*.h' 2>/dev/null || find app formats geomath storage tests bench -name '*.cpp' -o -name '*.h')
if [ "${1:-}" = "--check" ]; then
  bad=()
  for f in "${files[@]}"; do
    clang-format --style=file "$f" | cmp -s - "$f" || bad+=("$f")
  done
  if [ ${#bad[@]} -gt 0 ]; then
    echo "not formatted (run bash scripts/format.sh):" >&2
    printf '  %s\n' "${bad[@]}" >&2
    exit 1
  fi
  echo "format: ${#files[@]} files formatted as .clang-format asks"
else
  clang-format --style=file -i "${files[@]}"
fi
