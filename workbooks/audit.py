"""``notchwise audit``: recompute every NW_ cell of a workbook from its saved values, and report.

The workbook is input from a stranger. It is read into memory once (its
SHA-256 is of those bytes), its zip is checked before any XML is parsed
(member count, declared and actual expanded sizes, compression ratio), XML is
parsed by openpyxl through defusedxml (entity declarations refused), and the
cells read are counted against a limit. Macros are never run: a macro part is
reported, nothing more. The input file is never written; the report is
written to a temporary file beside its target and moved into place.

A cell is recomputed when its formula is one call ``=NW_NAME(arg, ...)`` whose
arguments are cell or range references (other sheets too), defined names or
literals; the function is looked up by name in :mod:`notchwise.addin.udfs` and called
with the saved values as Excel hands them over. Any other formula that calls
an NW_ function is listed as not recomputed, with the reason.
"""

from __future__ import annotations

import contextlib
import dataclasses
import datetime as dt
import hashlib
import html
import inspect
import io
import math
import os
import re
import sys
import tempfile
import warnings
import zipfile
import zlib
from importlib import metadata
from pathlib import Path

import openpyxl
from defusedxml import DefusedXmlException
from openpyxl.formula import Tokenizer
from openpyxl.formula.tokenizer import TokenizerError
from openpyxl.utils.cell import get_column_letter, range_boundaries
from openpyxl.worksheet._reader import WorkSheetParser

from notchwise.addin import CAUTION, udfs
from notchwise.addin.cells import call_with_cells

__all__ = [
    "add_parser",
    "run",
    "audit_bytes",
    "Audit",
    "CellAudit",
    "UnreadableWorkbook",
    "REL_TOL",
    "ABS_TOL",
    "LIMITS",
]

#: Agreement: |saved - recomputed| <= ABS_TOL + REL_TOL * max(|saved|, |recomputed|).
REL_TOL = 1e-9
ABS_TOL = 1e-12


@dataclasses.dataclass
class Limits:
    """What a workbook from outside may ask of the machine that audits it."""

    file_bytes: int = 100 * 2**20  # size of the file itself
    expanded_bytes: int = 200 * 2**20  # all zip members expanded, declared and actual
    members: int = 5000  # zip members
    ratio: float = 200.0  # expanded/compressed size of one member above ratio_from bytes
    ratio_from: int = 2**20
    cells: int = 2_000_000  # cells read over all sheets
    range_cells: int = 200_000  # cells of one argument range


LIMITS = Limits()
PROGRESS_FROM = 200  # NW_ cells from which a progress bar is drawn
MACRO_PARTS = ("vbaproject.bin",)


class UnreadableWorkbook(Exception):
    """The file cannot be read as a workbook, or asks more than the limits allow."""


class _NotRecomputable(Exception):
    """A formula calls an NW_ function in a way the audit does not recompute."""


# -- reading the file safely ----------------------------------------------------------------


def read_file_bytes(path: Path) -> bytes:
    """The file's bytes, refusing what is not a regular file or exceeds the size limit."""
    try:
        if not path.is_file():
            raise UnreadableWorkbook(f"{path} is not a file")
        size = path.stat().st_size
        if size > LIMITS.file_bytes:
            raise UnreadableWorkbook(f"{path} is {size / 2**20:.0f} MB; the limit is {LIMITS.file_bytes / 2**20:.0f} MB")
        with path.open("rb") as handle:
            return handle.read(LIMITS.file_bytes + 1)
    except OSError as error:
        raise UnreadableWorkbook(f"cannot read {path}: {error.strerror or error}") from None


