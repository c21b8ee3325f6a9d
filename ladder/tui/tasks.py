"""The façade calls the app makes, by task name; each runs in a worker thread (no Textual here).

Every function takes the Book, the results it depends on and the app's ``Options`` (choices made on
screen, such as extra rate scenarios) and returns the façade's own result object. A façade module that is not installed yet makes its task report ``Unavailable``.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass

from ladder.errors import InputError, NothingToValue


@dataclass(frozen=True)
class Options:
    """Choices made on screen that the façade calls take: scenarios added in the Rates view."""

    extra_scenarios: tuple = ()
    plan_scenario: str | None = None     # a scenario name for the cash plan (None: the base case)
    plan_bp: float | None = None         # or a parallel move, bp
    unsaved_journal: tuple = ()          # journal lines of the pending (unsaved) trades, for the cash statement


class Unavailable(Exception):
    """The façade for a task is not part of this build."""


def _facade(name: str):
    try:
        return importlib.import_module(f"ladder.analysis.{name}")
    except ModuleNotFoundError as error:
        if error.name == f"ladder.analysis.{name}":
            raise Unavailable(f"ladder.analysis.{name} is not available in this build") from None
        raise


def valuation(book, results, options: Options):
    return _facade("valuation").value_book(book)


def check(book, results, options: Options):
    return _facade("check").check_book(book, valuation=results.valuation)


def shock(book, results, options: Options):
    facade = _facade("shock")
    return facade.shock_book(book, scenarios=facade.shock_scenarios(book) + tuple(options.extra_scenarios))


def plan(book, results, options: Options):
    return _facade("plan").plan_book(book, scenario=options.plan_scenario, bp=options.plan_bp)


def cash(book, results, options: Options):
    return _facade("cash_activity").cash_activity(book, options.unsaved_journal)


def history(book, results, options: Options):
    from ladder.report.history import month_ends    # the history database is the month-end report's

    return month_ends(book)


RUNNERS = {"valuation": valuation, "check": check, "shock": shock, "plan": plan, "cash": cash, "history": history}
DEPENDS = {"valuation": (), "check": ("valuation",), "shock": ("valuation",), "plan": ("valuation",), "cash": (),
           "history": ()}


def describe(error: BaseException) -> str:
    """Text for the screen: every problem of an InputError, one a line; for anything else its type and
    message, with the traceback written to the log file the text names."""
    if isinstance(error, InputError):
        return "\n".join(str(p) for p in error.problems)
    if isinstance(error, NothingToValue):
        return str(error)
    where = log_failure(error)
    return f"{type(error).__name__}: {error} (details in {where})"


def log_failure(error: BaseException) -> str:
    """Append ``error``'s traceback, with the time, to ``workstation.log`` in the user's log folder;
    returns the file's path, or why it could not be written."""
    import datetime as dt
    import traceback

    from platformdirs import user_log_path

    path = user_log_path("ladder") / "workstation.log"
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        with path.open("a", encoding="utf-8") as log:
            log.write(f"--- {dt.datetime.now().isoformat(timespec='seconds')}\n")
            log.write("".join(traceback.format_exception(error)))
    except OSError as failure:
        return f"no log: {failure}"
    return str(path)
