"""The US bond-market business-day calendar and date rolling.

Holidays: the SIFMA recommended US bond-market holiday schedule as published in the ``holidays``
package (``holidays.financial_holidays("SIFMA")``): the days the US government and agency bond
markets are closed and cash flows are paid on the next business day. Chosen over an exchange
calendar (e.g. NYSE) because bonds settle on bond-market days: the two differ on Columbus Day and
Veterans Day, when stock exchanges open and the bond market closes. SIFMA's early-close days are
business days here.
"""

from __future__ import annotations

from functools import lru_cache

import holidays
import numpy as np

from ladder.market.dates import NAT, to_days

FIRST_YEAR, LAST_YEAR = 1996, 2080   # the SIFMA schedule in `holidays` starts in 1996


@lru_cache(maxsize=8)
def bond_calendar(first_year: int = FIRST_YEAR, last_year: int = LAST_YEAR) -> np.busdaycalendar:
    """numpy business-day calendar: Monday to Friday less the SIFMA holidays of ``first_year`` to
    ``last_year`` (by default every year of the schedule, 1996-2080)."""
    closed = holidays.financial_holidays("SIFMA", years=range(first_year, last_year + 1))
    return np.busdaycalendar(weekmask="1111100", holidays=sorted(closed))


def _calendar_for(days: np.ndarray) -> np.busdaycalendar:
    """The calendar of the years ``days`` span and the next (a roll can cross into it), within the
    schedule: computing every year's holidays takes a sizeable part of a whole command."""
    if not days.size:
        return bond_calendar()
    years = days[[days.argmin(), days.argmax()]].astype("datetime64[Y]").astype(int) + 1970
    first, last = max(FIRST_YEAR, int(years[0])), min(LAST_YEAR, int(years[1]) + 1)
    return bond_calendar(first, last) if first <= last else bond_calendar()


def roll_following(dates) -> np.ndarray:
    """Each date moved to the next business day if it is not one (NaT stays NaT)."""
    d = to_days(dates)
    nat = np.isnat(d)
    safe = np.where(nat, np.datetime64("2000-01-03"), d)
    rolled = np.busday_offset(safe, 0, roll="forward", busdaycal=_calendar_for(d[~nat]))
    return np.where(nat, NAT, rolled)


def is_business_day(dates) -> np.ndarray:
    d = to_days(dates)
    return np.is_busday(d, busdaycal=bond_calendar())


def add_business_days(dates, days: int) -> np.ndarray:
    """``days`` business days after each date (rolled forward first if not a business day)."""
    return np.busday_offset(to_days(dates), days, roll="forward", busdaycal=bond_calendar())
