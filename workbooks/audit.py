"""``notchwise audit``: recompute every NW_ cell of a workbook from its saved values, and report.

The workbook is input from a stranger: :mod:`.audit_archive` reads and checks
the file and its zip, :mod:`.audit_sheets` parses its sheets through
defusedxml within limits, :mod:`.audit_recompute` evaluates each formula that
calls an NW_ function (whole, through PyPI's ``formulas``) from the saved
values of its references, :mod:`.audit_compare` compares, and
:mod:`.audit_report` writes the report. Macros are never run and the input
file is never written.

Nothing unverified passes: a cell that cannot be recomputed is named with its
reason, a result listed in the workbook's manifest of computed cells that now
holds a typed value is named, and the exit status tells them apart.
"""

from __future__ import annotations

import collections
import dataclasses
import datetime as dt
import hashlib
import inspect
import sys
from importlib import metadata
from pathlib import Path

from notchwise.addin import CAUTION, udfs

from .audit_archive import LIMITS, UnreadableWorkbook, check_archive, read_file_bytes
from .audit_compare import ABS_TOL, REL_TOL, as_block, compare, is_blank, show
from .audit_recompute import NotVerifiable, Recomputer, Region, calls_nw, cell_name, prepare
from .audit_report import render_html, write_atomically
from .audit_sheets import load_book

__all__ = [
    "add_parser",
    "run",
    "audit_bytes",
    "exit_status",
    "Audit",
    "CellAudit",
    "UnreadableWorkbook",
    "LIMITS",
    "EXIT",
]

PROGRESS_FROM = 200  # NW_ cells from which a progress bar is drawn

#: Exit statuses of ``notchwise audit``.
EXIT = {
    0: "every NW_ cell was recomputed and agrees",
    1: "some cells differ from the recomputation, or results were typed over (named on the terminal)",
    2: "the file cannot be read, or is not a workbook",
    3: "nothing differs, but some NW_ cells could not be verified (named, with the reason)",
    4: "the workbook has no NW_ cells: nothing was checked",
}

#: The error value a spreadsheet program saves where it does not know a function.
UNKNOWN_FUNCTION = "#NAME?"


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
    verdict: str = "not verified"  # "agrees", "differs", "typed over", "not verified"
    reason: str = ""
    entries: list = dataclasses.field(default_factory=list)  # (row, col) of differing entries
    details: list = dataclasses.field(default_factory=list)  # the differing entries as text


@dataclasses.dataclass
class Audit:
    """The audit of one workbook."""

    source: str
    sha256: str
    started: str
    version: str
    notes: list
    cells: list
    constants: list = dataclasses.field(default_factory=list)  # (sheet, cell, defined name, value)
    calls: int = 0  # NW_ calls the formulas made
    distinct_calls: int = 0  # of which distinct, each computed once

    def count(self, verdict: str) -> int:
        return sum(c.verdict == verdict for c in self.cells)


def exit_status(audit: Audit) -> int:
    """The exit status (see :data:`EXIT`)."""
    if any(c.verdict in ("differs", "typed over") for c in audit.cells):
        return 1
    if not audit.cells:
        return 4
    return 3 if audit.count("not verified") else 0


def tool_version() -> str:
    try:
        return metadata.version("notchwise")
    except metadata.PackageNotFoundError:
        return "unknown"


# -- one cell -------------------------------------------------------------------------------


def _saved_range(book, sheet: str, row: int, col: int, formula):
    """(address, saved values as a list of rows) of the cell or array range a formula fills."""
    from openpyxl.utils.cell import range_boundaries

    first_col, first_row, last_col, last_row = col, row, col, row
    address = cell_name(row, col)
    if getattr(formula, "ref", None):
        address = formula.ref
        first_col, first_row, last_col, last_row = range_boundaries(formula.ref)
    values = book.sheets[sheet].values
    return address, [[values.get((r, c)) for c in range(first_col, last_col + 1)] for r in range(first_row, last_row + 1)]


def _inputs(prepared, seen) -> list:
    """(parameter, source text, value received) of every argument of every NW_ call in the formula."""
    received = collections.defaultdict(list)
    for name, values in seen:
        received[name].append(values)
    rows = []
    for name, texts in prepared.calls:
        values = received[name].pop(0) if received[name] else None
        parameters = list(inspect.signature(getattr(udfs, name)).parameters)
        for k, text in enumerate(texts):
            parameter = parameters[k] if len(prepared.calls) == 1 else f"{name}: {parameters[k]}"
            value = values[k] if values is not None and k < len(values) else "(not evaluated)"
            rows.append((parameter, text or "(blank: default)", value))
    return rows