def check_archive(data: bytes) -> list:
    """Check the zip before any XML is parsed; returns notes (macro parts found).

    Every member is expanded once, in chunks, counting bytes: a member that
    expands beyond its declared size, or a total beyond the limit, is refused
    as soon as it is seen, and a damaged member fails its CRC check.
    """
    try:
        archive = zipfile.ZipFile(io.BytesIO(data))
    except zipfile.BadZipFile:
        raise UnreadableWorkbook("not a workbook: the file is not a zip archive (or it is truncated)") from None
    except _ZIP_FAULTS as error:
        raise UnreadableWorkbook(f"the zip is damaged: {type(error).__name__}: {error}") from None
    with archive:
        members = archive.infolist()
        if len(members) > LIMITS.members:
            raise UnreadableWorkbook(f"the zip has {len(members)} members; the limit is {LIMITS.members}")
        names = {m.filename.lower() for m in members}
        if "xl/workbook.xml" not in names and "[content_types].xml" not in names:
            raise UnreadableWorkbook("not a workbook: the zip holds no spreadsheet (no xl/workbook.xml)")
        declared = sum(m.file_size for m in members)
        if declared > LIMITS.expanded_bytes:
            raise UnreadableWorkbook(_too_big(declared))
        for member in members:
            if member.file_size > LIMITS.ratio_from and member.file_size > LIMITS.ratio * max(member.compress_size, 1):
                raise UnreadableWorkbook(
                    f"zip member {member.filename!r} would expand {member.file_size / max(member.compress_size, 1):.0f}"
                    f" times (limit {LIMITS.ratio:.0f}): a possible zip bomb"
                )
        expanded = 0
        for member in members:
            seen = 0
            try:
                with archive.open(member) as stream:
                    while chunk := stream.read(2**20):
                        seen += len(chunk)
                        expanded += len(chunk)
                        if seen > member.file_size or expanded > LIMITS.expanded_bytes:
                            raise UnreadableWorkbook(
                                f"zip member {member.filename!r} expands beyond its declared size: a possible zip bomb"
                            )
            except _ZIP_FAULTS as error:
                raise UnreadableWorkbook(f"the zip is damaged at {member.filename!r}: {error}") from None
    return [
        f"contains a macro part ({m.filename}); it was not run and is not audited"
        for m in members
        if m.filename.lower().rsplit("/", 1)[-1] in MACRO_PARTS
    ]


#: What a damaged zip raises in the standard library: bad headers or streams, odd versions or names, encryption.
_ZIP_FAULTS = (
    zipfile.BadZipFile, zlib.error, EOFError, ValueError, NotImplementedError, OSError, UnicodeError, RuntimeError,
)


def _too_big(size: int) -> str:
    return f"the zip expands to {size / 2**20:.0f} MB; the limit is {LIMITS.expanded_bytes / 2**20:.0f} MB"


@dataclasses.dataclass
class _Sheet:
    formulas: dict  # (row, col) -> formula text or openpyxl ArrayFormula
    values: dict  # (row, col) -> saved value
    max_row: int = 0
    max_col: int = 0


def _entity_attack(error: BaseException) -> bool:
    while error is not None:
        if isinstance(error, DefusedXmlException):
            return True
        error = error.__cause__ or error.__context__
    return False


def load_book(data: bytes):
    """Sheets (formulas and saved values, only the cells present) and defined names."""
    if not openpyxl.DEFUSEDXML:
        raise UnreadableWorkbook("defusedxml is not active in openpyxl; refusing to parse a file from outside")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # openpyxl's remarks on odd files: the audit reports what matters
        return _load_book(data)


def _load_book(data: bytes):
    try:
        book = openpyxl.load_workbook(io.BytesIO(data), read_only=True, data_only=False, keep_links=False)
    except UnreadableWorkbook:
        raise
    except Exception as error:
        raise _unreadable(error) from None
    sheets, counted = {}, 0
    try:
        for ws in book.worksheets:
            sheet = _Sheet({}, {})
            # openpyxl's own sheet parser, as its read-only sheets use it, but reading only the cells
            # present: a read-only sheet pads every row to the dimension the file claims.
            for data_only, target in ((False, sheet.formulas), (True, sheet.values)):
                with ws._get_source() as source:
                    parser = WorkSheetParser(
                        source, ws._shared_strings, data_only=data_only, epoch=book.epoch,
                        date_formats=book._date_formats, timedelta_formats=book._timedelta_formats,
                    )
                    for _, cells in parser.parse():
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
    return sheets, names


