"""``cash_needs.csv``'s optional ``low``/``high`` and ``stdev`` columns.

Source: issue 17: low/high (a 90 % range) or stdev beside each amount; a low above the amount or a
negative standard deviation refused as ``file:row:column: message``. The range ends are 1.645
standard deviations from the amount (the standard normal's 95th percentile, 1.6449 to four places,
from tables).
"""

import numpy as np
import pytest

from ladder.book.cash_needs import read_cash_needs
from ladder.errors import InputError


def _write(tmp_path, text):
    path = tmp_path / "cash_needs.csv"
    path.write_text(text)
    return path


def test_spread_columns(tmp_path):
    needs = read_cash_needs(_write(tmp_path, "date,amount,label,low,high,stdev\n"
                                             "2027-01-15,1000000,payroll,835510,1329000,\n"
                                             "2027-02-15,500000,tax,,,50000\n"
                                             "2027-03-15,-200000,receipts,,,\n"))
    below, above = needs.spread()
    np.testing.assert_allclose(below, [164490 / 1.6448536, 50000, 0], rtol=1e-6, atol=0)
    np.testing.assert_allclose(above, [329000 / 1.6448536, 50000, 0], rtol=1e-6, atol=0)


def test_absent_columns_mean_certain(tmp_path):
    needs = read_cash_needs(_write(tmp_path, "date,amount\n2027-01-15,1000000\n"))
    below, above = needs.spread()
    assert below.tolist() == [0.0] and above.tolist() == [0.0]


def test_bad_spreads_are_refused_with_their_cells(tmp_path):
    path = _write(tmp_path, "date,amount,low,high,stdev\n"
                            "2027-01-15,1000000,1200000,,\n"
                            "2027-02-15,1000000,,900000,\n"
                            "2027-03-15,1000000,,,-5\n"
                            "2027-04-15,1000000,900000,,10\n")
    with pytest.raises(InputError) as caught:
        read_cash_needs(path)
    lines = str(caught.value).splitlines()
    assert f"{path}:2:3: low 1,200,000.00 is above the amount 1,000,000.00" in lines
    assert f"{path}:3:4: high 900,000.00 is below the amount 1,000,000.00" in lines
    assert any(line.startswith(f"{path}:4:5: stdev -5 is negative") for line in lines)
    assert f"{path}:5:5: give a low/high range or a stdev, not both" in lines