def audit_cell(recomputer: Recomputer, book, sheet: str, row: int, col: int, formula):
    """(what the audit found for one NW_ cell, the regions its formula reads)."""
    text = getattr(formula, "text", formula)
    address, saved = _saved_range(book, sheet, row, col, formula)
    found = CellAudit(sheet, address, text, saved=saved if len(saved) > 1 or len(saved[0]) > 1 else saved[0][0])
    try:
        prepared = prepare(text)
        found.function = ", ".join(dict.fromkeys(name for name, _ in prepared.calls))
        recomputer.check(prepared)
        if all(is_blank(v) for r in saved for v in r):
            raise NotVerifiable("the file holds no saved result for this cell")
        if any(v == UNKNOWN_FUNCTION for r in saved for v in r):
            raise NotVerifiable(f"saved as {UNKNOWN_FUNCTION}: the file was last saved by a spreadsheet program "
                                "without the NW_ functions, so it holds no result to check")
        result, seen, regions = recomputer.evaluate(prepared, sheet)
    except NotVerifiable as why:
        found.reason = str(why)
        return found, []
    found.inputs = _inputs(prepared, seen)
    found.recomputed = result
    comparison = compare(saved, as_block(result))
    found.difference, found.reason, found.entries = comparison.largest, comparison.note, comparison.entries
    found.details = comparison.described(saved, as_block(result))
    found.verdict = "agrees" if comparison.agrees else "differs"
    return found, regions


# -- the whole workbook ---------------------------------------------------------------------


def _typed_over(book, listed, audited) -> list:
    """The manifest's computed cells that no longer hold a formula calling their function."""
    found = []
    for sheet, where, function in listed:
        if (sheet, where) in audited:
            continue
        cells = book.sheets.get(sheet)
        anchor = where.split(":")[0]
        try:
            region = Region(sheet, *_boundaries(where))
        except ValueError:
            continue
        formula = cells.formulas.get((region.min_row, region.min_col)) if cells else None
        saved = [[cells.values.get((r, c)) for c in range(region.min_col, region.max_col + 1)]
                 for r in range(region.min_row, region.max_row + 1)] if cells else [[None]]
        if cells is None:
            why = f"the sheet {sheet} is missing"
        elif formula is None:
            why = (f"{anchor} holds the typed value {show(saved[0][0])} where the workbook was built with a "
                   f"formula calling {function}") if not is_blank(saved[0][0]) else f"{anchor} is empty"
        else:
            why = f"{anchor} holds a formula that does not call {function}"
        found.append(CellAudit(sheet, where, str(getattr(formula, "text", formula or "")), function,
                               saved=saved if len(saved) > 1 or len(saved[0]) > 1 else saved[0][0],
                               verdict="typed over", reason=why))
    return found


def _boundaries(where: str):
    from openpyxl.utils.cell import range_boundaries

    bounds = range_boundaries(where.replace("$", ""))
    if None in bounds:
        raise ValueError(where)
    return bounds


def _constants(book, recomputer: Recomputer, regions: list) -> list:
    """Every typed value that NW_ calls read, directly or through other formulas; (sheet, cell, name, value)."""
    spilled = {title: sheet.spilled() for title, sheet in book.sheets.items()}
    order = {title: k for k, title in enumerate(book.sheets)}
    found, seen, todo = {}, set(), list(regions)
    while todo and len(seen) < LIMITS.cells:
        region = todo.pop()
        sheet = book.sheets[region.sheet]
        for r, c in region.cells():
            if (region.sheet, r, c) in seen:
                continue
            seen.add((region.sheet, r, c))
            formula = sheet.formulas.get((r, c))
            if formula is None and (r, c) in spilled[region.sheet]:
                continue  # a cell that a spilled result fills
            if formula is None:
                if not is_blank(sheet.values.get((r, c))):
                    found[order[region.sheet], r, c] = (region.sheet, cell_name(r, c), region.name,
                                                        sheet.values[r, c])
                continue
            text = getattr(formula, "text", formula)
            if not isinstance(text, str) or calls_nw(text):
                continue  # an NW_ cell's own inputs are walked as that cell's
            try:
                references = prepare(text).references
            except NotVerifiable:
                continue
            for reference in references:
                try:
                    target = recomputer.resolver.resolve(reference, region.sheet)
                except NotVerifiable:
                    continue
                if isinstance(target, Region):
                    todo.append(target)
    return [found[k] for k in sorted(found)]