def _unreadable(error: BaseException) -> UnreadableWorkbook:
    if _entity_attack(error):
        return UnreadableWorkbook("the workbook's XML declares entities, which are refused (a possible entity-expansion attack)")
    text = str(error).splitlines()[0] if str(error) else ""
    return UnreadableWorkbook(f"cannot read the workbook: {type(error).__name__}: {text}".rstrip(": "))


# -- recomputing one cell -------------------------------------------------------------------


@dataclasses.dataclass
class CellAudit:
    """What the audit found for one cell that calls an NW_ function."""

    sheet: str
    address: str  # the cell, or the whole array range
    formula: str
    function: str = ""
    inputs: list = dataclasses.field(default_factory=list)  # (parameter, source, value)
    saved: object = None
    recomputed: object = None
    difference: float | None = None
    verdict: str = "not recomputed"  # "agrees", "differs", "not recomputed"
    reason: str = ""


def _function_name(token_value: str) -> str:
    name = token_value[:-1].rsplit("!", 1)[-1]
    for prefix in ("_xludf.", "_xll."):
        if name.lower().startswith(prefix):
            name = name[len(prefix):]
    return name.upper()


def calls_nw(formula: str) -> bool:
    """True where the formula text calls a function named NW_..."""
    if "NW_" not in formula.upper():
        return False
    try:
        tokens = _tokens(formula)
    except _NotRecomputable:  # unparseable: listed, so that the reason shows in the report
        return re.search(r"NW_\w*\s*\(", formula, re.IGNORECASE) is not None
    return any(t.type == "FUNC" and t.subtype == "OPEN" and _function_name(t.value).startswith("NW_") for t in tokens)


def _tokens(formula: str) -> list:
    try:
        return [t for t in Tokenizer(formula).items if t.type != "WHITE-SPACE"]
    except (TokenizerError, IndexError) as error:  # openpyxl's tokenizer pops an empty stack on some damaged formulas
        raise _NotRecomputable(f"the formula cannot be parsed ({error})") from None


def split_call(formula: str):
    """(function name, list of argument token lists) of a formula that is one function call."""
    tokens = _tokens(formula)
    if not tokens or tokens[0].type != "FUNC" or tokens[0].subtype != "OPEN" or tokens[-1].type != "FUNC":
        raise _NotRecomputable("the NW_ call is part of a larger expression")
    arguments, current, depth = [], [], 0
    for token in tokens[1:-1]:
        if token.type in ("FUNC", "PAREN", "ARRAY") and token.subtype == "OPEN":
            depth += 1
        elif token.type in ("FUNC", "PAREN", "ARRAY") and token.subtype == "CLOSE":
            depth -= 1
            if depth < 0:
                raise _NotRecomputable("the NW_ call is part of a larger expression")
        if depth == 0 and token.type == "SEP" and token.subtype == "ARG":
            arguments.append(current)
            current = []
        else:
            current.append(token)
    arguments.append(current)
    if arguments == [[]]:
        arguments = []
    return _function_name(tokens[0].value), arguments


