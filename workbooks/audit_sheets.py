"""Reading the sheets of a checked archive: formulas and saved values of the cells present, and defined names.

XML is parsed by openpyxl through defusedxml (entity declarations refused)
and the cells read are counted against :data:`LIMITS.cells`. The one use of
openpyxl's private API, its sheet parser, stays in :func:`_parsed_cells`;
``pyproject.toml`` bounds openpyxl's version accordingly.
"""

from __future__ import annotations

import dataclasses
import io
import warnings
import zipfile

import openpyxl
from defusedxml import DefusedXmlException
from defusedxml.ElementTree import fromstring
from openpyxl.utils.cell import range_boundaries

from . import manifest
from .audit_archive import LIMITS, UnreadableWorkbook

__all__ = ["Sheet", "Book", "load_book"]


@dataclasses.dataclass
class Sheet:
    """The cells present in one sheet."""

    formulas: dict  # (row, col) -> formula text or openpyxl ArrayFormula
    values: dict  # (row, col) -> saved value
    max_row: int = 0
    max_col: int = 0

    def spilled(self) -> dict:
        """(row, col) -> anchor (row, col) of every cell that an array formula fills."""
        filled = {}
        for anchor, formula in self.formulas.items():
            ref = getattr(formula, "ref", None)
            if ref:
                first_col, first_row, last_col, last_row = range_boundaries(ref)
                filled.update({(r, c): anchor for r in range(first_row, last_row + 1)
                               for c in range(first_col, last_col + 1)})
        return filled


@dataclasses.dataclass
class Book:
    """Sheets by title and defined names by scope ("" for the workbook, else a sheet's title), lower-cased."""

    sheets: dict
    names: dict

    def manifest(self):
        """(sheet, cell or range, function) rows of the computed-cells manifest, or None if the book has none."""
        sheet = self.sheets.get(manifest.SHEET)
        if sheet is None:
            return None
        rows = [
            tuple(sheet.values.get((r, c)) for c in range(1, len(manifest.HEADER) + 1))
            for r in range(1, sheet.max_row + 1)
        ]
        if not rows or rows[0] != manifest.HEADER:
            return None
        return [row for row in rows[1:] if all(isinstance(v, str) and v for v in row)]


def _entity_attack(error: BaseException) -> bool:
    while error is not None:
        if isinstance(error, DefusedXmlException):
            return True
        error = error.__cause__ or error.__context__
    return False


def load_book(data: bytes) -> Book:
    """Sheets (formulas and saved values, only the cells present) and defined names of a checked archive."""
    if not openpyxl.DEFUSEDXML:
        raise UnreadableWorkbook("defusedxml is not active in openpyxl; refusing to parse a file from outside")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # openpyxl's remarks on odd files: the audit reports what matters
        return _load_book(data)


def _load_book(data: bytes) -> Book:
    try:
        book = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=False, keep_links=False)
    except UnreadableWorkbook:
        raise
    except Exception as error:
        raise _unreadable(error) from None
    sheets, counted = {}, 0
    try:
        for ws in book.worksheets:
            sheet = Sheet({}, {})
            for data_only, target in ((False, sheet.formulas), (True, sheet.values)):
                for cells in _parsed_cells(book, ws, data_only):
                    counted += 0 if data_only else len(cells)  # each cell counted once, in the first pass
                    if counted > LIMITS.cells:
                        raise UnreadableWorkbook(f"the workbook holds more than {LIMITS.cells:,} cells (the limit)")
                    for cell in cells:
                        if cell["value"] is None:
                            continue
                        if data_only or cell["data_type"] == "f":
                            target[cell["row"], cell["column"]] = cell["value"]
                        sheet.max_row = max(sheet.max_row, cell["row"])
                        sheet.max_col = max(sheet.max_col, cell["column"])
            sheets[ws.title] = sheet
        missing = [title for title in _declared_sheets(data) if title not in book.sheetnames]
        if missing:
            raise UnreadableWorkbook(f"the workbook is incomplete: the zip does not hold the sheet {missing[0]!r} "
                                     "that xl/workbook.xml names")
        names = {
            "": {k.lower(): v for k, v in book.defined_names.items()},
            **{ws.title: {k.lower(): v for k, v in ws.defined_names.items()} for ws in book.worksheets},
        }
    except UnreadableWorkbook:
        raise
    except Exception as error:
        raise _unreadable(error) from None
    finally:
        book.close()
    return Book(sheets, names)


def _declared_sheets(data: bytes) -> list:
    """The sheet names that xl/workbook.xml declares (openpyxl skips those whose part is missing)."""
    with zipfile.ZipFile(io.BytesIO(data)) as archive:
        root = fromstring(archive.read("xl/workbook.xml"))
    return [element.get("name") for element in root.iter() if element.tag.rsplit("}", 1)[-1] == "sheet"]


def _parsed_cells(book, ws, data_only: bool):
    """Rows of cells (dicts of row, column, value, data_type) as openpyxl's own sheet parser reads them.

    The only use of openpyxl's private API (``WorkSheetParser``, the parser its
    read-only sheets use): reading only the cells present, where a read-only
    sheet pads every row to the dimension the file claims.
    """
    from openpyxl.worksheet._reader import WorkSheetParser

    with ws._get_source() as source:
        parser = WorkSheetParser(
            source, ws._shared_strings, data_only=data_only, epoch=book.epoch,
            date_formats=book._date_formats, timedelta_formats=book._timedelta_formats,
        )
        for _, cells in parser.parse():
            yield cells


def _unreadable(error: BaseException) -> UnreadableWorkbook:
    if _entity_attack(error):
        return UnreadableWorkbook("the workbook's XML declares entities, which are refused (a possible entity-expansion attack)")
    if isinstance(error, KeyError):
        part = str(error.args[0]) if error.args else "?"
        return UnreadableWorkbook(f"the workbook is incomplete: it refers to a part that the zip does not hold ({part})")
    text = str(error).splitlines()[0] if str(error) else ""
    return UnreadableWorkbook(f"cannot read the workbook: {type(error).__name__}: {text}".rstrip(": "))
