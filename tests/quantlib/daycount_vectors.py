#!/usr/bin/env python3
"""Day-count vectors for ledgerate, answered by the reference library.

Draws random date pairs with a fixed seed for every day-count basis that the
reference library also implements, asks it for the day count and the year
fraction of each pair, and writes one line-oriented, deterministic text file
that tests/it/quantlib_daycount.rs compares ledgerate with.

Source of every answer: QuantLib 1.44 from PyPI (`pip install QuantLib==1.44`),
through the classes named in CLASSES below.

Before drawing, the script checks that each class behaves as the conventions
reference (shared/reference/conventions.md section 1) describes, on published
worked examples; it stops with an error if one does not.

Python 3.11, QuantLib and the standard library only.

Output format (UTF-8, LF, tab-separated):
    # ...                     comment lines (version, seed, counts)
    holiday<TAB>YYYY-MM-DD    the BUS/252 calendar's holidays (Saturdays and
                              Sundays are its weekend)
    basis<TAB>d1<TAB>...      the column header, once
    then one row per pair:
    basis       ledgerate's canonical name of the basis
    d1, d2      ISO dates (d1 > d2 only for bases that negate a reversed pair)
    extra       "-", "termination=YYYY-MM-DD" (30E/360 ISDA) or
                "frequency=F;reference=YYYY-MM-DD..YYYY-MM-DD" (ACT/ACT ICMA)
    ql_day_count       the library's dayCount(d1, d2)
    ql_year_fraction   repr() of the library's yearFraction(d1, d2, ...)
    note        "-", or "left-out:29-feb-end-point" for an NL/365 pair with a
                29 February end point: the library zeroes the night of
                28 February in leap years, ledgerate the night of 29 February
                (behaviour.md, Day count), so those pairs differ by design and are
                not compared
"""

from __future__ import annotations

import argparse
import calendar
import datetime as dt
import random
import sys
from fractions import Fraction

import QuantLib as ql

DEFAULT_SEED = 20261201
DEFAULT_PAIRS = 2200
FIRST_YEAR = 1999
LAST_YEAR = 2032
MAX_SPAN_DAYS = 1100
LEFT_OUT_NOTE = "left-out:29-feb-end-point"
CALENDAR_NAME = "ledgerate vectors"

# Bases whose reversed pair both sides define as the negated forward pair.
# The 30/360 family applies its formula to the dates as given (not negated)
# in the library, and the library's reversed business-day count covers
# (d2, d1] rather than [d2, d1), so those are drawn in order only.
REVERSIBLE = {"ACT/360", "ACT/365F", "ACT/ACT ISDA", "NL/365"}

ORDER = [
    "ACT/360",
    "ACT/365F",
    "ACT/ACT ISDA",
    "ACT/ACT ICMA",
    "NL/365",
    "30/360",
    "30/360 US",
    "30E/360",
    "30E/360 ISDA",
    "BUS/252",
]

# Source: QuantLib 1.44 from PyPI, class per basis.
CLASSES = {
    "ACT/360": "ql.Actual360()",
    "ACT/365F": "ql.Actual365Fixed()",
    "ACT/ACT ISDA": "ql.ActualActual(ql.ActualActual.ISDA)",
    "ACT/ACT ICMA": "ql.ActualActual(ql.ActualActual.ISMA), reference dates",
    "NL/365": "ql.Actual365Fixed(ql.Actual365Fixed.NoLeap)",
    "30/360": "ql.Thirty360(ql.Thirty360.BondBasis)",
    "30/360 US": "ql.Thirty360(ql.Thirty360.USA)",
    "30E/360": "ql.Thirty360(ql.Thirty360.European)",
    "30E/360 ISDA": "ql.Thirty360(ql.Thirty360.ISDA, terminationDate)",
    "BUS/252": "ql.Business252(ql.BespokeCalendar), Sat/Sun + holidays",
}


class ReferenceMisbehaves(Exception):
    """The library does not behave as the conventions reference describes."""


def qd(d: dt.date) -> ql.Date:
    return ql.Date(d.day, d.month, d.year)


def iso(s: str) -> dt.date:
    return dt.date.fromisoformat(s)


def last_day(y: int, m: int) -> int:
    return calendar.monthrange(y, m)[1]


def is_feb29(d: dt.date) -> bool:
    return d.month == 2 and d.day == 29


