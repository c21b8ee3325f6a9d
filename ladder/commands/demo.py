"""``ladder demo FOLDER``: a fresh copy of the demo book to try every command on."""

from __future__ import annotations

from pathlib import Path

HELP = "write a fresh copy of the demo book (an invented company) into FOLDER"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("demo", help=HELP, description=HELP + "; FOLDER must be new or empty.")
    parser.add_argument("folder", metavar="FOLDER", type=Path, help="where to write the copy")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.demo import write_demo

    folder = write_demo(args.folder)
    print(f"Demo book written to {folder}. Try: ladder value {folder}")
    return 0
