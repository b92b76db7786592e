"""The ``notchwise`` command: recompute the demo cases and more without a spreadsheet.

Each subcommand lives with its subject and offers two functions,
``add_parser(subparsers)`` and ``run(arguments) -> int``; this module only
gathers them.
"""

from __future__ import annotations

import argparse
import sys

from notchwise.addin import CAUTION

from . import audit, demo, diagram, freeze

__all__ = ["main"]

SUBCOMMANDS = (demo, diagram, audit, freeze)


def main(argv=None) -> int:
    """Run the command line; returns the exit status."""
    parser = argparse.ArgumentParser(prog="notchwise", description=__doc__.splitlines()[0], epilog=CAUTION)
    subparsers = parser.add_subparsers(dest="command", required=True)
    for module in SUBCOMMANDS:
        module.add_parser(subparsers)
    arguments = parser.parse_args(argv)
    return arguments.run(arguments)


if __name__ == "__main__":
    sys.exit(main())
