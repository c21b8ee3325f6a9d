"""The ``ladder`` command line: ``ladder`` alone opens the workstation on the demo book.

Input problems are printed one per line as ``file:row:column: message`` and exit with status 2;
a book without holdings says there is nothing to value (status 0);
a file that cannot be read or written (permission, no space, a folder where a file should be, a
damaged history database, a book another program is changing) is one line naming it and what to do,
exit status 3; ``check`` exits 1 on a policy breach; 0 otherwise. The workstation is imported only
when it opens, so the reporting commands never load Textual.
"""

from __future__ import annotations

import argparse
import json
import sys

from ladder import CAUTION, __version__
from ladder.errors import FileFault, InputError, NothingToValue, describe_os_error
from ladder.neutralize import safe_terminal

# subcommand -> module in ladder/commands
COMMANDS = {"value": "value", "shock": "shock", "check": "check", "plan": "plan", "build": "build",
            "report": "report", "import": "custodian", "roll": "roll", "cash": "cash", "restore": "restore", "open": "open",
            "demo": "demo"}
EXIT_OK, EXIT_BREACH, EXIT_INPUT, EXIT_FILE = 0, 1, 2, 3


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
            print(safe_terminal(problem), file=sys.stderr)
        print(f"ladder: refused: {len(error.problems)} problem(s); nothing was computed or written.",
              file=sys.stderr)
        return EXIT_INPUT
    except NothingToValue as empty:  # an empty book is not a failure: say so, in the format asked for
        if getattr(args, "format", None) == "json":
            print(json.dumps({"nothing_to_value": str(empty), "holdings": 0}, indent=2))
        else:   # a table on the terminal; with csv the line goes to stderr, keeping stdout empty
            print(f"ladder: {empty}", file=sys.stderr if getattr(args, "format", None) == "csv" else sys.stdout)
        return EXIT_OK
    except KeyboardInterrupt:
        return 130
    except BrokenPipeError:          # output piped into a program that stopped reading (e.g. head)
        sys.stderr.close()
        return EXIT_OK
    except FileFault as fault:
        print(f"ladder: {safe_terminal(fault)}", file=sys.stderr)
        return EXIT_FILE
    except OSError as error:         # permission, no space, not a directory, is a directory ...
        print(f"ladder: {safe_terminal(describe_os_error(error))}", file=sys.stderr)
        return EXIT_FILE


if __name__ == "__main__":
    sys.exit(main())
