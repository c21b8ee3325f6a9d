"""The bundled demo book: copies hold only the demo's own files, and ``ladder demo`` writes one."""

import json

from ladder.cli import main
from ladder.demo import demo_files, demo_source, write_demo


def test_a_copy_leaves_behind_what_runs_wrote_beside_the_demo(tmp_path):
    source = tmp_path / "source"
    write_demo(source)
    for leftover in ("journal.jsonl", "history.sqlite", ".ladder.lock"):
        (source / leftover).write_text("left by a run", encoding="utf-8")
    (source / "reports").mkdir()
    copy = write_demo(tmp_path / "copy", source)
    assert sorted(p.name for p in copy.iterdir()) == sorted(p.name for p in demo_files())
    assert {"book.toml", "holdings.csv", "policy.toml", "curve.csv", "cash_needs.csv"} <= {p.name for p in copy.iterdir()}


def test_ladder_demo_writes_a_copy_every_command_reads(tmp_path, capsys):
    folder = tmp_path / "try"
    assert main(["demo", str(folder)]) == 0
    assert str(folder) in capsys.readouterr().out
    assert main(["value", str(folder), "--format", "json"]) == 0
    assert len(json.loads(capsys.readouterr().out)["holdings"]) == 69      # the demo's 69 holdings
    assert (demo_source() / "book.toml").read_bytes() == (folder / "book.toml").read_bytes()


def test_ladder_demo_refuses_a_folder_that_holds_files(tmp_path, capsys):
    (tmp_path / "mine.txt").write_text("keep me", encoding="utf-8")
    assert main(["demo", str(tmp_path)]) == 2
    assert "not an empty folder" in capsys.readouterr().err
    assert [p.name for p in tmp_path.iterdir()] == ["mine.txt"]
