"""``ladder open [BOOK]``: the workstation on a book (the bundled demo book when none is named)."""

from __future__ import annotations

from ladder.demo import DEMO_BOOK

HELP = "open the workstation (the demo book when no BOOK is given)"


def add_parser(subparsers) -> None:
    parser = subparsers.add_parser("open", help=HELP, description=HELP)
    parser.add_argument("book", metavar="BOOK", nargs="?", default=str(DEMO_BOOK),
                        help="the book folder (holds book.toml); default: the demo book")
    parser.set_defaults(run=run)


def run(args) -> int:
    from ladder.book.book_file import load_book

    book = load_book(args.book)          # problems go to the command line, before any screen
    from ladder.tui.app import make_app   # Textual loads only here

    make_app(book).run()
    return 0
