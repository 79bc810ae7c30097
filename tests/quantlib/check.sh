#!/usr/bin/env bash
# Day-count check against the reference library (QuantLib for Python,
# pinned to 1.44: pip install QuantLib==1.44).
#
# 1. Regenerates the vectors live, with the seed and pair count recorded in
#    the committed fixture, into a temporary file.
# 2. Fails if they differ from tests/fixtures/quantlib_daycount.tsv: the
#    library has changed an answer (or the draws have changed), and the
#    difference must be looked at before the fixture is rewritten.
# 3. Runs the Rust comparison on the regenerated file.
#
# Exits non-zero on any failure.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"
fixture="$root/tests/fixtures/quantlib_daycount.tsv"
python="${PYTHON:-python3}"

fail() {
    echo "quantlib check: FAIL: $*" >&2
    exit 1
}

[[ -f "$fixture" ]] || fail "missing $fixture"
version="$("$python" -c 'import QuantLib; print(QuantLib.__version__)' 2>/dev/null)" ||
    fail "QuantLib for Python is not installed (pip install QuantLib==1.44)"
echo "quantlib check: QuantLib $version"

seed="$(sed -n 's/^# seed: \([0-9][0-9]*\)$/\1/p' "$fixture")"
pairs="$(sed -n 's/^# pairs per basis: \([0-9][0-9]*\)$/\1/p' "$fixture")"
[[ -n "$seed" && -n "$pairs" ]] || fail "$fixture has no '# seed:' or '# pairs per basis:' line"

tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
live="$tmp/quantlib_daycount.tsv"

"$python" "$here/daycount_vectors.py" --seed "$seed" --pairs "$pairs" --output "$live" ||
    fail "the vector script failed"

if ! cmp -s "$fixture" "$live"; then
    echo "quantlib check: FAIL: the reference library's answers differ from the committed fixture" >&2
    echo "quantlib check: (diff head; '-' committed, '+' live)" >&2
    diff -u "$fixture" "$live" | head -n 60 >&2 || true
    exit 1
fi
echo "quantlib check: live vectors identical to the committed fixture (seed $seed, $pairs pairs per basis)"

cd "$root"
LEDGERATE_QL_VECTORS="$live" cargo test --test it quantlib_daycount:: -- --nocapture ||
    fail "ledgerate disagrees with the reference library"
echo "quantlib check: OK"