def add_months(d: dt.date, months: int, end_of_month: bool) -> dt.date:
    """d moved by whole months, the day clamped to the month's length; with
    end_of_month, a month-end date stays on month ends."""
    idx = d.year * 12 + (d.month - 1) + months
    y, m = divmod(idx, 12)
    m += 1
    n = last_day(y, m)
    if end_of_month and d.day == last_day(d.year, d.month):
        return dt.date(y, m, n)
    return dt.date(y, m, min(d.day, n))


# --------------------------------------------------------------------------
# Checks of the library against the conventions reference.


def expect(what: str, got, want, tol: float | None = None) -> None:
    ok = got == want if tol is None else abs(float(got) - float(want)) <= tol
    if not ok:
        raise ReferenceMisbehaves(f"{what}: got {got!r}, expected {want!r}")


def verify_reference(cal: ql.Calendar, holidays: list[dt.date]) -> None:
    # Source: conventions reference 1.10, case 1 (ISDA memo "EMU and Market
    # Conventions", QuantLib testActualActual): 61/365 + 121/366.
    isda = ql.ActualActual(ql.ActualActual.ISDA)
    expect(
        "ACT/ACT ISDA 2003-11-01..2004-05-01",
        isda.yearFraction(qd(iso("2003-11-01")), qd(iso("2004-05-01"))),
        Fraction(61, 365) + Fraction(121, 366),
        1e-15,
    )
    # Source: conventions reference 1.10, case 3: 184/365 + 182/366.
    expect(
        "ACT/ACT ISDA 1999-07-01..2000-07-01",
        isda.yearFraction(qd(iso("1999-07-01")), qd(iso("2000-07-01"))),
        Fraction(184, 365) + Fraction(182, 366),
        1e-15,
    )
    # Source: conventions reference 1.10, cases 1, 2 and 7 (ICMA column):
    # days / (F x days of the reference period).
    isma = ql.ActualActual(ql.ActualActual.ISMA)
    for d1, d2, rs, re, want in [
        ("2003-11-01", "2004-05-01", "2003-11-01", "2004-05-01", Fraction(1, 2)),
        ("1999-02-01", "1999-07-01", "1998-07-01", "1999-07-01", Fraction(150, 365)),
        ("2000-01-30", "2000-06-30", "2000-01-30", "2000-07-30", Fraction(152, 364)),
    ]:
        expect(
            f"ACT/ACT ICMA {d1}..{d2} in {rs}..{re}",
            isma.yearFraction(qd(iso(d1)), qd(iso(d2)), qd(iso(rs)), qd(iso(re))),
            want,
            1e-15,
        )
    # Source: conventions reference 1.13 (cross-convention table), 2007-10-31
    # to 2008-11-30: 396 days.
    expect(
        "ACT/360 2007-10-31..2008-11-30",
        ql.Actual360().yearFraction(qd(iso("2007-10-31")), qd(iso("2008-11-30"))),
        Fraction(396, 360),
        1e-15,
    )
    expect(
        "ACT/365F 2007-10-31..2008-11-30",
        ql.Actual365Fixed().yearFraction(qd(iso("2007-10-31")), qd(iso("2008-11-30"))),
        Fraction(396, 365),
        1e-15,
    )
    # Source: conventions reference 1.3 (QuantLib NL_Impl): a leap day is
    # dropped when it lies in (start, end].
    nl = ql.Actual365Fixed(ql.Actual365Fixed.NoLeap)
    for d1, d2, want in [
        ("2008-02-28", "2008-02-29", 0),
        ("2008-02-29", "2008-03-01", 1),
        ("2007-12-28", "2008-03-01", 63),
        ("2007-03-01", "2009-03-01", 730),
    ]:
        expect(f"NL/365 {d1}..{d2}", nl.dayCount(qd(iso(d1)), qd(iso(d2))), want)
    # Source: conventions reference 1.11 (a), (b), (c) and (d) (ISDA "30/360
    # day count conventions" worked examples; Wikipedia 30/360 US table).
    thirty = [
        (ql.Thirty360(ql.Thirty360.BondBasis), "30/360", None, [
            ("2007-02-28", "2007-08-31", 183),
            ("2007-08-31", "2008-02-29", 179),
            ("2008-02-29", "2009-02-28", 359),
            ("2006-02-28", "2006-03-03", 5),
            ("2008-02-28", "2008-03-31", 33),
        ]),
        (ql.Thirty360(ql.Thirty360.USA), "30/360 US", None, [
            ("2007-02-28", "2007-08-31", 180),
            ("2008-02-29", "2008-08-31", 180),
            ("2008-02-29", "2009-02-28", 360),
            ("2006-02-28", "2006-03-03", 3),
            ("2008-02-28", "2008-03-31", 33),
        ]),
        (ql.Thirty360(ql.Thirty360.European), "30E/360", None, [
            ("2008-02-29", "2008-08-31", 181),
            ("2007-08-31", "2008-02-29", 179),
            ("2008-02-28", "2008-03-31", 32),
        ]),
        (ql.Thirty360(ql.Thirty360.ISDA, qd(iso("2012-02-29"))), "30E/360 ISDA",
         "2012-02-29", [
            ("2007-08-31", "2008-02-29", 180),
            ("2011-08-31", "2012-02-29", 179),
        ]),
        (ql.Thirty360(ql.Thirty360.ISDA, qd(iso("2008-02-29"))), "30E/360 ISDA",
         "2008-02-29", [
            ("2006-02-28", "2006-03-03", 3),
            ("2007-02-28", "2008-02-29", 359),
            ("2008-02-29", "2009-02-28", 360),
            ("2008-02-29", "2008-03-31", 30),
        ]),
    ]
    for dc, name, term, rows in thirty:
        for d1, d2, want in rows:
            expect(
                f"{name} {d1}..{d2} termination {term}",
                dc.dayCount(qd(iso(d1)), qd(iso(d2))),
                want,
            )
            expect(
                f"{name} {d1}..{d2} fraction",
                dc.yearFraction(qd(iso(d1)), qd(iso(d2))),
                Fraction(want, 360),
                1e-15,
            )
    # Source: conventions reference 1.9 (QuantLib business252.cpp): business
    # days in [d1, d2), the first included and the last excluded.
    bus = ql.Business252(cal)
    hol = set(holidays)
    probe = random.Random(f"{DEFAULT_SEED}:business-day probe")
    for _ in range(200):
        d1 = dt.date(FIRST_YEAR, 1, 1) + dt.timedelta(days=probe.randrange(12000))
        d2 = d1 + dt.timedelta(days=probe.randrange(MAX_SPAN_DAYS))
        walked = sum(
            1
            for k in range((d2 - d1).days)
            if (x := d1 + dt.timedelta(days=k)).weekday() < 5 and x not in hol
        )
        expect(f"BUS/252 {d1}..{d2}", bus.dayCount(qd(d1), qd(d2)), walked)
        expect(
            f"BUS/252 {d1}..{d2} fraction",
            bus.yearFraction(qd(d1), qd(d2)),
            Fraction(walked, 252),
            1e-15,
        )


