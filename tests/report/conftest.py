"""Fixtures: a private copy of the demo book (the real demo files are never touched)."""

from __future__ import annotations

import shutil

import pytest

from ladder.demo import DEMO_BOOK


def copy_demo(target):
    shutil.copytree(DEMO_BOOK, target)
    return target


@pytest.fixture
def demo_copy(tmp_path):
    return copy_demo(tmp_path / "tessaline")


@pytest.fixture(scope="module")
def first_month(tmp_path_factory):
    """The demo copy's month-end report at 2026-11-30, recorded in its history."""
    from ladder.analysis.report import month_end_report, record_month_end
    from ladder.book.book_file import load_book

    folder = copy_demo(tmp_path_factory.mktemp("report") / "tessaline")
    book = load_book(folder)
    m = month_end_report(book)
    record_month_end(book, m)
    return folder, book, m
