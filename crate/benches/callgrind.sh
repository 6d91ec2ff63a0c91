#!/usr/bin/env bash
# Instruction counts of evaluate() and of the band shapes alone, 10 bands on
# 2000 points (the case of benches/evaluate.rs), by valgrind's callgrind:
# repeatable on a loaded machine, where seconds are not. Prints instructions
# per call and the evaluate/shapes ratio per lineshape.
#   crate/benches/callgrind.sh [REPEATS]
set -euo pipefail
cd "$(dirname "$0")/.."
repeats="${1:-5}"
command -v valgrind >/dev/null || { echo "callgrind.sh: valgrind is not installed" >&2; exit 1; }
cargo build --release --example evaluate_count -q
bin="${CARGO_TARGET_DIR:-../target}/release/examples/evaluate_count"
out="$(mktemp -d)"
count() {
    valgrind --tool=callgrind --callgrind-out-file="$out/cg" --toggle-collect='evaluate_count::measured' "$bin" "$1" "$2" "$repeats" >/dev/null 2>"$out/log"
    awk '/^summary:|^totals:/ { print $2; exit }' "$out/cg"
}
printf '%-9s %16s %16s %8s\n' shape evaluate_Ir/call shapes_Ir/call ratio
for shape in lorentz gaussian voigt; do
    e=$(count "$shape" evaluate)
    s=$(count "$shape" shapes)
    awk -v sh="$shape" -v e="$e" -v s="$s" -v r="$repeats" 'BEGIN { printf "%-9s %16.0f %16.0f %8.2f\n", sh, e / r, s / r, e / s }'
done
rm -rf "$out"
