"""Fixtures: private copies of the demo book (``report_books``)."""

from __future__ import annotations

import pytest

from report_books import copy_demo, recorded_month_end


@pytest.fixture
def demo_copy(tmp_path):
    return copy_demo(tmp_path / "tessaline")


@pytest.fixture(scope="session")
def first_month(tmp_path_factory):
    """(folder, book, MonthEnd) of a demo copy at 2026-11-30, recorded; tests must not change it."""
    return recorded_month_end(copy_demo(tmp_path_factory.mktemp("report") / "tessaline"))
