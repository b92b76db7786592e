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
import sys
from pathlib import Path

from notchwise.addin import CAUTION, SERIES_WARNING
from notchwise.workbooks.cases import CAUTIONS, HOW_TO_GO_LIVE, SHEETS
from notchwise.workbooks.schema import Chart, Computed, Input, Link, Literal, Part, Result, Series, Sheet, Sweep, Table
from notchwise.workbooks.writer import CALC_ID, drawn_charts, write_workbook

__all__ = [
    "Input", "Table", "Link", "Literal", "Result", "Part", "Sweep", "Series", "Chart", "Sheet", "Computed", "SHEETS",
    "build", "charts", "say_progress", "DEFAULT_PATH", "CALC_ID", "SERIES_WARNING",
]

DEFAULT_PATH = Path(__file__).with_name("notchwise-reference.xlsx")


def build(path=DEFAULT_PATH, sheets=SHEETS, progress=None) -> list:
    """Write the reference workbook to ``path``; returns the computed cells as listed in it.

    ``progress(sheet, title)``, if given, is called before each result is computed.
    """
    return write_workbook(path, sheets, HOW_TO_GO_LIVE, CAUTIONS, progress)


def charts(sheets=SHEETS, progress=None) -> list:
    """The charts of the sheets with the numbers their cells hold, computed as for the workbook (in memory).

    Only the sheets up to the last one that has a chart of its own are computed.
    """
    last = max((k for k, sheet in enumerate(sheets) if sheet.charts), default=-1)
    return drawn_charts(sheets[: last + 1], HOW_TO_GO_LIVE, CAUTIONS, progress)


def say_progress(prefix):
    """A progress reporter for :func:`build`: one line on stderr per result computed."""
    def progress(sheet, title):
        print(f"{prefix}: computing {sheet}: {title}", file=sys.stderr, flush=True)
    return progress


def main(argv=None) -> int:
    """Build the workbook where asked and say what was written where."""
    parser = argparse.ArgumentParser(description="Build the Notchwise reference workbook.")
    parser.add_argument("path", nargs="?", default=str(DEFAULT_PATH), help=f"where to write it (default: {DEFAULT_PATH})")
    path = Path(parser.parse_args(argv).path)
    computed = build(path, progress=say_progress("build_reference"))
    print(f"Wrote the Notchwise reference workbook to {path.resolve()}: {len(SHEETS)} case sheets, "
          f"{len(computed)} computed results, each saved with its figures.")
    print(CAUTION)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
