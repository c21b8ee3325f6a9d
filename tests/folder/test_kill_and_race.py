"""Every kind of change survives a kill at any step, and two writers at once give a serial result.

A forked child makes one change to a copy of the demo book (the workstation's save of a booked trade,
``ladder roll``, ``ladder import --apply``, an applied build, the workstation's save of an edited
curve) and is killed with SIGKILL at the N-th step of the transaction protocol
(``LADDER_CRASH_AFTER_STEP``; steps include half-written files). Hypothesis draws the change and N.
The next load must see the book wholly before or wholly after the change: holdings, curve and
journal together, nothing of the transaction left, the replaced files kept as one version only if
the change happened. Then two children make changes at once, many times: the book and its journal
must equal one serial order of the two.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import os
import signal
import time
from contextlib import redirect_stderr, redirect_stdout
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings, strategies as st

import ladder.folder.transaction as transaction
from ladder.analysis.booking import loaded_state, save_edits, trade_entries
from ladder.analysis.build import build_ladder, save_build
from ladder.cli import main
from ladder.demo import write_demo
from ladder.folder.book_file import load_book
from ladder.folder.journal import read_journal
from ladder.folder.lock import book_lock
from ladder.folder.versions import list_versions
from ladder.policy.trades import apply_trades, read_trades

ROLL_TO = "2026-12-31"
TRADES = """id,sector,issuer,kind,face,maturity_date,coupon_pct,rating,price,action
NEW-TSY-1,treasury,US Treasury,fixed,2000000,2028-11-30,4.0,AA+,100.25,buy
DEMO-TSY-0101,treasury,US Treasury,discount,3000000,2026-12-17,,AA+,,sell
"""
CHILD_TIMEOUT = 120.0      # seconds; a child that takes longer has hung


@dataclasses.dataclass(frozen=True)
class Inputs:
    trades: Path
    custodian: Path
    build: object


def _cli(*argv) -> None:
    status = main(list(argv))
    if status:
        os._exit(70 + status)


def _workstation_trade(folder: Path, inputs: Inputs) -> None:
    book = load_book(folder)
    loaded = loaded_state(book)
    trades = read_trades(inputs.trades, book.holdings, book.valuation_date)
    entries = trade_entries(book, trades, "trade ticket")
    save_edits(book.with_holdings(apply_trades(book.holdings, trades)), loaded, entries, holdings=True, curve=False)


def _workstation_curve(folder: Path, inputs: Inputs) -> None:
    book = load_book(folder)
    shifted = type(book.curve)(book.curve.tenors, book.curve.par_yields + 0.0025)
    save_edits(dataclasses.replace(book, curve=shifted), loaded_state(book), [], holdings=False, curve=True)


def _build_apply(folder: Path, inputs: Inputs) -> None:
    with book_lock(folder, "ladder build --apply"):
        save_build(load_book(folder), inputs.build)


CHANGES = {
    "trade": _workstation_trade,
    "roll": lambda folder, inputs: _cli("roll", str(folder), "--to", ROLL_TO),
    "import": lambda folder, inputs: _cli("import", str(folder), str(inputs.custodian), "--apply", "--yes"),
    "build": _build_apply,
    "curve": _workstation_curve,
}


def _fork(change: str, folder: Path, inputs: Inputs, env: dict[str, str], start: int | None = None,
          report: int | None = None) -> int:
    """A child making ``change`` to ``folder`` with ``env`` set (after reading a byte from ``start``,
    if given; writing its count of protocol steps to ``report``, if given); returns its pid."""
    pid = os.fork()
    if pid:
        return pid
    status = 0
    try:
        os.environ.update(env)
        transaction._steps = 0
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, 1)
        os.dup2(devnull, 2)
        if start is not None:
            os.read(start, 1)
        with redirect_stdout(io.StringIO()), redirect_stderr(io.StringIO()):
            CHANGES[change](folder, inputs)
        if report is not None:
            os.write(report, str(transaction._steps).encode())
    except BaseException:
        status = 99
    os._exit(status)


def _wait(pid: int) -> int:
    """The child's wait status; it is killed (and the test fails) if it hangs."""
    deadline = time.monotonic() + CHILD_TIMEOUT
    while time.monotonic() < deadline:
        done, status = os.waitpid(pid, os.WNOHANG)
        if done:
            return status
        time.sleep(0.01)
    os.kill(pid, signal.SIGKILL)
    os.waitpid(pid, 0)
    pytest.fail(f"a child making a change hung for {CHILD_TIMEOUT} s")


def _state(folder: Path):
    """Holdings, curve, journal (without the time of recording) and book.toml as they are on disk."""
    journal = tuple(dataclasses.replace(e, recorded="") for e in read_journal(folder))
    return ((folder / "holdings.csv").read_bytes(), (folder / "curve.csv").read_bytes(), journal,
            (folder / "book.toml").read_bytes())


