"""Rating scales and their equivalences, checked against the agencies' published definitions.

Sources (named beside each check):
- S&P Global Ratings, "S&P Global Ratings Definitions" (long-term AAA ... D with '+'/'-' on AA to CCC;
  short-term A-1 (with '+'), A-2, A-3, B, C, D).
- Moody's, "Rating Symbols and Definitions" (Aaa ... C, modifiers 1, 2, 3 on Aa through Caa;
  short-term P-1, P-2, P-3, NP).
- Fitch Ratings, "Rating Definitions" (AAA ... D with '+'/'-' on AA to CCC, RD; F1+, F1, F2, F3, B, C, RD, D).
- Basel Committee, "International Convergence of Capital Measurement and Capital Standards" (June 2006),
  paragraphs 96-98, for reading two or three ratings.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from ladder.market import ratings as r

# S&P "Ratings Definitions": the categories best to worst, '+'/'-' from AA to CCC only.
SP_LONG = ["AAA", "AA+", "AA", "AA-", "A+", "A", "A-", "BBB+", "BBB", "BBB-", "BB+", "BB", "BB-",
           "B+", "B", "B-", "CCC+", "CCC", "CCC-", "CC", "C", "D"]
# Moody's "Rating Symbols and Definitions": Aaa, then 1/2/3 on Aa..Caa, then Ca and C.
MOODYS_LONG = ["Aaa", "Aa1", "Aa2", "Aa3", "A1", "A2", "A3", "Baa1", "Baa2", "Baa3", "Ba1", "Ba2", "Ba3",
               "B1", "B2", "B3", "Caa1", "Caa2", "Caa3", "Ca", "C"]


def test_sp_long_scale_order():
    # S&P "Ratings Definitions": AAA highest ... D in default; one notch per modified rating.
    assert [r.LONG_NOTCH[s] for s in SP_LONG] == list(range(1, 23))


def test_moodys_long_scale_order():
    # Moody's "Rating Symbols and Definitions": modifier 1 the higher end, 3 the lower end of a category.
    assert [r.LONG_NOTCH[s] for s in MOODYS_LONG] == list(range(1, 22))


def test_sp_moodys_one_to_one_pairs():
    # Parallel categories of the two definitions documents (AAA~Aaa, AA~Aa, A~A, BBB~Baa, BB~Ba, B~B,
    # CCC~Caa) with '+', flat, '-' matched to 1, 2, 3; Ca ~ CC and C ~ C are from memory (common practice).
    for sp, moodys in zip(SP_LONG, MOODYS_LONG):
        assert r.LONG_NOTCH[sp] == r.LONG_NOTCH[moodys], (sp, moodys)
    assert r.long_notch("AA+") == r.long_notch("Aa1") == 2
    assert r.long_notch("BBB-") == r.long_notch("Baa3") == 10     # the lowest investment grade on both scales


def test_fitch_long_uses_the_sp_symbols_and_rd():
    # Fitch "Rating Definitions": same letters as S&P; RD (restricted default) sits with D.
    assert r.long_notch("RD") == r.long_notch("D") == r.long_notch("SD") == 22


@pytest.mark.parametrize("symbol", ["AAA+", "AAA-", "CC+", "C-", "D+", "Aaa1", "Ca1", "C1", "Aa4", "Baa", "A0"])
def test_modifiers_outside_the_published_ranges_are_unknown(symbol):
    # S&P/Fitch: '+'/'-' only from AA to CCC; Moody's: 1/2/3 only from Aa to Caa.
    assert not r.is_known_long(symbol)


def test_short_scales():
    # S&P: A-1+ (the '+' for extremely strong) > A-1 > A-2 > A-3 > B > C > D.
    assert [r.SHORT_NOTCH[s] for s in ["A-1+", "A-1", "A-2", "A-3", "B", "C", "D"]] == list(range(1, 8))
    # Fitch: F1+ > F1 > F2 > F3 > B > C > RD/D, matching S&P level for level (from memory: common practice).
    assert [r.SHORT_NOTCH[s] for s in ["F1+", "F1", "F2", "F3", "B", "C", "D"]] == list(range(1, 8))
    assert r.short_notch("RD") == 7
    # Moody's: P-1 > P-2 > P-3 > NP. P-1 with A-1/F1 and NP just below A-3 are from memory (common practice).
    assert [r.SHORT_NOTCH[s] for s in ["P-1", "P-2", "P-3", "NP"]] == [2, 3, 4, 5]
    assert r.short_notch("P-1") > r.short_notch("A-1+")   # so P-1 alone does not meet a minimum of A-1+


def test_scales_do_not_mix():
    assert r.is_known_short("A-1+/P-1/F1+") and not r.is_known_long("A-1+")
    assert r.is_known_long("AA+/Aa1/AA") and not r.is_known_short("Aa1")
    assert r.is_known_long("B") and r.is_known_short("B")     # B, C, D exist on both S&P scales
    assert not r.is_known_long("") and not r.is_known_short("  ")


def test_field_parsing_and_separator():
    assert r.tokens(" AA+ / Aa1/AA ") == ["AA+", "Aa1", "AA"]
    assert r.long_notch("AA+/Aa2") == 3              # lowest by default
    assert r.long_notch("AA+/NR") == 2               # NR and WR are ignored
    assert r.is_known_long("WR/A1")
    assert math.isnan(r.long_notch("")) and math.isnan(r.long_notch("NR"))


def test_split_rules_follow_basel_paragraphs_96_to_98():
    # para 96: one assessment is used; para 97: of two, the worse; para 98: of three or more, the
    # higher risk weight of the two best assessments, i.e. the second best.
    assert r.resolve([5], "middle_of_three") == 5
    assert r.resolve([3, 7], "middle_of_three") == 7
    assert r.resolve([3, 8, 5], "middle_of_three") == 5
    assert r.resolve([9, 2, 4, 6], "middle_of_three") == 4
    assert r.resolve([3, 8, 5], "lowest") == 8
    assert r.long_notch("A/BBB+/A-", "middle_of_three") == r.long_notch("A-")
    with pytest.raises(ValueError):
        r.resolve([1], "highest")


def test_vectorized_matches_scalar():
    texts = np.array(["AA+/Aa1", "", "BBB+", "A1/A/A-", "AA+/Aa1", "NR"], dtype=object)
    for split in r.SPLIT_RULES:
        expected = [r.long_notch(t, split) for t in texts]
        np.testing.assert_array_equal(r.long_notches(texts, split), np.array(expected))
    np.testing.assert_array_equal(r.short_notches(np.array(["A-1/P-2", "F1+"], dtype=object)), [3.0, 1.0])


def test_rating_at_purchase_short_symbols_only_when_unambiguous():
    assert r.purchase_short_notch("AA-/A-1+") == 1
    assert math.isnan(r.purchase_short_notch("B"))     # read as the long-term B there
    assert r.long_notch("AA-/A-1+") == 4                # the long part of the same field


def test_explanations_suggest_the_intended_symbol():
    assert r.explain_long("AA+/Aa1") is None
    assert "'AA+'" in r.explain_long("aa+")                      # same letters in the published case
    assert "'Aa1'" in r.explain_long("AA1")
    assert r.explain_long("A-1") == "'A-1' is a short-term rating, not a long-term one"
    assert r.explain_short("Aa1") == "'Aa1' is a long-term rating, not a short-term one"
    assert "'A-1'" in r.explain_short("A1+") or "'A-1+'" in r.explain_short("A1+")
    assert r.explain_long("") == "no long-term rating given"


def test_display_symbols():
    assert [r.long_symbol(n) for n in (1, 7, 22)] == ["AAA", "A-", "D"]
    assert r.long_symbol(float("inf")) == "unrated" and r.short_symbol(float("nan")) == "unrated"
    assert r.short_symbol(2) == "A-1"
