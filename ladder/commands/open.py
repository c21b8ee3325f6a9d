"""``ladder open [BOOK]``: the workstation on a book (a working copy of the demo when none is named)."""

from __future__ import annotations

HELP = "open the workstation (a working copy of the demo book when no BOOK is given)"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("open", help=HELP, description=HELP)
    parser.add_argument("book", metavar="BOOK", nargs="?", default=None,
                        help="the book folder (holds book.toml); default: your working copy of the demo, "
                             "made on first use in your data folder")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.folder.book_file import load_book

    if args.book is None:
        from ladder.demo import working_demo

        args.book = working_demo()
    book = load_book(args.book)          # problems go to the command line, before any screen
    from ladder.tui.app import make_app   # Textual loads only here

    make_app(book).run()
    return 0
