"""``notchwise freeze``: a copy of a workbook for readers who have no ``NW_`` functions.

Every cell whose formula calls an ``NW_`` function is replaced by the value
saved with it (every cell of a spilled table too), and the formula is kept as
the cell's note, so any spreadsheet program shows every figure and a reader
still sees how each was obtained. Other formulas stay formulas. A first sheet
says what the copy is.

The input is a stranger's file and is treated as such: its zip is checked as
the audit checks it before any XML is parsed, XML goes through defusedxml,
macros are neither run nor copied. The copy is written with openpyxl, which
does not carry charts and images over: the first sheet says so.
"""

from __future__ import annotations

import io
import sys
import warnings
from pathlib import Path

import openpyxl
from openpyxl.comments import Comment
from openpyxl.styles import Alignment, Font
from openpyxl.utils.cell import range_boundaries
from openpyxl.worksheet.formula import ArrayFormula

from notchwise.addin import CAUTION
from notchwise.workbooks.audit_archive import UnreadableWorkbook, check_archive, read_file_bytes
from notchwise.workbooks.audit_recompute import calls_nw

__all__ = ["add_parser", "run", "freeze_bytes", "FIRST_SHEET"]

FIRST_SHEET = "Frozen copy"
NOTE_AUTHOR = "notchwise freeze"
NOTE_SIZE = (90, 480)  # height, width of a note, in points: room for a long formula


def _formula_text(cell) -> str | None:
    """The formula of a cell as openpyxl reads it, or None for a constant (text that looks like one included)."""
    if cell.data_type != "f":
        return None
    return cell.value.text if isinstance(cell.value, ArrayFormula) else cell.value


def _cells_of(ws, value, anchor):
    """Every cell a formula fills: the anchor alone, or the whole range of an array formula."""
    if isinstance(value, ArrayFormula) and value.ref:
        min_col, min_row, max_col, max_row = range_boundaries(value.ref)
        return [ws.cell(row, col) for row in range(min_row, max_row + 1) for col in range(min_col, max_col + 1)]
    return [anchor]


def _note(formula: str) -> Comment:
    note = Comment(f"Frozen by notchwise freeze. The value is the one saved with this formula:\n{formula}", NOTE_AUTHOR)
    note.height, note.width = NOTE_SIZE
    return note


def freeze_bytes(data: bytes, source: str = "") -> tuple[openpyxl.Workbook, list[str]]:
    """The frozen workbook and the addresses (``Sheet!A1``) of the formulas frozen.

    Raises
    ------
    UnreadableWorkbook
        Where the file is not a workbook, is damaged, or asks more than the
        audit's limits allow.
    """
    check_archive(data)
    if not openpyxl.DEFUSEDXML:
        raise UnreadableWorkbook("defusedxml is not active in openpyxl; refusing to parse a file from outside")
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # openpyxl's remarks on odd files change nothing here
            book = openpyxl.load_workbook(io.BytesIO(data), data_only=False, keep_links=False, keep_vba=False)
            saved = openpyxl.load_workbook(io.BytesIO(data), data_only=True, keep_links=False, keep_vba=False)
    except Exception as error:  # a damaged part of a stranger's file is one line, never a traceback
        raise UnreadableWorkbook(f"cannot read the workbook: {type(error).__name__}: {' '.join(str(error).split())}") from None
    frozen = []
    for ws in book.worksheets:
        values = saved[ws.title]
        for row in ws.iter_rows():
            for anchor in row:
                formula = _formula_text(anchor)
                if formula is None or not calls_nw(formula):
                    continue
                for cell in _cells_of(ws, anchor.value, anchor):
                    cell.value = values[cell.coordinate].value
                anchor.comment = _note(formula)
                frozen.append(f"{ws.title}!{anchor.coordinate}")
    _explain(book, source, len(frozen))
    return book, frozen


def _explain(book: openpyxl.Workbook, source: str, count: int) -> None:
    """Put a first sheet saying what this copy is and is not."""
    sheet = book.create_sheet(_free_title(book), 0)
    lines = [
        ("Frozen copy: figures only, no NW_ functions needed", Font(bold=True, size=14)),
        (f"Made by notchwise freeze from {source or 'a workbook'}.", None),
        (f"{count} formulas that call NW_ functions were replaced by the values saved with them (whole tables "
         "included); each keeps its formula as a note on its first cell. Other formulas are unchanged.", None),
        ("Editing an input here does not recompute those figures: use the original workbook with the "
         "Notchwise add-in for that, or check it with notchwise audit.", None),
        ("Charts and images of the original are not carried over into this copy.", None),
        (CAUTION, Font(bold=True)),
    ]
    sheet.column_dimensions["A"].width = 110
    for row, (text, font) in enumerate(lines, start=1):
        cell = sheet.cell(row, 1, text)
        cell.alignment = Alignment(wrap_text=True, vertical="top")
        if font is not None:
            cell.font = font
    book.active = 0


def _free_title(book: openpyxl.Workbook) -> str:
    title, number = FIRST_SHEET, 2
    while title in book.sheetnames:
        title, number = f"{FIRST_SHEET} {number}", number + 1
    return title


def add_parser(subparsers) -> None:
    """Register the ``freeze`` subcommand."""
    parser = subparsers.add_parser(
        "freeze",
        help="write a copy whose NW_ results are plain values, for readers without the functions",
        description="Write a copy of a workbook in which every NW_ result is its saved value (tables included), "
        "with the formula kept as a cell note, so any spreadsheet program shows every figure. Exit 0: written; "
        "2: the input cannot be read or the copy cannot be written.",
    )
    parser.add_argument("path", help="the workbook to freeze (.xlsx or .xlsm)")
    parser.add_argument("out", help="where to write the frozen copy (.xlsx)")
    parser.set_defaults(run=run)


def run(arguments) -> int:
    """Freeze the workbook; return the exit status."""
    path, out = Path(arguments.path), Path(arguments.out)
    try:
        if out.resolve() == path.resolve():
            raise UnreadableWorkbook("the copy would overwrite the workbook; choose another OUT path")
        book, frozen = freeze_bytes(read_file_bytes(path), path.name)
    except UnreadableWorkbook as error:
        print(f"notchwise freeze: {path}: {' '.join(str(error).split())}", file=sys.stderr)
        return 2
    if out.suffix.lower() != ".xlsx":
        out = out.with_name(out.name + ".xlsx")
    try:
        book.save(out)
    except OSError as error:
        print(f"notchwise freeze: cannot write {out}: {error.strerror or error}", file=sys.stderr)
        return 2
    print(f"notchwise freeze: wrote {out}: {len(frozen)} NW_ formulas replaced by their saved values "
          "(formulas kept as notes; charts and images not copied)")
    print(CAUTION)
    return 0
