"""``risk_book`` on copies of the demo book.

Sources: issue 17's checks: with volatility 0 and no needs uncertainty every simulated path is the
deterministic plan on the forward curve (``ladder plan --rates forwards``), to the cent; the needs
drawn around the forecast have the stated spread and month-to-month correlation (an AR(1): lag-one
correlation rho; a normal: mean and standard deviation as given), within 4 standard errors.
"""

import csv
import io
import math
import re

import numpy as np
import pytest

from ladder.analysis.plan import PlanOptions, plan_book
from ladder.analysis.risk import RiskOptions, draw_needs, risk_book, risk_document
from ladder.demo import write_demo
from ladder.errors import InputError
from ladder.folder.book_file import load_book
from ladder.plan.periods import make_periods

CENT = 0.005


def _demo(folder, volatility=None):
    write_demo(folder)
    if volatility is not None:
        toml = folder / "book.toml"
        toml.write_text(re.sub(r"volatility = [0-9.]+", f"volatility = {volatility}", toml.read_text()))
    return load_book(folder)


@pytest.fixture(scope="module")
def still(tmp_path_factory):
    return _demo(tmp_path_factory.mktemp("risk") / "still", volatility=0.0)


def test_zero_volatility_paths_are_the_forward_plan(still):
    months = 8
    result = risk_book(still, options=RiskOptions(paths=100, months=months, rules=("match_needs", "longest_rung")))
    assert result.options.paths == 100
    for r in result.rules:
        plan = plan_book(still, options=PlanOptions(months=months, rates="forward", rule=r.rule), with_income=False)
        pr = plan.projection
        o = r.outcomes
        for got, want in ((o.income, pr.income), (o.closing, pr.closing_cash), (o.available, pr.available)):
            np.testing.assert_allclose(got, np.broadcast_to(want, got.shape), rtol=0, atol=CENT)
        assert (o.sold == bool(pr.sale_list)).all()
        np.testing.assert_allclose(o.income_12m, pr.income.sum(), rtol=0, atol=CENT)


def test_document_holds_the_contract(tmp_path):
    book = _demo(tmp_path / "demo")
    doc = risk_document(risk_book(book, options=RiskOptions(paths=100, months=4, seed=5)))
    assert (doc["paths"], doc["seed"], doc["months"]) == (100, 5, 4)
    assert [r["rule"] for r in doc["rules"]] == ["match_needs", "longest_rung", "target_tenor", "fund"]
    for r in doc["rules"]:
        assert 0.0 <= r["forced_sale_probability"] <= 1.0
        inc = r["income_12m"]
        assert inc["p05"] <= inc["mean"] <= inc["p95"]
        assert inc["at_risk"] == pytest.approx(inc["mean"] - inc["p05"], rel=0, abs=0.011)   # rounded to cents
        assert set(r["realized_loss"]) == {"mean", "p95"} and set(r["horizon_value"]) == {"mean", "p05", "p95"}
        assert r["horizon_value"]["p05"] < r["horizon_value"]["p95"]     # rates move: values spread
        assert "first_risky_month" in r


def test_bad_options_are_named(tmp_path):
    book = _demo(tmp_path / "demo")
    with pytest.raises(InputError) as caught:
        risk_book(book, options=RiskOptions(paths=99, months=40, needs_correlation=1.5, seed=-1))
    text = str(caught.value)
    assert "--seed" in text
    assert "--paths" in text and "--months" in text and "beyond the cash-needs forecast" in text
    assert "--needs-correlation" in text
    with pytest.raises(InputError, match="--paths"):
        risk_book(book, options=RiskOptions(paths=1_000_001, months=4))


def test_needs_draws_have_the_stated_spread_and_correlation():
    periods = make_periods(np.datetime64("2026-11-30"), 6)
    dates = np.array(["2026-12-15", "2027-01-15", "2027-02-15", "2027-03-15", "2027-04-15", "2027-05-15"],
                     dtype="datetime64[D]")
    amounts = np.full(6, 1_000_000.0)
    sd = np.full(6, 200_000.0)
    n, rho = 40_000, 0.6
    drawn = draw_needs(dates, amounts, sd, sd, periods, n, rho, seed=11)
    se_mean = 200_000.0 / math.sqrt(n)
    assert abs(drawn[:, 0].mean() - 1_000_000.0) <= 4 * se_mean
    # sample sd of a normal: standard error sigma / sqrt(2n)
    assert abs(drawn[:, 3].std() - 200_000.0) <= 4 * 200_000.0 / math.sqrt(2 * n)
    # sample correlation: standard error (1 - rho^2) / sqrt(n) (Fisher's large-sample formula)
    corr = np.corrcoef(drawn[:, 2], drawn[:, 3])[0, 1]
    assert abs(corr - rho) <= 4 * (1 - rho ** 2) / math.sqrt(n)
    # a 90 % range: low = amount - 1.645 sd below only; nothing drawn above the amount
    one_sided = draw_needs(dates, amounts, sd, np.zeros(6), periods, 1000, rho, seed=11)
    assert one_sided.max() <= 1_000_000.0 and one_sided.min() < 1_000_000.0


def test_dask_local_scheduler_gives_the_same_outcomes(tmp_path):
    # the chunks run by dask's local schedulers (dask's own documentation: dask.compute with
    # scheduler="threads" / "synchronous") are the chunks run one after another
    from ladder.analysis.risk_dask import dask_runner

    book = _demo(tmp_path / "demo")
    options = RiskOptions(paths=100, months=2, rules=("fund",))
    plain = risk_book(book, options=options)
    for scheduler in ("threads", "synchronous"):
        got = risk_book(book, options=options, run=dask_runner(scheduler), chunk=30)   # the last chunk short
        np.testing.assert_allclose(got.rules[0].outcomes.income, plain.rules[0].outcomes.income, rtol=1e-12, atol=0)
        np.testing.assert_allclose(got.rules[0].outcomes.horizon_value, plain.rules[0].outcomes.horizon_value,
                                   rtol=1e-12, atol=0)


def test_uncertain_needs_reach_every_path(tmp_path):
    # cash_needs.csv with a stdev of 10 % beside each amount: the needs drawn differ from path to path
    # and average to the forecast within 4 standard errors (the normal's sample mean)
    book = _demo(tmp_path / "demo")
    path = book.files["cash_needs"]
    rows = list(csv.DictReader(io.StringIO(path.read_text())))
    out = io.StringIO()
    writer = csv.DictWriter(out, fieldnames=["date", "amount", "label", "stdev"])
    writer.writeheader()
    for r in rows:
        writer.writerow({**r, "stdev": f"{abs(float(r['amount'])) * 0.1:.0f}"})
    path.write_text(out.getvalue())
    book = load_book(book.folder)
    result = risk_book(book, options=RiskOptions(paths=200, months=3, rules=("fund",)))
    needs = result.rules[0].outcomes.needs
    forecast = plan_book(book, options=PlanOptions(months=3, rule="fund"), with_income=False).projection.needs
    assert (needs.std(axis=0) > 0).all()
    se = needs.std(axis=0) / math.sqrt(len(needs))
    assert (np.abs(needs.mean(axis=0) - forecast) <= 4 * se).all()
    assert not any("certain" in note for note in result.notes)