def audit_bytes(data: bytes, source: str = "", progress=None) -> Audit:
    """Audit a workbook given as bytes; raises UnreadableWorkbook where it cannot be read."""
    started = dt.datetime.now(dt.timezone.utc).replace(microsecond=0).isoformat()
    notes = check_archive(data)
    book = load_book(data)
    recomputer = Recomputer(book)
    todo = [
        (title, row, col, formula)
        for title, sheet in book.sheets.items()
        for (row, col), formula in sorted(sheet.formulas.items())
        if isinstance(getattr(formula, "text", formula), str) and calls_nw(getattr(formula, "text", formula))
    ]
    cells, regions = [], []
    for k, (title, row, col, formula) in enumerate(todo):
        try:
            found, read = audit_cell(recomputer, book, title, row, col, formula)
        except Exception as error:  # a fault of ours on an odd formula: listed, never a traceback
            found, read = CellAudit(title, cell_name(row, col), str(getattr(formula, "text", formula))), []
            found.reason = f"the audit could not read this formula ({type(error).__name__}: {error})"
        cells.append(found)
        regions += read
        if progress:
            progress(k + 1, len(todo))
    listed = book.manifest()
    if listed is None:
        notes.append("the workbook carries no manifest of computed cells (it was not built by Notchwise), so a "
                     "result typed over with a number cannot be detected; the report lists every constant that "
                     "feeds an NW_ call")
    else:
        cells += _typed_over(book, listed, {(c.sheet, c.address) for c in cells})
    unsaved = [f"{c.sheet}!{c.address}" for c in cells if c.reason.startswith(f"saved as {UNKNOWN_FUNCTION}")]
    if unsaved:
        notes.append(f"the file was last saved by a spreadsheet program without the NW_ functions: {len(unsaved)} "
                     f"cells hold {UNKNOWN_FUNCTION} instead of their results ({', '.join(unsaved)})")
    return Audit(source, hashlib.sha256(data).hexdigest(), started, tool_version(), notes, cells,
                 _constants(book, recomputer, regions), recomputer.calls, len(recomputer.results))


# -- the subcommand -------------------------------------------------------------------------


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


def add_parser(subparsers) -> None:
    """Register the ``audit`` subcommand."""
    statuses = "; ".join(f"{code}: {meaning}" for code, meaning in EXIT.items())
    parser = subparsers.add_parser(
        "audit",
        help="recompute every NW_ cell of a workbook from its saved values and write a report",
        description="Recompute every NW_ cell of an .xlsx/.xlsm workbook (read only, no macros run) and compare "
        f"with the saved results. Exit status {statuses}.",
    )
    parser.add_argument("path", help="the workbook to audit (.xlsx or .xlsm)")
    parser.add_argument("--report", help="where to write the HTML report (default: NAME-audit.html beside the workbook)")
    parser.set_defaults(run=run)


def _one_line(error) -> str:
    return " ".join(str(error).split())


def run(arguments) -> int:
    """Audit the workbook; print the summary and the caution; return the exit status."""
    path = Path(arguments.path)
    report = Path(arguments.report) if arguments.report else path.with_name(f"{path.stem}-audit.html")
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
    print(f"notchwise audit of {path} (sha256 {audit.sha256})")
    for note in audit.notes:
        print(f"  note: {note}")
    if audit.cells:
        print(
            f"  {len(audit.cells)} cells checked: {audit.count('agrees')} agree, {audit.count('differs')} differ, "
            f"{audit.count('typed over')} typed over, {audit.count('not verified')} not verified "
            f"(tolerance: {ABS_TOL:g} + {REL_TOL:g} x value)"
        )
    else:
        print("  NO NW_ CELLS: the workbook has no cells that call NW_ functions; nothing was checked")
    for cell in audit.cells:
        where = f"{cell.sheet}!{cell.address}"
        if cell.verdict == "differs":
            print(f"  DIFFERS: {where}" + (f": {cell.reason}" if cell.reason else ""))
            for line in cell.details:
                print(f"    {line}")
        elif cell.verdict == "typed over":
            print(f"  TYPED OVER: {where}: {cell.reason}")
        elif cell.verdict == "not verified":
            print(f"  NOT VERIFIED: {where}: {cell.reason}")
    status = exit_status(audit)
    print(f"  exit status {status}: {EXIT[status]}")
    print(f"  report: {report}")
    print(CAUTION)
    return status
