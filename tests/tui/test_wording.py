"""Screen words a treasurer reads (issue 19): notches singular and plural, rules with nothing to
show, binding limits as sentences with their money, the build against the even ladder, round chart
ticks. No app: the functions that write the text."""

from __future__ import annotations

from types import SimpleNamespace

import pytest

from ladder.analysis.build import build_ladder
from ladder.tui.policy_text import headroom_text, rule_cells
from ladder.tui.views.builder import binding_sentence, result_text
from ladder.tui.widgets.chart import nice_ticks


def test_notches_are_singular_for_one():
    assert headroom_text(-1.0, "long_rating") == "-1 notch"
    assert headroom_text(1.0, "short_rating") == "+1 notch"
    assert headroom_text(2.0, "long_rating") == "+2 notches"
    assert headroom_text(0.0, "long_rating") == "+0 notches"


def test_a_rule_with_nothing_to_show_says_so():
    # the policy's 'sectors' rule allows no holding outside the named sectors and finds none
    assert rule_cells(0.0, 0.0, 0.0, "pct") == ("none allowed", "none found", "—")
    assert rule_cells(5.0, 3.29, 1.71, "pct") == ("5.00%", "3.29%", "+1.71%")


def test_binding_limits_read_as_sentences_with_money():
    b = SimpleNamespace(group="rung shares", label="4Y-5Y at most", text="each rung holds 10% to 30%", limit=30.0,
                        unit="buys_pct", step=1.0, income_per_step=268.98992, yield_bp_per_step=0.0074954)
    assert binding_sentence(b) == ("Rung 4Y-5Y is capped at 30% of the purchase; one point more would add 269 a "
                                   "year (0.007 bp of yield).")
    floor = SimpleNamespace(**{**vars(b), "label": "1Y-2Y at least", "limit": 10.0})
    assert binding_sentence(floor).startswith("Rung 1Y-2Y must be at least 10% of the purchase; one point less")


@pytest.fixture(scope="module")
def build(demo_book):
    return build_ladder(demo_book, "25000000")


def test_build_text_states_the_gain_over_the_even_ladder(build):
    text = result_text(build)
    gain = (build.after.yield_to_worst - build.naive_yield) * 1e4      # bp, by hand from the two yields
    assert build.gain_over_naive_bp == pytest.approx(gain, rel=1e-12, abs=0.0)
    assert (f"Built {build.after.yield_to_worst * 100:.3f}% against an even ladder's {build.naive_yield * 100:.3f}% "
            f"({gain:+.1f} bp)") in text
    assert "binding:" not in text and "naive" not in text
    assert binding_sentence(build.binding[0]) in text


def test_chart_ticks_are_round_and_never_minus_zero():
    assert nice_ticks(-28.3, 50.1) == ([-40.0, -20.0, 0.0, 20.0, 40.0, 60.0], ["-40", "-20", "0", "20", "40", "60"])
    assert nice_ticks(321.5, 346.4)[1] == ["320", "330", "340", "350"]
    assert nice_ticks(-0.01, 0.42)[1] == ["-0.2", "0.0", "0.2", "0.4", "0.6"]