# --------------------------------------------------------------------------
# Drawing dates.


def draw_year(rng: random.Random) -> int:
    if rng.random() < 0.3:
        return rng.choice([y for y in range(FIRST_YEAR, LAST_YEAR + 1) if calendar.isleap(y)])
    return rng.randint(FIRST_YEAR, LAST_YEAR)


def draw_month(rng: random.Random) -> int:
    return 2 if rng.random() < 0.25 else rng.randint(1, 12)


def day_in_month(rng: random.Random, y: int, m: int) -> dt.date:
    """A day of the month, biased to the days the bases treat specially."""
    n = last_day(y, m)
    kind = rng.choices(
        ["any", "last", "30", "31", "28", "29", "1"],
        weights=[30, 25, 10, 10, 10, 8, 7],
    )[0]
    day = {
        "any": rng.randint(1, n),
        "last": n,
        "30": min(30, n),
        "31": min(31, n),
        "28": 28,
        "29": min(29, n),
        "1": 1,
    }[kind]
    return dt.date(y, m, day)


def draw_d1(rng: random.Random) -> dt.date:
    return day_in_month(rng, draw_year(rng), draw_month(rng))


def draw_d2(rng: random.Random, d1: dt.date) -> dt.date:
    """A date on or after d1, at most about three years later."""
    r = rng.random()
    if r < 0.08:
        return d1
    if r < 0.48:
        band = rng.random()
        if band < 0.3:
            span = rng.randint(1, 40)
        elif band < 0.7:
            span = rng.randint(41, 400)
        else:
            span = rng.randint(401, MAX_SPAN_DAYS)
        return d1 + dt.timedelta(days=span)
    while True:
        if rng.random() < 0.3:
            # A February, this year or up to three later.
            y, m = d1.year + rng.randint(0, 3), 2
        else:
            idx = d1.year * 12 + d1.month - 1 + rng.randint(0, 36)
            y, m = divmod(idx, 12)
            m += 1
        d2 = day_in_month(rng, y, m)
        if d2 >= d1:
            return d2


