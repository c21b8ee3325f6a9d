"""The bond-market calendar: known SIFMA closures and open days, and date rolling against QuantLib's
US government-bond calendar over past years, with the days where the two differ listed.

Sources: SIFMA holiday recommendations for US dollar fixed income, as announced in SIFMA press
releases (read in copies at mondovisione.com and sifma.org): full closes on Columbus Day 9 Oct 2023
(release of 25 Sep 2023), Presidents Day 16 Feb 2015 (release of 11 Feb 2015), Labor Day 2 Sep 2019
(release of 20 Aug 2019), Juneteenth observed 20 Jun 2022 (release of 14 Jul 2021); early closes (the
market is open) on Good Friday 2 Apr 2010, 6 Apr 2012 and 2 Apr 2021 (jobs-report days), full trading
on 31 Dec 2010, and an early close on 9 Jan 2025 (National Day of Mourning, release of 30 Dec 2024).
Other dates are marked "common practice" (the standard SIFMA schedule: federal holidays plus Good
Friday, a Saturday holiday observed on the Friday before, a Sunday holiday on the Monday after).
"""

import datetime as dt

import numpy as np
import pytest
import QuantLib as ql

from ladder.market.calendar import add_business_days, is_business_day, roll_following

D = np.datetime64

PUBLISHED_CLOSED = [
    "2023-10-09",   # Columbus Day: SIFMA full close, release 25 Sep 2023 (the stock exchanges open)
    "2015-02-16",   # Presidents Day: SIFMA full close, release 11 Feb 2015
    "2019-09-02",   # Labor Day: SIFMA full close, release 20 Aug 2019
    "2022-06-20",   # Juneteenth observed: SIFMA full close, release 14 Jul 2021
]
PUBLISHED_OPEN = [
    "2010-04-02",   # Good Friday: SIFMA early 12:00 close (jobs report), release of 2010-2011 schedule
    "2012-04-06",   # Good Friday: early close (jobs report), release of 2012-2013 schedule
    "2021-04-02",   # Good Friday: early close (BLS employment release), release 15 Dec 2020
    "2010-12-31",   # New Year's Day 2011 falls on a Saturday: full trading on Friday 31 Dec 2010
    "2025-01-09",   # National Day of Mourning: early 2:00 pm close, release 30 Dec 2024
]
COMMON_PRACTICE_CLOSED = [
    "2024-11-11", "2025-11-11",   # Veterans Day (bond market closed, stock exchanges open): common practice
    "2024-10-14", "2025-10-13",   # Columbus Day: common practice
    "2025-01-01", "2025-01-20", "2025-02-17", "2025-04-18", "2025-05-26", "2025-06-19", "2025-07-04",
    "2025-09-01", "2025-11-27", "2025-12-25",   # the 2025 standard schedule: common practice
    "2026-07-03",   # 4 Jul 2026 is a Saturday: observed Friday 3 Jul, common practice
    "2027-12-24",   # 25 Dec 2027 is a Saturday: observed Friday 24 Dec, common practice
]
COMMON_PRACTICE_OPEN = [
    "2025-11-28", "2025-12-24", "2025-07-03",   # early-close days are business days: common practice
    "2023-11-10",   # Veterans Day 2023 fell on a Saturday; no Friday close (SIFMA schedule), common practice
]


@pytest.mark.parametrize("day", PUBLISHED_CLOSED + COMMON_PRACTICE_CLOSED)
def test_known_closures_are_not_business_days(day):
    # SIFMA recommended full closes (source per date above)
    assert not bool(is_business_day(D(day)))


@pytest.mark.parametrize("day", PUBLISHED_OPEN + COMMON_PRACTICE_OPEN)
def test_known_open_days_are_business_days(day):
    # SIFMA early closes and full trading days (source per date above)
    assert bool(is_business_day(D(day)))


def test_weekends_are_not_business_days():
    # common practice: Saturday and Sunday are not bond-market days
    assert not is_business_day(np.array(["2025-03-08", "2025-03-09"], dtype="datetime64[D]")).any()


