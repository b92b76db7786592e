"""Build the Notchwise reference workbook from a declarative description of its sheets.

Run ``python -m notchwise.workbooks.build_reference [PATH]`` (or ``notchwise demo``); the
committed ``workbooks/notchwise-reference.xlsx`` is what it writes.

Three modules make it, their dependencies running one way (the command line uses this module;
this module uses the add-in, which uses the core):

- :mod:`notchwise.workbooks.schema`: what a sheet holds (inputs, results, sweeps, charts);
- :mod:`notchwise.workbooks.cases`: the worked cases, ``SHEETS``, built from the demo cases;
- :mod:`notchwise.workbooks.writer`: the layout with XlsxWriter.

Each sheet is a list of named inputs (a value or a table, with units) and of results: a call
of one ``NW_`` function of :mod:`notchwise.addin.udfs` by name, with its arguments given as
defined names of inputs, literals, or ``None`` for a skipped optional argument. Adding a case
means adding entries to ``SHEETS``: no new code.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from notchwise.addin import SERIES_WARNING
from notchwise.workbooks.cases import CAUTIONS, HOW_TO_GO_LIVE, SHEETS
from notchwise.workbooks.schema import Chart, Computed, Input, Link, Literal, Part, Result, Sheet, Sweep, Table
from notchwise.workbooks.writer import CALC_ID, write_workbook

__all__ = [
    "Input", "Table", "Link", "Literal", "Result", "Part", "Sweep", "Chart", "Sheet", "Computed", "SHEETS", "build",
    "DEFAULT_PATH", "CALC_ID", "SERIES_WARNING",
]

DEFAULT_PATH = Path(__file__).with_name("notchwise-reference.xlsx")


def build(path=DEFAULT_PATH, sheets=SHEETS) -> list:
    """Write the reference workbook to ``path``; returns the computed cells as listed in it."""
    return write_workbook(path, sheets, HOW_TO_GO_LIVE, CAUTIONS)


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="Build the Notchwise reference workbook.")
    parser.add_argument("path", nargs="?", default=str(DEFAULT_PATH))
    build(parser.parse_args(argv).path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
