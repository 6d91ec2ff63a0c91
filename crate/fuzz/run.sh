#!/usr/bin/env bash
# Runs every fuzz target for a while (libFuzzer through cargo-fuzz).
#
#   crate/fuzz/run.sh [SECONDS_PER_TARGET] [TARGET ...]     (default 4 s, all targets)
#   crate/fuzz/run.sh --check                               (the test command's brief run)
#
# --check runs a fixed number of inputs from a fixed seed (the same inputs
# on every machine), so the test command checks that every target still
# builds and runs without turning up a new finding at random.
# Before a release run each for 30 minutes or more: crate/fuzz/run.sh 1800.
# Seed corpora are built from the fixtures each time (under the fuzz target
# directory, not committed); inputs that once failed are kept in
# fixtures/fuzz-regressions/TARGET/ and replayed first. A crash, a hang over
# 1 s on one input or more than 256 MB of memory fails the run.
# cargo-fuzz needs nightly features: RUSTC_BOOTSTRAP=1 lets the stable
# toolchain build it, and --sanitizer none keeps to what stable supports.
set -euo pipefail
HERE="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
ROOT="$(cd "$HERE/../.." && pwd)"
export PATH="$HOME/.cargo/bin:$PATH"
CHECK=0
if [ "${1:-}" = "--check" ]; then CHECK=1; shift; fi
SECONDS_EACH="${1:-4}"
[ $# -gt 0 ] && shift
TARGETS=("$@")
[ ${#TARGETS[@]} -gt 0 ] || TARGETS=(document link delimited jcamp states)

if ! cargo fuzz --version >/dev/null 2>&1; then
    echo "==> installing cargo-fuzz (once)" >&2
    cargo install cargo-fuzz --version 0.13.2 >&2
fi

CORPUS="$HERE/target/seed-corpus"
seed() {
    local target="$1" dir="$CORPUS/$1"
    rm -rf "$dir" && mkdir -p "$dir"
    case "$target" in
        document) cp "$ROOT"/fixtures/demo/*.json "$ROOT"/fixtures/fit/*.json "$dir/" ;;
        link) python3 - "$ROOT/fixtures/bad-links/corpus.json" "$dir" <<'PY'
import json, os, sys
corpus = json.load(open(sys.argv[1]))
cases = [c for key in ("bad", "good") for c in corpus.get(key, [])]
for i, case in enumerate(cases):
    open(os.path.join(sys.argv[2], f"seed{i}"), "w").write(case.get("link", ""))
PY
        ;;
        delimited) cp "$ROOT"/fixtures/import/good/* "$ROOT"/fixtures/import/broken/*.txt "$ROOT"/fixtures/fit/*.csv "$dir/" ;;
        jcamp) cp "$ROOT"/../shared/data/jcamp/*.jdx "$dir/" 2>/dev/null || cp /work/shared/data/jcamp/*.jdx "$dir/" 2>/dev/null || printf '##TITLE=x\n##JCAMP-DX=4.24\n##XYDATA=(X++(Y..Y))\n1 2 3\n##END=\n' > "$dir/min.jdx" ;;
        states) cp "$ROOT"/fixtures/states/example.txt "$dir/" ;;
    esac
}

cd "$HERE"
for target in "${TARGETS[@]}"; do
    seed "$target"
    regressions="$ROOT/fixtures/fuzz-regressions/$target"
    mkdir -p "$regressions" "$HERE/target/corpus-$target"
    if [ "$CHECK" -eq 1 ]; then
        # Slow targets (the importers read whole files) get fewer inputs.
        case "$target" in delimited|jcamp) runs=3000 ;; *) runs=30000 ;; esac
        limit=(-runs="$runs" -seed=1)
        echo "==> fuzzing $target: $runs inputs from seed 1" >&2
        corpus=("$HERE/target/check-$target")
        rm -rf "${corpus[0]}" && mkdir -p "${corpus[0]}"
    else
        limit=(-max_total_time="$SECONDS_EACH")
        echo "==> fuzzing $target for ${SECONDS_EACH}s" >&2
        corpus=("$HERE/target/corpus-$target")
    fi
    RUSTC_BOOTSTRAP=1 cargo fuzz run --sanitizer none --release "$target" \
        "${corpus[@]}" "$CORPUS/$target" "$regressions" -- \
        "${limit[@]}" -timeout=1 -rss_limit_mb=256 -max_len=65536 \
        -print_final_stats=1 2>&1 | grep -E "^(stat::number_of_executed_units|stat::peak_rss_mb|#[0-9]+ +DONE)|SUMMARY|panicked|ERROR|Test unit written" >&2
    # grep's status reflects only whether it printed; cargo's is what counts.
    [ "${PIPESTATUS[0]}" -eq 0 ] || { echo "fuzz target $target failed (see crate/fuzz/artifacts/$target/)" >&2; exit 1; }
done
