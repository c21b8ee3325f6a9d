"""The spread table by sector, rating bucket and tenor: reading a bucket's curve, the lookup order, and
book.toml's flat and tenor forms. References: hand arithmetic written out beside each check; the
lookup order and the interpolation rule are ours (docs/formats.md, "The spread table")."""

import datetime as dt

import numpy as np
import pytest

from ladder.book.holdings import make_holdings
from ladder.demo import write_demo
from ladder.folder.book_file import DEFAULT_SPREADS_BP, load_book
from ladder.pricing.spreads import SpreadCurve, table_spreads_bp

SETTLE = dt.date(2026, 11, 30)
CORPORATE_A = SpreadCurve.of({0.25: 25.0, 1.0: 45.0, 5.0: 80.0})     # { 3M = 25, 1Y = 45, 5Y = 80 }


def holdings(days, sector="corporate", rating="A", short=""):
    n = len(days)
    maturity = [str(np.datetime64(SETTLE) + d) for d in days]
    return make_holdings(id=[f"H{i}" for i in range(n)], sector=[sector] * n, face=[1e6] * n, maturity=maturity,
                         coupon=[0.04] * n, rating=[rating] * n, short_rating=[short] * n)


def test_a_bucket_is_linear_in_tenor_years_between_its_points_and_flat_beyond():
    # Hand arithmetic: 0.5y lies 1/3 of the way from 0.25y to 1y: 25 + (0.25 / 0.75) * 20 = 31.6667;
    # 3y lies half way from 1y to 5y: 45 + (2 / 4) * 35 = 62.5; before 3M and after 5Y the end values.
    assert CORPORATE_A.at([0.1, 0.25, 0.5, 1.0, 3.0, 5.0, 12.0]) == pytest.approx(
        [25.0, 25.0, 25.0 + 20.0 / 3.0, 45.0, 62.5, 80.0, 80.0], rel=0, abs=1e-12)
    assert SpreadCurve.flat(72.0).at([0.0, 0.5, 30.0]) == pytest.approx([72.0] * 3, rel=0, abs=0)


def test_a_holding_reads_its_bucket_at_its_act_365f_tenor_from_settlement():
    # 73 days = 0.2 y (flat 25 before 3M); 365 days = 1 y (45); 730 days = 2 y: 45 + (1 / 4) * 35 = 53.75.
    h = holdings([73, 365, 730])
    got = table_spreads_bp(h, {"corporate": {"A": CORPORATE_A}}, SETTLE)
    assert got == pytest.approx([25.0, 45.0, 53.75], rel=0, abs=1e-12)


def test_lookup_order_is_long_bucket_then_short_bucket_then_default_else_nan():
    table = {"commercial_paper": {"A-1": SpreadCurve.flat(20.0), "default": SpreadCurve.flat(50.0)},
             "corporate": {"A": CORPORATE_A}}
    cp_short = holdings([90], "commercial_paper", rating="", short="P-1")       # P-1 is A-1's bucket
    cp_unrated = holdings([90], "commercial_paper", rating="", short="")
    corp_bbb = holdings([90], "corporate", rating="BBB+")
    got = [table_spreads_bp(h, table, SETTLE)[0] for h in (cp_short, cp_unrated, corp_bbb)]
    assert got[:2] == [20.0, 50.0] and np.isnan(got[2])


def test_default_shape_short_tenors_tighter_and_money_market_by_short_bucket():
    # Invented defaults (common practice for their shape only): a 3M corporate A well below its 5Y,
    # and a 3M corporate of each long bucket no wider than 3M commercial paper of the matching short
    # bucket (AAA and AA ~ A-1+, A ~ A-1, BBB ~ A-2).
    corporate, cp = DEFAULT_SPREADS_BP["corporate"], DEFAULT_SPREADS_BP["commercial_paper"]
    assert corporate["A"]["3M"] < corporate["A"]["5Y"] / 5
    for long_bucket, short_bucket in (("AAA", "A-1+"), ("AA", "A-1+"), ("A", "A-1"), ("BBB", "A-2")):
        assert corporate[long_bucket]["3M"] < cp[short_bucket]["3M"]