class _Resolver:
    """Values of argument tokens from the saved cells and defined names."""

    def __init__(self, sheets, names):
        self.sheets, self.names = sheets, names

    def argument(self, tokens, sheet: str):
        """(value as Excel hands it over, source text)."""
        text = "".join(t.value for t in tokens)
        if not tokens:
            return None, "(blank: default)"
        if len(tokens) == 2 and tokens[0].type == "OPERATOR-PREFIX" and tokens[1].subtype == "NUMBER":
            sign = -1.0 if tokens[0].value == "-" else 1.0
            return sign * float(tokens[1].value), text
        if len(tokens) != 1 or tokens[0].type != "OPERAND":
            raise _NotRecomputable(f"argument {text!r} is an expression, not a reference or a literal")
        token = tokens[0]
        if token.subtype == "NUMBER":
            return float(token.value), text
        if token.subtype == "TEXT":
            return token.value[1:-1].replace('""', '"'), text
        if token.subtype == "LOGICAL":
            return token.value.upper() == "TRUE", text
        if token.subtype == "ERROR":
            return token.value, text
        return self.reference(token.value, sheet, depth=0), text

    def reference(self, text: str, sheet: str, depth: int):
        if "!" in text:
            where, ref = text.rsplit("!", 1)
            if where.startswith("'") and where.endswith("'"):
                where = where[1:-1].replace("''", "'")
            if "[" in where:
                raise _NotRecomputable(f"{text} refers to another workbook")
            if ":" in where:
                raise _NotRecomputable(f"{text} spans several sheets")
            if where not in self.sheets:
                raise _NotRecomputable(f"{text} refers to a sheet this workbook does not have")
        else:
            where, ref = sheet, text
            defined = self.names.get(sheet, {}).get(text.lower()) or self.names[""].get(text.lower())
            if defined is not None:
                return self._name(defined, text, sheet, depth)
        try:
            min_col, min_row, max_col, max_row = range_boundaries(ref.replace("$", ""))
        except (ValueError, TypeError):
            raise _NotRecomputable(f"{text} is neither a cell reference nor a defined name of this workbook") from None
        cells = self.sheets[where]
        min_col, min_row = min_col or 1, min_row or 1
        max_col, max_row = max_col or max(cells.max_col, min_col), max_row or max(cells.max_row, min_row)
        if (max_row - min_row + 1) * (max_col - min_col + 1) > LIMITS.range_cells:
            raise _NotRecomputable(f"{text} spans more than {LIMITS.range_cells:,} cells")
        return [[cells.values.get((r, c)) for c in range(min_col, max_col + 1)] for r in range(min_row, max_row + 1)]

    def _name(self, defined, text, sheet, depth):
        target = (defined.value or "").lstrip("=")
        if depth > 3:
            raise _NotRecomputable(f"defined name {text} refers to names too deeply")
        try:
            return float(target)
        except ValueError:
            pass
        if target.startswith('"') and target.endswith('"'):
            return target[1:-1].replace('""', '"')
        tokens = _tokens("=" + target)
        if len(tokens) != 1 or tokens[0].subtype != "RANGE":
            raise _NotRecomputable(f"defined name {text} is a formula ({target}), not a range")
        return self.reference(tokens[0].value, sheet, depth + 1)


def _block(value) -> list:
    """A result or saved range as a list of rows."""
    return value if isinstance(value, list) else [[value]]


def _blank(value) -> bool:
    return value is None or value == ""


def _same(saved, recomputed):
    """(agrees, numeric difference or None) of two cell values."""
    if isinstance(saved, bool) or isinstance(recomputed, bool):
        return saved is recomputed, None
    if isinstance(saved, (int, float)) and isinstance(recomputed, (int, float)):
        difference = abs(float(saved) - float(recomputed))
        if math.isnan(difference):
            return False, None
        return difference <= ABS_TOL + REL_TOL * max(abs(saved), abs(recomputed)), difference
    if _blank(saved) and _blank(recomputed):
        return True, None
    return saved == recomputed, None


def compare(saved: list, recomputed: list):
    """(agrees, largest numeric difference, note) of a saved range against the recomputed result."""
    rows, cols = len(recomputed), max((len(r) for r in recomputed), default=0)
    saved_rows, saved_cols = len(saved), len(saved[0]) if saved else 0
    if (rows, cols) == (1, 1) and (saved_rows, saved_cols) != (1, 1):
        recomputed = [[recomputed[0][0]] * saved_cols for _ in range(saved_rows)]  # a legacy array fills its range
        rows, cols = saved_rows, saved_cols
    if rows > saved_rows or cols > saved_cols:
        return False, None, f"the result is {rows} x {cols} cells but the saved range is {saved_rows} x {saved_cols}"
    agrees, largest = True, None
    for r in range(saved_rows):
        for c in range(saved_cols):
            if r >= rows or c >= len(recomputed[r]):
                if saved[r][c] not in ("#N/A", None):  # a legacy array pads its range with #N/A
                    return False, largest, f"the saved range holds more cells than the result ({saved_rows} x {saved_cols})"
                continue
            same, difference = _same(saved[r][c], recomputed[r][c])
            agrees &= same
            if difference is not None:
                largest = difference if largest is None else max(largest, difference)
    return agrees, largest, ""


