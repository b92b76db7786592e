"""``notchwise demo``: compute the demo cases and write them as the reference workbook."""

from __future__ import annotations

import sys
from pathlib import Path

from xlsxwriter.exceptions import FileCreateError

from notchwise.addin import CAUTION, SERIES_WARNING
from notchwise.workbooks.build_reference import build

__all__ = ["add_parser", "run", "format_table", "DEFAULT_OUT"]

DEFAULT_OUT = "notchwise-reference.xlsx"


def add_parser(subparsers) -> None:
    """Register the ``demo`` subcommand."""
    parser = subparsers.add_parser(
        "demo", help="compute the demo cases and write the reference workbook (no spreadsheet program needed)"
    )
    parser.add_argument("--out", default=DEFAULT_OUT, help=f"where to write the workbook (default: ./{DEFAULT_OUT})")
    parser.set_defaults(run=run)


#: Rows of a table printed on the terminal; a longer one (a time history) is cut, the workbook holds it all.
MAX_PRINTED_ROWS = 12


def format_table(rows) -> str:
    """Rows of cells (a spilled result, or one value or error text) as aligned plain text."""
    if not isinstance(rows, list):
        return f"{rows:.6g}" if isinstance(rows, float) else str(rows)
    shown = rows[:MAX_PRINTED_ROWS]
    text = [[f"{c:.4g}" if isinstance(c, float) else str(c) for c in row] for row in shown]
    widths = [max(len(row[k]) for row in text) for k in range(len(text[0]))]
    lines = ["  ".join(cell.rjust(w) for cell, w in zip(row, widths)) for row in text]
    if len(rows) > len(shown):
        lines.append(f"... {len(rows) - len(shown)} more rows in the workbook")
    return "\n".join(lines)


def run(arguments) -> int:
    """Write the workbook and print each case's results, the sweeps counted, and the caution."""
    out = Path(arguments.out)
    try:
        computed = build(out)
    except (OSError, FileCreateError) as error:
        print(f"notchwise demo: cannot write {out}: {error}", file=sys.stderr)
        return 2
    swept = {}
    for cell in computed:
        if cell.in_sweep:
            swept.setdefault((cell.sheet, cell.title), []).append(cell.function)
            continue
        print(f"{cell.sheet}: {cell.title} ({cell.function}, {cell.where})")
        print(format_table(cell.value))
        print()
    for (sheet, title), functions in swept.items():
        print(f"{sheet}: {title}: {len(functions)} cells ({', '.join(sorted(set(functions)))}), charted in the workbook")
    print(f"\nWrote {out} ({len(computed)} computed cells, each saved with its result).")
    print(CAUTION)
    print(SERIES_WARNING)
    return 0