def draw_pair(rng: random.Random, basis: str) -> tuple[dt.date, dt.date]:
    d1 = draw_d1(rng)
    d2 = draw_d2(rng, d1)
    if basis in REVERSIBLE and d1 != d2 and rng.random() < 0.1:
        d1, d2 = d2, d1
    return d1, d2


def draw_holidays(rng: random.Random) -> list[dt.date]:
    """New Year's Day, Christmas Day and a dozen random dates a year, some of
    them on weekends, over every year a draw can reach."""
    out: set[dt.date] = set()
    for y in range(FIRST_YEAR, LAST_YEAR + 5):
        out.add(dt.date(y, 1, 1))
        out.add(dt.date(y, 12, 25))
        for _ in range(12):
            out.add(dt.date(y, 1, 1) + dt.timedelta(days=rng.randrange(365)))
    return sorted(out)


# --------------------------------------------------------------------------
# Rows.


def fmt_row(basis: str, d1: dt.date, d2: dt.date, extra: str, days: int,
            yf: float, note: str) -> str:
    return "\t".join(
        [basis, d1.isoformat(), d2.isoformat(), extra, str(days), repr(yf), note]
    )


def simple_rows(basis: str, dc: ql.DayCounter, rng: random.Random, pairs: int,
                counts: dict) -> list[str]:
    rows = []
    compared = 0
    while compared < pairs:
        d1, d2 = draw_pair(rng, basis)
        note = "-"
        if basis == "NL/365" and (is_feb29(d1) or is_feb29(d2)):
            note = LEFT_OUT_NOTE
            counts["left_out"] += 1
        else:
            compared += 1
        rows.append(
            fmt_row(basis, d1, d2, "-", dc.dayCount(qd(d1), qd(d2)),
                    dc.yearFraction(qd(d1), qd(d2)), note)
        )
    counts["compared"] = compared
    return rows


def thirty_e_isda_rows(rng: random.Random, pairs: int, counts: dict) -> list[str]:
    rows = []
    for _ in range(pairs):
        d1, d2 = draw_pair(rng, "30E/360 ISDA")
        r = rng.random()
        if r < 0.4:
            term = d2
        elif r < 0.6:
            # A February end after d2.
            y = d2.year + rng.randint(0 if d2.month <= 2 else 1, 4)
            term = dt.date(y, 2, last_day(y, 2))
            if term < d2:
                term = d2
        else:
            term = d2 + dt.timedelta(days=rng.randint(1, 1500))
        dc = ql.Thirty360(ql.Thirty360.ISDA, qd(term))
        rows.append(
            fmt_row("30E/360 ISDA", d1, d2, f"termination={term.isoformat()}",
                    dc.dayCount(qd(d1), qd(d2)), dc.yearFraction(qd(d1), qd(d2)), "-")
        )
    counts["compared"] = pairs
    return rows


def icma_rows(rng: random.Random, pairs: int, counts: dict) -> list[str]:
    dc = ql.ActualActual(ql.ActualActual.ISMA)
    rows = []
    for _ in range(pairs):
        f = rng.choice([1, 2, 4, 12])
        months = 12 // f
        rs = draw_d1(rng)
        re = add_months(rs, months, end_of_month=rng.random() < 0.5)
        n = (re - rs).days
        # The library guesses the frequency from the reference period's
        # length (conventions reference 1.6); make sure it guesses F.
        guessed = round(12 * n / 365)
        if guessed != months:
            raise ReferenceMisbehaves(
                f"ACT/ACT ICMA reference {rs}..{re}: {n} days read as {guessed} months"
            )
        a, b = rng.randint(0, n), rng.randint(0, n)
        r = rng.random()
        if r < 0.1:
            a, b = 0, n
        elif r < 0.2:
            a = 0
        elif r < 0.3:
            b = n
        elif r < 0.35:
            b = a
        a, b = min(a, b), max(a, b)
        d1, d2 = rs + dt.timedelta(days=a), rs + dt.timedelta(days=b)
        yf = dc.yearFraction(qd(d1), qd(d2), qd(rs), qd(re))
        extra = f"frequency={f};reference={rs.isoformat()}..{re.isoformat()}"
        rows.append(fmt_row("ACT/ACT ICMA", d1, d2, extra, dc.dayCount(qd(d1), qd(d2)), yf, "-"))
    counts["compared"] = pairs
    return rows