def test_rolling_over_holidays_and_weekends():
    # common practice (following convention): a payment due on a closed day moves to the next open day
    due = np.array(["2024-11-11", "2023-10-07", "2026-07-03", "2025-05-26", "2025-05-27", "NaT"], dtype="datetime64[D]")
    expected = np.array(["2024-11-12", "2023-10-10", "2026-07-06", "2025-05-27", "2025-05-27", "NaT"],
                        dtype="datetime64[D]")
    np.testing.assert_array_equal(roll_following(due), expected)   # 2023-10-07 is Saturday; Monday is Columbus Day


def test_add_business_days_skips_bond_holidays():
    # common practice: T+1 from Friday 8 Nov 2024 skips the weekend and Veterans Day
    assert add_business_days(D("2024-11-08"), 1) == D("2024-11-12")


# --- against QuantLib's UnitedStates(GovernmentBond) calendar ----------------------------------------
# Two third-party holiday tables (``holidays``' SIFMA schedule, which ours is, and QuantLib's) are compared
# over past years only: future special closings (a national day of mourning, a Good Friday jobs report)
# are not known yet and each library projects them its own way, so they differ between library versions.
# The window opens with the first year of the ``holidays`` SIFMA schedule and closes with the last full
# year before this test was written.

PAST_FROM, PAST_TO = 1996, 2025
KNOWN_DIFFERENCES = {
    # Good Friday 1996: closed in ``holidays``, open in QuantLib; which is right is not established here
    D("1996-04-05"): "holidays",
    # the day after the 11 September 2001 attacks: closed in ``holidays`` ("Closed following Attacks on the
    # World Trade Center"), a business day in QuantLib (which keeps 11 September open too, as ``holidays`` does)
    D("2001-09-12"): "holidays",
}


def _ql_holidays(first: int, last: int) -> set:
    cal = ql.UnitedStates(ql.UnitedStates.GovernmentBond)
    days = ql.Calendar.holidayList(cal, ql.Date(1, 1, first), ql.Date(31, 12, last), False)
    return {np.datetime64(dt.date(d.year(), d.month(), d.dayOfMonth()), "D") for d in days}


def test_quantlib_government_bond_calendar_differs_only_on_the_known_days():
    # QuantLib UnitedStates(GovernmentBond), an independent SIFMA-based calendar: the same weekday
    # closures over the past years, but for the listed days (each closed in the library named)
    start, end = D(f"{PAST_FROM}-01-01"), D(f"{PAST_TO}-12-31")
    every_day = np.arange(start, end + 1)
    ours = set(every_day[~is_business_day(every_day) & np.is_busday(every_day)])
    theirs = _ql_holidays(PAST_FROM, PAST_TO)
    assert {d: "holidays" for d in ours - theirs} | {d: "QuantLib" for d in theirs - ours} == KNOWN_DIFFERENCES


def test_rolling_agrees_with_quantlib_over_past_years():
    # QuantLib Calendar.adjust(date, Following) on UnitedStates(GovernmentBond) over the past years:
    # random dates plus every holiday and the day before/after, less those whose roll meets a known difference
    cal = ql.UnitedStates(ql.UnitedStates.GovernmentBond)
    rng = np.random.default_rng(3)
    hols = np.array(sorted(_ql_holidays(PAST_FROM, PAST_TO)), dtype="datetime64[D]")
    first, last = D(f"{PAST_FROM}-01-02"), D(f"{PAST_TO}-12-24")
    known = np.array(sorted(KNOWN_DIFFERENCES), dtype="datetime64[D]")
    days = np.concatenate([first + rng.integers(0, (last - first).astype(int), 500), hols, hols - 1, hols + 1,
                           known])
    rolled = roll_following(days)
    meets = ((known[None, :] >= days[:, None]) & (known[None, :] <= rolled[:, None])).any(axis=1)
    assert len(known) <= meets.sum() < 10          # the known days are left out, and little else
    days, rolled = days[~meets], rolled[~meets]
    expected = []
    for d in days:
        a = cal.adjust(ql.Date(int(str(d)[8:10]), int(str(d)[5:7]), int(str(d)[:4])), ql.Following)
        expected.append(np.datetime64(dt.date(a.year(), a.month(), a.dayOfMonth()), "D"))
    np.testing.assert_array_equal(rolled, np.array(expected, dtype="datetime64[D]"))
