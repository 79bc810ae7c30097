#!/usr/bin/env bash
# Overnight-rate coupon check against the reference library (QuantLib for
# Python, pinned to 1.44: pip install QuantLib==1.44).
#
# 1. Regenerates the coupon vectors live, with the seed and coupon count
#    recorded in the committed fixture, into a temporary file.
# 2. Fails if they differ from tests/fixtures/quantlib_overnight.tsv: the
#    library has changed an answer (or the draws have changed), and the
#    difference must be looked at before the fixture is rewritten.
# 3. Runs the Rust comparison on the regenerated file.
#
# Exits non-zero on any failure.
set -euo pipefail

here="$(cd "$(dirname "${BASH_SOURCE[0]}")" && pwd)"
root="$(cd "$here/../.." && pwd)"
fixture="$root/tests/fixtures/quantlib_overnight.tsv"
python="${PYTHON:-python3}"

fail() {
    echo "overnight check: FAIL: $*" >&2
    exit 1
}

[[ -f "$fixture" ]] || fail "missing $fixture"
version="$("$python" -c 'import QuantLib; print(QuantLib.__version__)' 2>/dev/null)" ||
    fail "QuantLib for Python is not installed (pip install QuantLib==1.44)"
echo "overnight check: QuantLib $version"

seed="$(sed -n 's/^# seed: \([0-9][0-9]*\)$/\1/p' "$fixture")"
coupons="$(sed -n 's/^# coupons: \([0-9][0-9]*\)$/\1/p' "$fixture")"
[[ -n "$seed" && -n "$coupons" ]] || fail "$fixture has no '# seed:' or '# coupons:' line"

tmp="$(mktemp -d)"
trap 'rm -rf "$tmp"' EXIT
live="$tmp/quantlib_overnight.tsv"

"$python" "$here/overnight_vectors.py" --seed "$seed" --coupons "$coupons" --output "$live" ||
    fail "the vector script failed"

if ! cmp -s "$fixture" "$live"; then
    echo "overnight check: FAIL: the reference library's answers differ from the committed fixture" >&2
    echo "overnight check: (diff head; '-' committed, '+' live)" >&2
    diff -u "$fixture" "$live" | head -n 60 >&2 || true
    exit 1
fi
echo "overnight check: live vectors identical to the committed fixture (seed $seed, $coupons coupons)"

cd "$root"
LEDGERATE_QL_OVERNIGHT="$live" cargo test --test it quantlib_overnight:: -- --nocapture ||
    fail "ledgerate disagrees with the reference library"
echo "overnight check: OK"
