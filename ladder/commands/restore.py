"""``ladder restore``: list the kept versions of a book's files, or bring one back (journaled)."""

from __future__ import annotations

from pathlib import Path

from ladder.commands.output import console, print_caution, write_json

HELP = "list the earlier versions of the book's files kept by each change, or bring one back (journaled)"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("restore", help=HELP, description=HELP + ". The files it replaces are kept as "
                                   "a new version, so a restore can be undone the same way.")
    parser.add_argument("book", metavar="BOOK", type=Path, help="the book folder (holds book.toml)")
    which = parser.add_mutually_exclusive_group(required=True)
    which.add_argument("--list", action="store_true", help="list the versions, oldest first")
    which.add_argument("version", metavar="VERSION", nargs="?", help="the version to bring back (a name --list shows)")
    parser.add_argument("--format", choices=("table", "json"), default="table")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.folder.restore import restore_version
    from ladder.folder.versions import list_versions

    folder = args.book.parent if args.book.is_file() else args.book
    if args.list:
        versions = list_versions(folder)
        if args.format == "json":
            write_json({"versions": [{"version": v.name, "saved": v.saved, "before": v.reason,
                                      "files": [target for _, target in v.files]} for v in versions]})
            return 0
        _print_list(versions)
        return 0
    done = restore_version(folder, args.version)
    if args.format == "json":
        write_json({"restored": args.version, "files": [str(p) for p in done.files],
                    "kept_as": done.version, "entries": [e.to_json() for e in done.entries]})
        return 0
    con = console()
    con.print(f"Brought back {', '.join(p.name for p in done.files)} as kept in version {args.version}; "
              f"the files replaced are kept as version {done.version}, and the journal says so.")
    print_caution(con)
    return 0


def _print_list(versions) -> None:
    from rich.table import Table

    con = console()
    if not versions:
        con.print("No versions kept yet: every change to the book keeps the files it replaces.")
        return
    table = Table(title="Kept versions (files as they were before each change)", header_style="bold")
    table.add_column("Version (replaced at, UTC)", no_wrap=True)
    for title in ("Files", "Before"):
        table.add_column(title)
    for v in versions:
        table.add_row(v.name, ", ".join(t for _, t in v.files), v.reason)
    con.print(table)
    con.print("Bring one back with: ladder restore BOOK VERSION")
