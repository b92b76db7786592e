"""``notchwise demo``: compute the demo cases and write them as the reference workbook."""

from __future__ import annotations

import math
import sys
import textwrap
from pathlib import Path

from notchwise.addin import CAUTION, SERIES_WARNING
from notchwise.workbooks.schema import SIGNIFICANT, decimals

__all__ = ["add_parser", "run", "format_table", "DEFAULT_OUT", "WIDTH"]

DEFAULT_OUT = "notchwise-reference.xlsx"
#: Columns of the terminal the demo's output keeps within.
WIDTH = 100
#: Rows of a table printed on the terminal; a longer one (a time history) is cut, the workbook holds it all.
MAX_PRINTED_ROWS = 12
#: A text cell longer than this is not a column but a note printed under its row, wrapped.
NOTE_FROM = 24
#: Narrowest a column's heading is wrapped to.
HEADING_WIDTH = 11


def add_parser(subparsers) -> None:
    """Register the ``demo`` subcommand."""
    parser = subparsers.add_parser(
        "demo", help="compute the demo cases and write the reference workbook (no spreadsheet program needed)"
    )
    parser.add_argument("--out", default=DEFAULT_OUT, help=f"where to write the workbook (default: ./{DEFAULT_OUT})")
    parser.set_defaults(run=run)


def _summary_rows():
    """First cell of a table's summary row -> the headings of its own figures (the whole start)."""
    from notchwise.addin.dynamics import WHOLE_START_HEADER

    return {"whole start": WHOLE_START_HEADER}


def _cell(value) -> str:
    """A cell as the terminal shows it: significant figures as in the workbook, a whole number whole."""
    if not isinstance(value, float):
        return str(value)
    if math.isnan(value):
        return ""
    places = 0 if value.is_integer() and abs(value) < 1e9 else decimals(value)
    return f"{value:.{SIGNIFICANT - 1}e}" if places is None else f"{value:,.{places}f}"


def _heading(text, width):
    return textwrap.wrap(str(text), width, break_long_words=False, break_on_hyphens=False) or [""]


def _columns(header, body, width=WIDTH):
    """Aligned lines of ``body`` under ``header``, within ``width``.

    Headings are wrapped (never inside a word); a text cell longer than NOTE_FROM (a basis, a
    message; in a row of words only, its first cell too) is printed under its row, wrapped, and a
    column left with nothing else is dropped.
    """
    text = [[_cell(c) for c in row] for row in body]
    wordy = [not any(isinstance(c, (int, float)) and not isinstance(c, bool) and not math.isnan(c) for c in row)
             for row in body]  # a row of words only (a table's closing note): its first cell may go below too
    long = [[(k > 0 or words) and len(cell) > NOTE_FROM for k, cell in enumerate(row)]
            for row, words in zip(text, wordy)]
    shown = [k for k in range(len(header)) if any(row[k] and not flags[k] for row, flags in zip(text, long))]
    for row, flags in zip(text, long):
        for k in shown:
            if flags[k]:
                row[k] = "(below)"
    cells = {k: max(len(row[k]) for row in text) for k in shown}
    for target in range(16, 3, -1):  # narrow the headings until the table fits
        widths = {k: max(cells[k], *(len(line) for line in _heading(header[k], max(cells[k], target))))
                  for k in shown}
        if sum(widths.values()) + 2 * (len(shown) - 1) <= width:
            break
    headings = {k: _heading(header[k], widths[k]) for k in shown}
    depth = max(len(lines) for lines in headings.values())
    lines = []
    for d in range(depth):
        parts = []
        for k in shown:
            skip = depth - len(headings[k])  # headings stand on the bottom line
            parts.append(headings[k][d - skip].rjust(widths[k]) if d >= skip else " " * widths[k])
        lines.append("  ".join(parts).rstrip())
    for row, flags, values in zip(text, long, body):
        lines.append("  ".join(row[k].rjust(widths[k]) for k in shown).rstrip())
        for k, flagged in enumerate(flags):
            if flagged:
                lines.extend(textwrap.wrap(f"{header[k]}: {values[k]}", width, initial_indent="    ",
                                           subsequent_indent="      "))
    return lines


def format_table(rows, width=WIDTH, labels=(), unit="") -> str:
    """Rows of cells (a spilled result, or one value or error text) as aligned plain text within ``width``.

    Headings are wrapped over several lines, a long text cell (a basis, a caution) is printed
    under its row, and a summary row (the whole start) under headings of its own. ``labels``
    head a table without a header row; ``unit`` follows a single value.
    """
    if not isinstance(rows, list):
        return f"{_cell(rows)} {unit}".strip()
    header, body = (rows[0], rows[1:]) if all(isinstance(c, str) for c in rows[0]) else (
        list(labels) or [f"column {k + 1}" for k in range(len(rows[0]))], rows)
    summaries = _summary_rows()
    plain = [row for row in body if str(row[0]) not in summaries]
    shown = plain[:MAX_PRINTED_ROWS]
    lines = _columns(header, shown, width)
    if len(plain) > len(shown):
        lines.append(f"... {len(plain) - len(shown)} more rows in the workbook")
    for row in body:
        if str(row[0]) in summaries:
            own = summaries[str(row[0])]
            kept = [k for k in range(1, len(row)) if own[k] and _cell(row[k])]
            lines.append(f"{row[0]}:")
            lines.extend("  " + line for line in _columns([own[k] for k in kept], [[row[k] for k in kept]], width - 2))
    return "\n".join(lines)


def run(arguments) -> int:
    """Write the workbook and print each case's results, the sweeps counted, and the caution."""
    from xlsxwriter.exceptions import FileCreateError

    from notchwise.workbooks.build_reference import build, say_progress

    out = Path(arguments.out)
    try:
        computed = build(out, progress=say_progress("notchwise demo"))
    except (OSError, FileCreateError) as error:
        print(f"notchwise demo: cannot write {out}: {error}", file=sys.stderr)
        return 2
    swept = {}
    for cell in computed:
        if cell.in_sweep:
            swept.setdefault((cell.sheet, cell.title), []).append(cell.function)
            continue
        print("\n".join(textwrap.wrap(f"{cell.sheet}: {cell.title} ({cell.function}, {cell.where})", WIDTH)))
        print(format_table(cell.value, labels=cell.labels, unit=cell.unit))
        print()
    for (sheet, title), functions in swept.items():
        print("\n".join(textwrap.wrap(
            f"{sheet}: {title}: {len(functions)} cells ({', '.join(sorted(set(functions)))}), charted in the workbook",
            WIDTH)))
    print()
    for line in (f"Wrote {out} ({len(computed)} computed cells, each saved with its result).", CAUTION, SERIES_WARNING):
        print("\n".join(textwrap.wrap(line, WIDTH)))
    return 0
