"""The ``ladder`` command line: ``ladder`` alone opens the workstation on the demo book.

Input problems are printed one per line as ``file:row:column: message`` and exit with status 2;
``check`` exits 1 on a policy breach; a failure to read or write exits 3; 0 otherwise. The workstation is imported only when it opens,
so the reporting commands never load Textual.
"""

from __future__ import annotations

import argparse
import sys

from ladder import CAUTION, __version__
from ladder.errors import InputError

# subcommand -> module in ladder/commands
COMMANDS = {"value": "value", "shock": "shock", "check": "check", "plan": "plan", "build": "build",
            "report": "report", "import": "custodian", "roll": "roll", "restore": "restore", "open": "open",
            "demo": "demo"}
EXIT_OK, EXIT_BREACH, EXIT_INPUT, EXIT_IO = 0, 1, 2, 3


def _parser(only: str | None = None) -> argparse.ArgumentParser:
    """The argument parser; with ``only``, just that subcommand's module is imported (a faster start)."""
    import importlib

    parser = argparse.ArgumentParser(
        prog="ladder", description="A treasury workstation for a corporate cash ladder.", epilog=CAUTION)
    parser.add_argument("--version", action="version", version=f"ladder {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for name, module in COMMANDS.items():
        if only is None or name == only:
            importlib.import_module(f"ladder.commands.{module}").add_parser(sub)
    return parser


def main(argv: list[str] | None = None) -> int:
    argv = (sys.argv[1:] if argv is None else argv) or ["open"]
    parser = _parser(argv[0] if argv[0] in COMMANDS else None)
    args = parser.parse_args(argv)
    if not getattr(args, "run", None):
        parser.print_help()
        return EXIT_INPUT
    try:
        return args.run(args)
    except InputError as error:
        for problem in error.problems:
            print(problem, file=sys.stderr)
        print(f"ladder: refused: {len(error.problems)} problem(s); nothing was computed or written.",
              file=sys.stderr)
        return EXIT_INPUT
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:          # output piped into a program that stopped reading (e.g. head)
        sys.stderr.close()
        return EXIT_OK
    except OSError as error:         # a book another program is changing, a read-only file, a full disk
        print(f"ladder: {error}", file=sys.stderr)
        return EXIT_IO


if __name__ == "__main__":
    sys.exit(main())
