"""The notchwise command: recompute the demo cases and more without a spreadsheet.

Each subcommand lives with its subject and offers two functions,
``add_parser(subparsers)`` and ``run(arguments) -> int``; this module only
gathers them. A subcommand's module is imported only when that subcommand is
chosen (some import openpyxl, scipy or matplotlib), so ``notchwise --help``
and ``notchwise --version`` start at once: for the list of subcommands this
module holds their one-line summaries, and a test keeps each equal to the
``help`` its module registers.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from importlib import metadata

from notchwise.addin import CAUTION

__all__ = ["main", "SUBCOMMANDS", "version"]

#: Subcommand -> (its module, its one-line summary as the module registers it).
SUBCOMMANDS = {
    "demo": ("notchwise.workbooks.demo",
             "compute the demo cases and write the reference workbook (no spreadsheet program needed)"),
    "diagram": ("notchwise.workbooks.diagram",
                "draw the starting diagram or the coordination diagram of a demo case as a PNG"),
    "audit": ("notchwise.workbooks.audit",
              "recompute every NW_ cell of a workbook from its saved values and write a report"),
    "freeze": ("notchwise.workbooks.freeze",
               "write a copy whose NW_ results are plain values, for readers without the functions"),
}

def version() -> str:
    """The installed version of Notchwise (from the package metadata)."""
    try:
        return metadata.version("notchwise")
    except metadata.PackageNotFoundError:
        return "unknown (not installed)"


def _chosen(argv) -> str | None:
    """The subcommand named in ``argv``: the first word that is not an option (the top level takes no values)."""
    return next((word for word in argv if not word.startswith("-")), None)


def main(argv=None) -> int:
    """Run the command line; returns the exit status."""
    argv = sys.argv[1:] if argv is None else list(argv)
    parser = argparse.ArgumentParser(prog="notchwise", description=__doc__.splitlines()[0], epilog=CAUTION)
    parser.add_argument("--version", action="version", version=f"notchwise {version()}")
    subparsers = parser.add_subparsers(dest="command", required=True, metavar="{" + ",".join(SUBCOMMANDS) + "}")
    chosen = _chosen(argv)
    for name, (module, summary) in SUBCOMMANDS.items():
        if name == chosen:
            importlib.import_module(module).add_parser(subparsers)
        else:
            subparsers.add_parser(name, help=summary)
    arguments = parser.parse_args(argv)
    return arguments.run(arguments)


if __name__ == "__main__":
    sys.exit(main())