def audit_cell(resolver: _Resolver, sheets, sheet: str, row: int, col: int, formula) -> CellAudit:
    """Recompute one NW_ cell and compare with what the file saved."""
    text = getattr(formula, "text", formula)
    address = f"{get_column_letter(col)}{row}"
    first_col, first_row, last_col, last_row = col, row, col, row
    if getattr(formula, "ref", None):
        address = formula.ref
        first_col, first_row, last_col, last_row = range_boundaries(formula.ref)
    values = sheets[sheet].values
    saved = [[values.get((r, c)) for c in range(first_col, last_col + 1)] for r in range(first_row, last_row + 1)]
    found = CellAudit(sheet, address, text, saved=saved if len(saved) > 1 or len(saved[0]) > 1 else saved[0][0])
    try:
        function, arguments = split_call(text)
        found.function = function
        if function not in udfs.__all__:
            raise _NotRecomputable(f"{function} is not a function of this Notchwise version")
        func = getattr(udfs, function)
        parameters = list(inspect.signature(func).parameters)
        if len(arguments) > len(parameters):
            raise _NotRecomputable(f"{function} takes at most {len(parameters)} arguments; the formula gives {len(arguments)}")
        values_in = []
        for k, tokens in enumerate(arguments):
            value, source = resolver.argument(tokens, sheet)
            values_in.append(value)
            found.inputs.append((parameters[k], source, value))
    except _NotRecomputable as why:
        found.reason = str(why)
        return found
    if all(_blank(v) for r in saved for v in r):
        found.reason = "the file holds no saved result for this cell"
        return found
    result = call_with_cells(func, values_in)
    found.recomputed = result
    agrees, found.difference, note = compare(saved, _block(result))
    found.verdict = "agrees" if agrees else "differs"
    found.reason = note
    return found


# -- the whole workbook ---------------------------------------------------------------------


@dataclasses.dataclass
class Audit:
    """The audit of one workbook."""

    source: str
    sha256: str
    started: str
    version: str
    notes: list
    cells: list

    def count(self, verdict: str) -> int:
        return sum(c.verdict == verdict for c in self.cells)


def tool_version() -> str:
    try:
        return metadata.version("notchwise")
    except metadata.PackageNotFoundError:
        return "unknown"


def audit_bytes(data: bytes, source: str = "", progress=None) -> Audit:
    """Audit a workbook given as bytes; raises UnreadableWorkbook where it cannot be read."""
    started = dt.datetime.now(dt.timezone.utc).replace(microsecond=0).isoformat()
    notes = check_archive(data)
    sheets, names = load_book(data)
    resolver = _Resolver(sheets, names)
    todo = [
        (title, row, col, formula)
        for title, sheet in sheets.items()
        for (row, col), formula in sorted(sheet.formulas.items())
        if isinstance(getattr(formula, "text", formula), str) and calls_nw(getattr(formula, "text", formula))
    ]
    cells = []
    for k, (title, row, col, formula) in enumerate(todo):
        try:
            cells.append(audit_cell(resolver, sheets, title, row, col, formula))
        except Exception as error:  # a fault of ours on an odd formula: listed, never a traceback
            found = CellAudit(title, f"R{row}C{col}", str(getattr(formula, "text", formula)))
            found.reason = f"the audit could not read this formula ({type(error).__name__}: {error})"
            cells.append(found)
        if progress:
            progress(k + 1, len(todo))
    return Audit(source, hashlib.sha256(data).hexdigest(), started, tool_version(), notes, cells)


# -- the report -----------------------------------------------------------------------------


def _show(value, limit: int = 12) -> str:
    """A value or a range as short text; ranges show their size and first cells."""
    if isinstance(value, list) and len(value) == 1 and len(value[0]) == 1:
        return _show(value[0][0])
    if isinstance(value, list):
        flat = [c for row in value for c in row]
        shown = ", ".join(_show(c) for c in flat[:limit])
        more = ", ..." if len(flat) > limit else ""
        return f"{len(value)} x {len(value[0]) if value else 0}: [{shown}{more}]"
    if isinstance(value, float):
        return f"{value:.10g}"
    return "(blank)" if value is None else str(value)


