"""The subcommands of ``ladder``: each module has ``add_parser(subparsers)`` and ``run(args) -> int``."""