def bus_rows(rng: random.Random, pairs: int, cal: ql.Calendar,
             holidays: list[dt.date], counts: dict) -> list[str]:
    dc = ql.Business252(cal)
    rows = []
    for _ in range(pairs):
        d1, d2 = draw_pair(rng, "BUS/252")
        # Holiday end points now and then.
        if rng.random() < 0.2:
            d1 = rng.choice(holidays[:-60])
            d2 = draw_d2(rng, d1)
        if rng.random() < 0.2:
            later = [h for h in holidays if d1 <= h <= d1 + dt.timedelta(days=MAX_SPAN_DAYS)]
            if later:
                d2 = rng.choice(later)
        rows.append(
            fmt_row("BUS/252", d1, d2, "-", dc.dayCount(qd(d1), qd(d2)),
                    dc.yearFraction(qd(d1), qd(d2)), "-")
        )
    counts["compared"] = pairs
    return rows


def simple_counter(basis: str) -> ql.DayCounter:
    return {
        "ACT/360": ql.Actual360(),
        "ACT/365F": ql.Actual365Fixed(),
        "ACT/ACT ISDA": ql.ActualActual(ql.ActualActual.ISDA),
        "NL/365": ql.Actual365Fixed(ql.Actual365Fixed.NoLeap),
        "30/360": ql.Thirty360(ql.Thirty360.BondBasis),
        "30/360 US": ql.Thirty360(ql.Thirty360.USA),
        "30E/360": ql.Thirty360(ql.Thirty360.European),
    }[basis]


def build(seed: int, pairs: int) -> tuple[list[str], dict]:
    holidays = draw_holidays(random.Random(f"{seed}:holidays"))
    cal = ql.BespokeCalendar(CALENDAR_NAME)
    cal.addWeekend(ql.Saturday)
    cal.addWeekend(ql.Sunday)
    for h in holidays:
        cal.addHoliday(qd(h))
    verify_reference(cal, holidays)

    summary: dict[str, dict] = {}
    body: list[str] = []
    for basis in ORDER:
        rng = random.Random(f"{seed}:{basis}")
        counts = {"compared": 0, "left_out": 0}
        if basis == "30E/360 ISDA":
            rows = thirty_e_isda_rows(rng, pairs, counts)
        elif basis == "ACT/ACT ICMA":
            rows = icma_rows(rng, pairs, counts)
        elif basis == "BUS/252":
            rows = bus_rows(rng, pairs, cal, holidays, counts)
        else:
            rows = simple_rows(basis, simple_counter(basis), rng, pairs, counts)
        summary[basis] = counts
        body.extend(rows)

    lines = [
        "# ledgerate day-count vectors: answers of the reference library for random date pairs.",
        "# Written by tests/quantlib/daycount_vectors.py; checked by tests/quantlib/check.sh.",
        f"# reference library: QuantLib {ql.__version__} (Python)",
        f"# seed: {seed}",
        f"# pairs per basis: {pairs}",
    ]
    for basis in ORDER:
        c = summary[basis]
        lines.append(
            f"# {basis}: {CLASSES[basis]}; {c['compared']} compared"
            + (f", {c['left_out']} left out (29 February end point)" if c["left_out"] else "")
        )
    lines.append("# BUS/252 calendar: Saturday and Sunday weekends plus the holiday lines below.")
    lines.extend(f"holiday\t{h.isoformat()}" for h in holidays)
    lines.append("basis\td1\td2\textra\tql_day_count\tql_year_fraction\tnote")
    lines.extend(body)
    return lines, summary


def main(argv: list[str]) -> int:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--seed", type=int, default=DEFAULT_SEED)
    p.add_argument("--pairs", type=int, default=DEFAULT_PAIRS,
                   help="compared pairs per basis (default %(default)s)")
    p.add_argument("--output", default="tests/fixtures/quantlib_daycount.tsv",
                   help="file to write, or - for standard output")
    args = p.parse_args(argv)
    if args.pairs < 1:
        p.error("--pairs must be at least 1")
    try:
        lines, summary = build(args.seed, args.pairs)
    except ReferenceMisbehaves as e:
        print(f"daycount_vectors.py: the reference library misbehaves: {e}", file=sys.stderr)
        return 1
    text = "\n".join(lines) + "\n"
    if args.output == "-":
        sys.stdout.write(text)
    else:
        with open(args.output, "w", encoding="utf-8", newline="\n") as fh:
            fh.write(text)
    for basis in ORDER:
        c = summary[basis]
        extra = f", {c['left_out']} left out" if c["left_out"] else ""
        print(f"{basis}: {c['compared']} pairs{extra}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1:]))
