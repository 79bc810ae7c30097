#!/usr/bin/env python3
"""Overnight-rate coupon vectors for ledgerate, answered by the reference library.

Draws random overnight fixings on every business day of the library's SOFR
calendar over two years, and random past coupons over them: compounded in
arrears (with a lookback, an observation shift, a lockout and a spread
compounded or added after) or simply averaged (with a spread; the library
averages simply only without lookback or lockout). For each coupon it asks the library
for the coupon rate and, for the unshifted ones, the amount accrued to a
date inside the coupon. tests/it/quantlib_overnight.rs runs
ledgerate on the same fixings and terms and compares.

Source of every answer: QuantLib 1.44 from PyPI (`pip install QuantLib==1.44`),
ql.OvernightIndexedCoupon on a ql.Sofr index with the drawn fixings added,
priced by the library's default overnight pricer for the averaging method.

Before drawing, the script checks the library against the past-coupon case
of the conventions reference (shared/reference/conventions.md section 4.3,
rate 0.000987136104); it stops with an error if it does not match.

Python 3.11, QuantLib and the standard library only.

Output format (UTF-8, LF, tab-separated):
    # ...                      comment lines (version, seed, counts)
    holiday<TAB>YYYY-MM-DD     the calendar's holidays on weekdays (Saturdays
                               and Sundays are its weekend)
    fixing<TAB>YYYY-MM-DD<TAB>rate
                               one per business day: the rate as a decimal,
                               written exactly (at most 6 places)
    coupon<TAB>...             one per coupon, columns:
      id, method (compounded-in-arrears or simple-daily), start, end (the
      day after the last accrual day), lookback, shift (yes/no), lockout,
      spread (decimal), spread_compounded (yes/no), nominal, ql_rate
      (repr of coupon.rate()), accrued_date ("-" or the date accrued to),
      ql_accrued (repr of coupon.accruedAmount(accrued_date), or "-")
"""

from __future__ import annotations

import argparse
import datetime as dt
import random
import sys

import QuantLib as ql

DEFAULT_SEED = 20261202
DEFAULT_COUPONS = 400
FIRST = dt.date(2023, 1, 3)
LAST = dt.date(2024, 12, 31)
NOMINAL = 1_000_000


def qd(d: dt.date) -> ql.Date:
    return ql.Date(d.day, d.month, d.year)


def pd(d: ql.Date) -> dt.date:
    return dt.date(d.year(), d.month(), d.dayOfMonth())


def coupon(index, start, end, lookback, shift, lockout, spread, compound_spread, simple):
    averaging = ql.RateAveraging.Simple if simple else ql.RateAveraging.Compound
    return ql.OvernightIndexedCoupon(
        qd(end), NOMINAL, qd(start), qd(end), index, 1.0, spread,
        ql.Date(), ql.Date(), ql.Actual360(), False, averaging,
        lookback, lockout, shift, compound_spread)


def self_check() -> None:
    """The conventions reference, section 4.3, testPastCouponRate."""
    fixings = {
        "2021-10-18": 0.0008, "2021-10-19": 0.0009, "2021-10-20": 0.0008,
        "2021-10-21": 0.0010, "2021-10-22": 0.0012, "2021-10-25": 0.0011,
        "2021-10-26": 0.0013, "2021-10-27": 0.0012, "2021-10-28": 0.0012,
        "2021-10-29": 0.0008, "2021-11-01": 0.0009, "2021-11-02": 0.0010,
        "2021-11-03": 0.0011, "2021-11-04": 0.0014, "2021-11-05": 0.0013,
        "2021-11-08": 0.0011, "2021-11-09": 0.0009, "2021-11-10": 0.0008,
        "2021-11-12": 0.0007, "2021-11-15": 0.0008, "2021-11-16": 0.0008,
        "2021-11-17": 0.0007,
    }
    ql.Settings.instance().evaluationDate = ql.Date(1, 12, 2021)
    index = ql.Sofr()
    for day, rate in fixings.items():
        index.addFixing(qd(dt.date.fromisoformat(day)), rate)
    c = coupon(index, dt.date(2021, 10, 18), dt.date(2021, 11, 18), 0, False, 0, 0.0, False, False)
    if abs(c.rate() - 0.000987136104) > 1e-12:
        sys.exit(f"self-check: coupon rate {c.rate()!r}, the reference says 0.000987136104")
    ql.IndexManager.instance().clearHistories()