STYLE = """
body { font-family: system-ui, sans-serif; margin: 2em; color: #1d3b53; }
.caution { border-left: 6px solid #8a2d1e; padding: .5em 1em; background: #fbf1d4; }
table { border-collapse: collapse; width: 100%; font-size: 90%; }
th, td { border: 1px solid #c7d3db; padding: .3em .5em; text-align: left; vertical-align: top; }
th { background: #1d3b53; color: white; }
tr.differs td { background: #f6d8d2; }
tr.not td { background: #eeeeee; }
code { white-space: pre-wrap; word-break: break-all; }
table.inner { width: auto; font-size: 85%; }
table.inner td { border-color: #e3ecf1; padding: .1em .3em; }
"""


TABLE_CELLS_SHOWN = 400  # a saved or recomputed range up to this size is shown whole in the report


def _html_value(value) -> str:
    """A value, or a range as a small table of all its cells (escaped)."""
    several = isinstance(value, list) and value and (len(value) > 1 or len(value[0]) > 1)
    if several and sum(len(r) for r in value) <= TABLE_CELLS_SHOWN:
        rows = "".join("<tr>" + "".join(f"<td>{html.escape(_show(c))}</td>" for c in row) + "</tr>" for row in value)
        return f'<table class="inner">{rows}</table>'
    return html.escape(_show(value))


def render_html(audit: Audit) -> str:
    """The audit as a self-contained HTML page; every text from the workbook is escaped."""
    e = html.escape
    rows = []
    for c in audit.cells:
        inputs = "<br>".join(f"{e(p)} = <code>{e(s)}</code> &rarr; {e(_show(v))}" for p, s, v in c.inputs)
        klass = {"agrees": "agrees", "differs": "differs"}.get(c.verdict, "not")
        difference = "" if c.difference is None else f"{c.difference:.3g}"
        verdict = e(c.verdict) + (f"<br><small>{e(c.reason)}</small>" if c.reason else "")
        rows.append(
            f'<tr class="{klass}"><td>{e(c.sheet)}!{e(c.address)}</td><td><code>{e(c.formula)}</code></td>'
            f"<td>{inputs}</td><td>{_html_value(c.saved)}</td><td>{_html_value(c.recomputed) if c.verdict != 'not recomputed' else ''}</td>"
            f"<td>{difference}</td><td>{verdict}</td></tr>"
        )
    notes = "".join(f"<li>{e(n)}</li>" for n in audit.notes)
    return f"""<!DOCTYPE html>
<html lang="en"><head><meta charset="utf-8"><title>Notchwise audit of {e(audit.source)}</title>
<style>{STYLE}</style></head><body>
<h1>Notchwise audit</h1>
<p class="caution">{e(CAUTION)} Series motors must never be run unloaded.</p>
<table>
<tr><th>workbook</th><td>{e(audit.source)}</td></tr>
<tr><th>SHA-256</th><td><code>{e(audit.sha256)}</code></td></tr>
<tr><th>audited at (UTC)</th><td>{e(audit.started)}</td></tr>
<tr><th>tool</th><td>notchwise {e(audit.version)}</td></tr>
<tr><th>tolerance</th><td>|saved &minus; recomputed| &le; {ABS_TOL:g} + {REL_TOL:g} &times; max(|saved|, |recomputed|); text must match exactly</td></tr>
<tr><th>cells</th><td>{len(audit.cells)} call NW_ functions: {audit.count('agrees')} agree, {audit.count('differs')} differ, {audit.count('not recomputed')} not recomputed</td></tr>
</table>
{f'<h2>Notes</h2><ul>{notes}</ul>' if notes else ''}
<h2>Cells</h2>
<table><tr><th>sheet!cell</th><th>formula</th><th>inputs (saved values)</th><th>saved result</th><th>recomputed</th><th>largest difference</th><th>verdict</th></tr>
{''.join(rows)}
</table>
<p>Each cell was recomputed from the values saved in the workbook, not from a live spreadsheet; inputs that are
themselves formulas were taken at their saved values.</p>
</body></html>
"""


