"""The façade calls the app makes, by task name; each runs in a worker thread (no Textual here).

Every function takes the Book (and the results it depends on) and returns the façade's own result
object. A façade module that is not installed yet makes its task report ``Unavailable``.
"""

from __future__ import annotations

import importlib

from ladder.errors import InputError


class Unavailable(Exception):
    """The façade for a task is not part of this build."""


def _facade(name: str):
    try:
        return importlib.import_module(f"ladder.analysis.{name}")
    except ModuleNotFoundError as error:
        if error.name == f"ladder.analysis.{name}":
            raise Unavailable(f"ladder.analysis.{name} is not available in this build") from None
        raise


def valuation(book, results):
    return _facade("valuation").value_book(book)


def check(book, results):
    return _facade("check").check_book(book, valuation=results.valuation)


def shock(book, results):
    return _facade("shock").shock_book(book, valuation=results.valuation)


def plan(book, results):
    return _facade("plan").plan_book(book, valuation=results.valuation)


RUNNERS = {"valuation": valuation, "check": check, "shock": shock, "plan": plan}
DEPENDS = {"valuation": (), "check": ("valuation",), "shock": ("valuation",), "plan": ("valuation",)}


def describe(error: BaseException) -> str:
    """Text for the screen: every problem of an InputError, one a line; else the message."""
    if isinstance(error, InputError):
        return "\n".join(str(p) for p in error.problems)
    return str(error) or type(error).__name__