def draw(seed: int, coupons: int) -> list[str]:
    rng = random.Random(seed)
    cal = ql.UnitedStates(ql.UnitedStates.SOFR)
    holidays = [pd(h) for h in ql.Calendar.holidayList(cal, qd(FIRST), qd(LAST), False)]
    days = []
    d = FIRST
    while d <= LAST:
        if cal.isBusinessDay(qd(d)):
            days.append(d)
        d += dt.timedelta(days=1)
    # Rates from -0.50% to 6.00% in steps of 0.0001% (six decimal places), with
    # a slow drift and day-to-day noise.
    level = rng.randint(-5000, 60000)
    fixing_text = {}
    for day in days:
        level = max(-5000, min(60000, level + rng.randint(-900, 900)))
        fixing_text[day] = f"{level / 1_000_000:.6f}"
    ql.Settings.instance().evaluationDate = qd(LAST)
    index = ql.Sofr()
    for day, text in fixing_text.items():
        index.addFixing(qd(day), float(text))

    out = [
        f"# QuantLib {ql.__version__}; ql.OvernightIndexedCoupon on ql.Sofr",
        f"# seed: {seed}",
        f"# coupons: {coupons}",
        f"# nominal: {NOMINAL}",
    ]
    out += [f"holiday\t{h.isoformat()}" for h in holidays]
    out += [f"fixing\t{day.isoformat()}\t{fixing_text[day]}" for day in days]
    # Coupons start and end on business days, far enough from the first fixing
    # for the longest lookback.
    usable = days[10:-5]
    for k in range(coupons):
        simple = rng.random() < 0.25
        i = rng.randrange(len(usable) - 80)
        j = i + rng.randint(3, 70)
        start, end = usable[i], usable[j]
        # The library averages simply only without lookback or lockout.
        lookback = 0 if simple else rng.choice([0, 0, 1, 2, 3, 5])
        shift = (not simple) and lookback > 0 and rng.random() < 0.5
        # A lockout shorter than the coupon's business days, as the library needs.
        lockout = 0 if simple else min(rng.choice([0, 0, 0, 1, 2, 3]), j - i - 1)
        spread_bp = rng.choice([0, 0, 25, 100, 150, -10])
        spread = spread_bp / 10_000
        compound_spread = (not simple) and spread_bp != 0 and rng.random() < 0.4
        c = coupon(index, start, end, lookback, shift, lockout, spread, compound_spread, simple)
        rate = c.rate()
        accrued_date, accrued = "-", "-"
        # Accrued part-way: compared for unshifted coupons. With an
        # observation shift ledgerate earns the whole period's rate on each day
        # (behaviour.md, Floating rates), the library the rate compounded so far.
        if not shift:
            a = start + dt.timedelta(days=rng.randint(1, (end - start).days - 1))
            accrued_date = a.isoformat()
            accrued = repr(c.accruedAmount(qd(a)))
        out.append("\t".join([
            "coupon", f"Q{k + 1:04d}",
            "simple-daily" if simple else "compounded-in-arrears",
            start.isoformat(), end.isoformat(), str(lookback),
            "yes" if shift else "no", str(lockout), f"{spread_bp / 10_000:.4f}",
            "yes" if compound_spread else "no", str(NOMINAL), repr(rate),
            accrued_date, accrued,
        ]))
    return out


def main(argv: list[str]) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--seed", type=int, default=DEFAULT_SEED)
    p.add_argument("--coupons", type=int, default=DEFAULT_COUPONS)
    p.add_argument("--output", default="tests/fixtures/quantlib_overnight.tsv")
    args = p.parse_args(argv)
    self_check()
    lines = draw(args.seed, args.coupons)
    with open(args.output, "w", encoding="utf-8", newline="\n") as f:
        f.write("\n".join(lines) + "\n")
    print(f"wrote {args.output}: {args.coupons} coupons", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