def write_atomically(path: Path, text: str) -> None:
    """Write ``text`` to a temporary file beside ``path`` and move it into place."""
    directory = path.parent if str(path.parent) else Path(".")
    handle, temporary = tempfile.mkstemp(dir=directory, prefix=f".{path.name}.", suffix=".tmp")
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as out:
            out.write(text)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temporary, path)
    except BaseException:
        with contextlib.suppress(OSError):
            os.unlink(temporary)
        raise


def _progress_bar(stream):
    """A bar redrawn in place on a terminal; four plain lines (25 % steps) in a log."""
    live = getattr(stream, "isatty", lambda: False)()

    def draw(done: int, total: int) -> None:
        if total < PROGRESS_FROM:
            return
        step = max(total // (50 if live else 4), 1)
        if done % step and done != total:
            return
        filled = 30 * done // total
        bar = f"audit [{'#' * filled}{'.' * (30 - filled)}] {done}/{total} cells"
        stream.write(f"\r{bar}" if live else f"{bar}\n")
        if live and done == total:
            stream.write("\n")
        stream.flush()

    return draw


# -- the subcommand -------------------------------------------------------------------------


def add_parser(subparsers) -> None:
    """Register the ``audit`` subcommand."""
    parser = subparsers.add_parser(
        "audit",
        help="recompute every NW_ cell of a workbook from its saved values and write a report",
        description="Recompute every NW_ cell of an .xlsx/.xlsm workbook (read only, no macros run) and compare "
        "with the saved results. Exit 0: all agree; 1: some differ; 2: the file cannot be read.",
    )
    parser.add_argument("path", help="the workbook to audit (.xlsx or .xlsm)")
    parser.add_argument("--report", help="where to write the HTML report (default: NAME-audit.html here)")
    parser.set_defaults(run=run)


def _one_line(error) -> str:
    return " ".join(str(error).split())


def run(arguments) -> int:
    """Audit the workbook; print the summary and the caution; return the exit status."""
    path = Path(arguments.path)
    report = Path(arguments.report) if arguments.report else Path(f"{path.stem}-audit.html")
    try:
        if report.resolve() == path.resolve():
            raise UnreadableWorkbook("the report would overwrite the workbook; choose another --report path")
        data = read_file_bytes(path)
        audit = audit_bytes(data, str(path), progress=_progress_bar(sys.stderr))
    except UnreadableWorkbook as error:
        print(f"notchwise audit: {path}: {_one_line(error)}", file=sys.stderr)
        return 2
    except Exception as error:  # anything unforeseen in a stranger's file is still one line and exit 2
        print(f"notchwise audit: {path}: cannot read the workbook ({type(error).__name__}: {_one_line(error)})",
              file=sys.stderr)
        return 2
    try:
        write_atomically(report, render_html(audit))
    except OSError as error:
        print(f"notchwise audit: cannot write the report {report}: {error.strerror or error}", file=sys.stderr)
        return 2
    differing = [c for c in audit.cells if c.verdict == "differs"]
    print(f"notchwise audit of {path} (sha256 {audit.sha256})")
    for note in audit.notes:
        print(f"  note: {note}")
    print(
        f"  {len(audit.cells)} cells call NW_ functions: {audit.count('agrees')} agree, {len(differing)} differ, "
        f"{audit.count('not recomputed')} not recomputed (tolerance: {ABS_TOL:g} + {REL_TOL:g} x value)"
    )
    for cell in differing:
        extra = f"; {cell.reason}" if cell.reason else ""
        print(f"  DIFFERS: {cell.sheet}!{cell.address}: saved {_show(cell.saved, 4)}, recomputed {_show(cell.recomputed, 4)}{extra}")
    print(f"  report: {report}")
    print(CAUTION)
    return 1 if differing else 0
