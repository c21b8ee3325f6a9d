"""A small invented book folder for the builder's tests, written into a temporary folder.

Tessaline's book.toml, curve and spreads (invented demo data) with two holdings, a short policy tested
at all times (so "no breach and no review" means every limit holds), one cash need and five offerings
(four notes and a fund), one per rung of ``RUNGS``.
"""

from __future__ import annotations

from ladder.demo import demo_source, write_demo

import shutil
from pathlib import Path

DEMO = demo_source()
RUNGS = "1Y,2Y,3Y,5Y"

HOLDINGS = """id,sector,issuer,kind,face,maturity_date,coupon_pct,frequency,day_count,issue_date,first_coupon_date,rating,short_rating,rating_at_purchase,price,yield_pct,discount_rate_pct,book_price,purchase_date,first_call_date,call_frequency,call_price
SB-TSY-1,treasury,US Treasury,,5000000,2027-05-15,4.5,,,2024-05-15,,AA+,,,100.332,,,100.002,2024-05-15,,,
SB-MMF-1,fund,Alpha Government Fund,,2000000,2026-12-01,,,,,,,,,,3.60,,,,,,
"""

POLICY = """[policy]
name = "Small test policy"
version = "1"
adopted = 2026-01-15
basis = "market"
testing = "continuous"

[portfolio]
max_maturity_years = 5
max_effective_duration = {duration}
issuer_max_pct = 25
cash_needs_horizon_months = 6
liquidity = [ {{ within_days = 7, min_pct = 5 }} ]

[sectors.treasury]
issuer_cap_exempt = true

[sectors.agency]
max_pct = 40

[sectors.corporate]
max_pct = 30
min_long_rating = "A-"

[sectors.fund]
max_pct = 40
issuer_cap_exempt = true
"""

CASH_NEEDS = """date,amount,label
2027-02-15,{need},invented test need
"""

OFFERINGS_HEADER = ("id,sector,issuer,kind,face,maturity_date,coupon_pct,frequency,day_count,issue_date,"
                    "first_coupon_date,rating,short_rating,rating_at_purchase,price,yield_pct,discount_rate_pct,"
                    "book_price,purchase_date,first_call_date,call_frequency,call_price,available_face,min_lot,"
                    "lot_increment")
OFFERINGS = OFFERINGS_HEADER + """
OF-BILL,treasury,US Treasury,discount,1000000,2027-02-11,,,,,,AA+,A-1+,,,,3.70,,,,,,4000000,1000000,1000000
OF-CORP-Y,corporate,Yarrow Instruments Corp,,1000000,2028-03-01,4.5,,,2025-03-01,,AA,,,100.20,,,,,,,,3000000,2000000,1000000
OF-CORP-X,corporate,Xanthe Mills Inc,,1000000,2029-06-15,4.8,,,2024-06-15,,A,,,100.50,,,,,,,,3000000,1000000,1000000
OF-AGY,agency,Federal Orchard Credit Bank,,1000000,2030-01-15,4.25,,,2025-01-15,,AA+,,,99.80,,,,,,,,3000000,1000000,1000000
OF-MMF,fund,Alpha Government Fund,,1000000,2026-12-01,,,,,,,,,,3.60,,,,,,,10000000,1000000,1000000
"""


def make_book(folder: Path, duration: float = 1.5, need: float = 6_000_000) -> Path:
    """The small book in ``folder``; returns the folder."""
    folder.mkdir(parents=True, exist_ok=True)
    for name in ("book.toml", "curve.csv", "scenarios.csv"):
        shutil.copy(DEMO / name, folder / name)
    (folder / "holdings.csv").write_text(HOLDINGS)
    (folder / "policy.toml").write_text(POLICY.format(duration=duration))
    (folder / "cash_needs.csv").write_text(CASH_NEEDS.format(need=need))
    (folder / "offerings.csv").write_text(OFFERINGS)
    return folder


def demo_copy(folder: Path) -> Path:
    """A copy of the demo book (the real demo files are never modified)."""
    write_demo(folder)
    return folder