@pytest.fixture(scope="module")
def inputs(tmp_path_factory) -> Inputs:
    root = tmp_path_factory.mktemp("inputs")
    template = write_demo(root / "template")
    (root / "trades.csv").write_text(TRADES, encoding="utf-8")
    with (template / "holdings.csv").open(newline="") as handle:
        rows = list(csv.DictReader(handle))
    # one holding gone and one face changed, among those still held after the roll to ROLL_TO (the
    # funds, whose availability date the roll moves, are left out: the import keeps them), so the
    # file applies before or after a roll
    rows = [r for r in rows[1:] if r["kind"] != "fund" and r["maturity_date"] > ROLL_TO]
    rows[0]["face"] = str(float(rows[0]["face"]) - 1_000_000)
    with (root / "custodian.csv").open("w", newline="") as handle:
        writer = csv.DictWriter(handle, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    build = build_ladder(load_book(template), "5000000", rungs="4x3M")
    assert build.status == "built"
    return Inputs(root / "trades.csv", root / "custodian.csv", build)


@pytest.fixture(scope="module")
def outcomes(inputs, tmp_path_factory):
    """For each change: the book before, after (made without a kill) and its number of protocol steps."""
    root = tmp_path_factory.mktemp("outcomes")
    found = {}
    for change in CHANGES:
        folder = write_demo(root / change)
        before = _state(folder)
        steps_read, steps_write = os.pipe()
        pid = _fork(change, folder, inputs, {transaction.CRASH_VARIABLE: "1000000"}, report=steps_write)
        assert _wait(pid) == 0
        os.close(steps_write)
        steps = int(os.read(steps_read, 32))
        os.close(steps_read)
        after = _state(folder)
        assert after != before and steps > 10
        found[change] = (before, after, steps)
    return found


@settings(max_examples=45, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(data=st.data())
def test_a_change_killed_at_any_step_leaves_the_book_wholly_before_or_after(data, inputs, outcomes, tmp_path):
    change = data.draw(st.sampled_from(sorted(CHANGES)), label="change")
    before, after, steps = outcomes[change]
    step = data.draw(st.integers(1, steps + 1), label="killed at step")        # steps + 1: not killed
    folder = write_demo(Path(os.path.join(tmp_path, f"{change}-{step}-{time.monotonic_ns()}")))
    status = _wait(_fork(change, folder, inputs, {transaction.CRASH_VARIABLE: str(step)}))
    if step <= steps:
        assert os.WIFSIGNALED(status) and os.WTERMSIG(status) == signal.SIGKILL
    else:
        assert status == 0
    load_book(folder)                                          # loads, finishing or undoing the change
    state = _state(folder)
    assert state in (before, after)
    assert not (folder / transaction.RECORD).exists() and not list(folder.glob(".*.ladder-new"))
    versions = list_versions(folder)
    if state == after:
        (version,) = versions
        kept = {target: (version.path(folder) / name).read_bytes() for name, target in version.files}
        original = {"holdings.csv": before[0], "curve.csv": before[1], "book.toml": before[3]}
        assert kept == {name: original[name] for name in kept} and kept
    else:
        assert versions == ()


PAIRS = [("roll", "import"), ("roll", "roll"), ("import", "import")]
ROUNDS = 10


@pytest.fixture(scope="module")
def serial(inputs, tmp_path_factory):
    """For each pair of changes, the book after each serial order of the two."""
    root = tmp_path_factory.mktemp("serial")
    found = {}
    for pair in PAIRS:
        found[pair] = []
        for k, order in enumerate((pair, pair[::-1])):
            folder = write_demo(root / f"{'-'.join(pair)}-{k}")
            for change in order:
                assert _wait(_fork(change, folder, inputs, {})) == 0
            found[pair].append(_state(folder))
    return found


def test_two_writers_at_once_give_one_serial_order_of_their_changes(inputs, serial, tmp_path):
    for round_ in range(ROUNDS):
        pair = PAIRS[round_ % len(PAIRS)]
        folder = write_demo(tmp_path / f"round-{round_}")
        start_read, start_write = os.pipe()
        pids = [_fork(change, folder, inputs, {"LADDER_LOCK_WAIT": str(CHILD_TIMEOUT)}, start=start_read)
                for change in pair]
        os.write(start_write, b"go")                           # both start at once
        assert [_wait(pid) for pid in pids] == [0, 0]
        os.close(start_read)
        os.close(start_write)
        assert _state(folder) in serial[pair], f"round {round_}: {pair} gave no serial order's book"
        assert not (folder / transaction.RECORD).exists()