def test_book_toml_takes_flat_and_tenor_forms(tmp_path):
    folder = write_demo(tmp_path / "book")
    text = (folder / "book.toml").read_text()
    text = text.replace("[spreads.corporate]\n", "[spreads.corporate]\nAAA = 35\n", 1).replace(
        "AAA = { 3M = 3, 1Y = 14, 2Y = 22, 5Y = 38, 10Y = 55 }\n", "", 1)
    (folder / "book.toml").write_text(text)
    book = load_book(folder)
    assert book.spreads["corporate"]["AAA"].is_flat and book.spreads["corporate"]["AAA"].at(7.0) == 35.0
    assert book.spreads["corporate"]["A"].at([0.25, 5.0]) == pytest.approx([10.0, 75.0], rel=0, abs=0)


def test_a_spread_tenor_that_is_not_a_tenor_is_refused_at_its_line_and_column(tmp_path, capsys):
    from ladder.cli import main

    folder = write_demo(tmp_path / "book")
    path = folder / "book.toml"
    text = path.read_text().replace("A = { 3M = 10, 1Y = 30,", "A = { 3M = 10, 1X = 30,", 1)
    path.write_text(text)
    line = next(i for i, row in enumerate(text.splitlines(), start=1) if "1X = 30" in row)
    column = text.splitlines()[line - 1].index("1X") + 1
    before = sorted((p.name, p.stat().st_mtime_ns) for p in folder.iterdir())
    assert main(["shock", str(folder)]) == 2
    err = capsys.readouterr().err
    assert f"{path}:{line}:{column}: spreads.corporate.A.1X: '1X' is not a tenor" in err
    assert sorted((p.name, p.stat().st_mtime_ns) for p in folder.iterdir()) == before     # nothing written


def test_fit_to_quotes_moves_each_bucket_by_its_least_squares_level(tmp_path):
    # Least squares of z_i = s(T_i) + L over a bucket's quoted holdings: the residuals of the fitted
    # curve sum to zero (the normal equation of L), and the curve keeps its shape (moves by L at every tenor).
    from ladder.analysis.valuation import value_book
    from ladder.pricing.spreads import spread_keys, tenor_years

    folder = write_demo(tmp_path / "book")
    plain = load_book(folder)
    path = folder / "book.toml"
    path.write_text(path.read_text().replace("[spreads]\n", '[spreads]\nfit_to_quotes = ["corporate"]\n', 1))
    fitted = load_book(folder)
    z_bp = value_book(plain).spread * 1e4            # quoted rows: z-spreads solved from their prices
    h = plain.holdings
    keys = spread_keys(h, plain.spreads)
    years = tenor_years(h, plain.valuation_date)
    moved = 0
    for bucket, curve in plain.spreads["corporate"].items():
        rows = (h.sector == "corporate") & (keys == bucket) & ~h.callable & (h.quote_type != "")
        new = fitted.spreads["corporate"][bucket]
        level = new.bp - curve.bp
        assert np.ptp(level) < 1e-12                                     # one level at every tenor
        if rows.any():
            moved += 1
            assert abs(np.sum(z_bp[rows] - new.at(years[rows]))) < 1e-9 * rows.sum()
        else:
            assert level[0] == 0
    assert moved >= 2
    assert fitted.spreads["agency"]["AA"].bp == pytest.approx(plain.spreads["agency"]["AA"].bp, rel=0, abs=0)


def test_fit_to_quotes_names_sectors(tmp_path, capsys):
    from ladder.cli import main

    folder = write_demo(tmp_path / "book")
    path = folder / "book.toml"
    text = path.read_text().replace("[spreads]\n", '[spreads]\nfit_to_quotes = ["corporates"]\n', 1)
    path.write_text(text)
    line = text.splitlines().index('fit_to_quotes = ["corporates"]') + 1
    assert main(["value", str(folder)]) == 2
    assert f"{path}:{line}:" in capsys.readouterr().err
