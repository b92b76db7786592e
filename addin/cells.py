"""The one pattern every spreadsheet function follows.

A spreadsheet function is an xlwings function over one core call, in three
steps: convert and validate the cell values (the converters below), call the
core, shape the result (a scalar, or rows under a header row with units).
:func:`cell_function` registers it with xlwings and gives it the one error
path: whatever goes wrong, the cell shows one line of plain words and the
spreadsheet never sees an exception.

Excel hands a function floats, text, booleans, ``None`` for a blank cell and
tuples of rows for a range; arguments listed in ``tables`` always arrive as a
list of rows (xlwings ``ndim=2``), even from a single cell.
"""

from __future__ import annotations

import functools
import inspect
import itertools
import logging
import math
import operator

import numpy as np
import xlwings as xw

from notchwise.formulas.errors import DesignError, InputError, InputTypeError, as_float, choose, shown

__all__ = [
    "ERROR_PREFIX",
    "CATEGORY",
    "cell_function",
    "guard",
    "each",
    "at_once",
    "number",
    "optional_number",
    "optional_count",
    "flag",
    "option",
    "table",
    "column",
    "number_or_column",
    "number_or_table",
    "name_values",
    "spill",
    "call_with_cells",
]

ERROR_PREFIX = "Error: "
CATEGORY = "Notchwise"
#: Longest message a cell shows [characters]: one line that fits a tooltip (common practice, no source).
MESSAGE_CHARACTERS = 300
_EXPECTED = (InputError, InputTypeError, DesignError)
_log = logging.getLogger(__name__)


def cell_function(tables: tuple = (), **arg_docs: str):
    """Register ``func`` as a spreadsheet function with help text per argument.

    Parameters
    ----------
    tables : tuple of str
        Arguments that take a range; they arrive as a list of rows.
    **arg_docs : str
        Help for each argument, with its unit in brackets, shown by Excel's
        function wizard.
    """

    def register(func):
        signature = inspect.signature(func)

        @functools.wraps(func)
        def guarded(*args, **kwargs):
            try:
                bound = signature.bind(*args, **kwargs)
            except TypeError as error:  # wrong number of arguments from a hand-written call
                return _message(f"{func.__name__}: {error}")
            return guard(func, *bound.args, **bound.kwargs)

        # xlwings reads the signature to write the VBA wrapper: keep the wrapped one.
        guarded.__signature__ = signature
        # Those who call it without Excel (the reference workbook, the audit) shape ranges by this.
        guarded.table_arguments = tuple(tables)
        registered = guarded
        for name, doc in arg_docs.items():
            options = {"ndim": 2} if name in tables else {}
            registered = xw.arg(name, doc=doc, **options)(registered)
        return xw.func(category=CATEGORY)(registered)

    return register


def guard(compute, *args, **kwargs):
    """``compute(*args)``, or the cell's one line of text where it fails.

    Our own errors become their message; any other exception is a fault of
    ours, logged and still shown as text, so a cell never sees a traceback.
    A single figure that is not finite becomes words (Excel has no infinite
    number). Every message is one line of at most ``MESSAGE_CHARACTERS``.
    """
    try:
        result = compute(*args, **kwargs)
    except _EXPECTED as error:
        return _message(str(error))
    except Exception as error:
        _log.exception("%s failed", getattr(compute, "__name__", compute))
        name = getattr(compute, "__name__", "a function")
        return _message(f"internal fault in {name} ({type(error).__name__}: {error}); please report it")
    if isinstance(result, (float, np.floating)) and not math.isfinite(result):
        name = getattr(compute, "__name__", "")
        return _not_finite(result, name if name.isidentifier() else "the result")
    return result


def _no_finite_value(result: float, what: str) -> str:
    """The words for a figure that is not finite (Excel has no infinite number), naming ``what`` it is."""
    return f"{what} has no finite value here (the formula gives {result})"


def _not_finite(result: float, what: str = "the result") -> str:
    return _message(f"{_no_finite_value(result, what)}: check the inputs")


def _message(text: str) -> str:
    """The cell's one line: ``Error: `` and the text, whitespace runs made one space, cut to fit."""
    line = ERROR_PREFIX + " ".join(text.split())
    return line if len(line) <= MESSAGE_CHARACTERS else line[: MESSAGE_CHARACTERS - 1] + "…"


def each(name: str, value, unit: str, compute):
    """Apply ``compute`` to one number, or to every cell of a range.

    A single cell gives a single result; a range gives a column of results
    (one row per cell, read row by row), and a cell that fails shows its own
    message without spoiling the others, so a whole chart curve is one call.
    """
    if not isinstance(value, (list, tuple)):
        return compute(number(name, value, unit))
    cells = _filled_cells(name, value, unit)
    return [[_cell(guard(lambda c=c, k=k: compute(number(f"{name} entry {k + 1}", c, unit))))] for k, c in enumerate(cells)]


def at_once(name: str, value, unit: str, compute, never: str = ""):
    """Apply a vectorised ``compute`` to one number, or to a whole range in one core call.

    ``compute`` takes a 1-D array and returns one result per entry; where a
    result is infinite (the element never operates) the cell shows the words
    ``never``, not a number; any other result that is not finite shows a message. A single cell gives a single result, a range a
    column, as :func:`each` does; a bad entry fails the whole range with its
    own name, and the core is called once however long the range is.
    """
    single = not isinstance(value, (list, tuple))
    values = np.array([number(name, value, unit)]) if single else column(name, value, unit)
    results = np.asarray(compute(values), dtype=float).ravel()
    rows = results.reshape(-1, 1).tolist()
    for k in np.flatnonzero(~np.isfinite(results)).tolist():  # words only where a result is not a number
        r = rows[k][0]
        rows[k][0] = never if (r == math.inf and never) else _not_finite(r, f"the result for {name} entry {k + 1}")
    return rows[0][0] if single else rows


def _is_blank(value) -> bool:
    return value is None or (isinstance(value, str) and not value.strip())


def number(name: str, value, unit: str = "") -> float:
    """A required number; text, blanks and booleans are refused by name."""
    return as_float(name, value, unit)


def optional_number(name: str, value, default, unit: str = ""):
    """A number, or ``default`` where the cell is blank or skipped."""
    return default if _is_blank(value) else as_float(name, value, unit)


def optional_count(name: str, value):
    """A whole number, or None where blank; range checks stay in the core."""
    return None if _is_blank(value) else as_float(name, value)


def flag(name: str, value, default: bool) -> bool:
    """TRUE/FALSE from a cell; blank means ``default``; 1/0 and text TRUE/FALSE are accepted."""
    if _is_blank(value):
        return default
    if isinstance(value, bool):
        return value
    if isinstance(value, (int, float)) and value in (0, 1):
        return bool(value)
    if isinstance(value, str) and value.strip().upper() in ("TRUE", "FALSE"):
        return value.strip().upper() == "TRUE"
    raise InputTypeError(f"{name} ({shown(value)}) must be TRUE or FALSE")


def option(name: str, value, options) -> str:
    """One of ``options``, named case-insensitively; the message lists them all."""
    return choose(name, value, options)


def _row(row):
    """A row of a range as a sequence of cells: a bare value is a row of one."""
    return row if isinstance(row, (list, tuple)) else [row]


def _rows(value) -> list:
    """A range as a list of rows (sequences of cells), not copied cell by cell; a bare value is one row of one."""
    if value is None:
        return []
    if not isinstance(value, (list, tuple)):
        return [[value]]
    return [row if isinstance(row, (list, tuple)) else [row] for row in value]  # _row, inline: one call per range


def width(value) -> int:
    """Number of columns of a range, read off its first row; 0 for a blank one. [-]

    A range is a rectangle, and :func:`table` refuses rows of unequal length
    by name, so no row but the first is looked at.
    """
    rows = _rows(value[:1] if isinstance(value, (list, tuple)) else value)
    return len(rows[0]) if rows else 0


#: Cell types a range of plain numbers holds (a boolean, text or blank cell goes to the cell-by-cell path).
_PLAIN = {float, int}


def _finite_floats(cells: list):
    """A list of cells, all plain finite numbers, as a float array read in one call; else None.

    None sends the caller to its cell-by-cell path, which names the bad cell.
    The type test comes first: numpy alone would read TRUE as 1 and the text
    ``'2'`` as 2.
    """
    if not set(map(type, cells)) <= _PLAIN:
        return None
    try:
        numbers = np.array(cells, dtype=float)
    except OverflowError:  # an int beyond any float
        return None
    return numbers if np.all(np.isfinite(numbers)) else None


def _plain_numbers(rows, count: int):
    """The first ``count`` columns of rows of plain finite numbers, all rows of one length, as an array (rows, count); else None.

    A 10,000-row history is read in four passes in C (lengths, cells, types,
    numbers), with no object made per row.
    """
    try:
        lengths = set(map(len, rows))
    except TypeError:  # a row that is not a row of cells
        return None
    if len(lengths) != 1 or not count:
        return None
    cells_per_row = lengths.pop()
    if cells_per_row < count:
        return None
    numbers = _finite_floats(functools.reduce(operator.iconcat, rows, []))  # in-place extends: twice as fast as chain
    return None if numbers is None else numbers.reshape(len(rows), cells_per_row)[:, :count]


def _data_rows(value):
    """The rows of a range without a leading text header and trailing blank rows, looking only at its ends."""
    rows = _rows(value) if not isinstance(value, (list, tuple)) else value
    if rows and _is_header(_row(rows[0])):
        rows = rows[1:]
    end = len(rows)
    while end and all(map(_is_blank, _row(rows[end - 1]))):
        end -= 1
    return rows[:end]


def _is_header(row) -> bool:
    """A row of labels: every filled cell text, at least one filled."""
    return all(isinstance(c, str) for c in row if not _is_blank(c)) and not all(map(_is_blank, row))


def table(name: str, value, columns: tuple, units: tuple, min_rows: int = 1, optional: bool = False):
    """A numeric table from a range, as an array of shape (rows, len(columns)).

    A leading row of text is a header and is skipped; blank rows at the end
    (a range drawn larger than its data) are dropped. With ``optional`` an
    all-blank range gives None. Plain numbers are read at once; any other
    range goes cell by cell, so that a message names the bad cell.
    """
    rows = _data_rows(value)
    numbers = _plain_numbers(rows, len(columns))
    if numbers is not None and numbers.shape[0] >= min_rows:
        return numbers
    rows = _rows(rows)
    if optional and not rows:
        return None
    if len(rows) < min_rows:
        raise InputError(f"{name} has {len(rows)} rows of numbers; at least {min_rows} are needed")
    if len(rows[0]) < len(columns):
        raise InputError(f"{name} needs {len(columns)} columns ({', '.join(columns)}); it has {len(rows[0])}")
    for r, row in enumerate(rows):
        if len(row) != len(rows[0]):
            raise InputError(f"{name} rows differ in length: row {r + 1} has {len(row)} cells, row 1 has {len(rows[0])}")
    return np.array(
        [
            [as_float(f"{name} row {r + 1} {col}", row[c], unit) for c, (col, unit) in enumerate(zip(columns, units))]
            for r, row in enumerate(rows)
        ]
    )


def _numbers(name: str, cells, unit: str) -> np.ndarray:
    """Cells as a 1-D float array, read at once where all are plain numbers, else cell by cell naming ``name entry k``."""
    numbers = _finite_floats(cells)
    if numbers is not None:
        return numbers
    return np.array([as_float(f"{name} entry {k + 1}", c, unit) for k, c in enumerate(cells)])


def column(name: str, value, unit: str = "") -> np.ndarray:
    """Numbers from a single row or column range (or one cell); trailing blanks dropped."""
    return _numbers(name, _filled_cells(name, value, unit), unit)


def _single_cell(value):
    """The one cell of a one-cell range (or a bare value), else None."""
    rows = _rows(value)
    filled = [c for row in rows for c in row if not _is_blank(c)]
    return filled[0] if len(filled) == 1 and not isinstance(filled[0], str) else None


def number_or_column(name: str, value, unit: str):
    """``(number, None)`` for one numeric cell, or ``(None, numbers)`` for a column.

    A column may start with a text label (``dwell [s]``), which is how a
    one-entry column is told from a single number.
    """
    single = _single_cell(value)
    if single is not None:
        return number(name, single, unit), None
    cells = _filled_cells(name, value, unit)
    if isinstance(cells[0], str):
        cells = cells[1:]
    if not cells:
        raise InputTypeError(f"{name} has a label but no numbers in {unit}")
    return None, _numbers(name, cells, unit)


def number_or_table(name: str, value, columns: tuple, units: tuple):
    """One numeric cell as a float, or a numeric table (see :func:`table`) of at least 2 rows."""
    single = _single_cell(value)
    if single is not None:
        return number(name, single, units[-1])
    return table(name, value, columns, units, min_rows=2)


def name_values(name: str, value, names) -> dict:
    """A two-column range of name/value pairs as a dict, names matched case-insensitively.

    Blank rows are skipped; an unknown or repeated name fails with a message
    listing the valid names.
    """
    pairs = {}
    for r, row in enumerate(_rows(value)):
        if all(map(_is_blank, row)):
            continue
        if len(row) < 2:
            raise InputError(f"{name} needs two columns, name and value; row {r + 1} has one")
        key = choose(f"{name} row {r + 1} name", row[0], names)
        if key in pairs:
            raise InputError(f"{name} names {key} twice (rows with the same name)")
        pairs[key] = row[1]
    if not pairs:
        raise InputTypeError(f"{name} is empty; name/value rows are needed: {', '.join(names)}")
    return pairs


def _filled_cells(name: str, value, unit: str) -> list:
    """The cells of a range row by row, trailing blanks dropped; at least one."""
    cells = list(itertools.chain.from_iterable(_rows(value)))
    while cells and _is_blank(cells[-1]):
        cells.pop()
    if not cells:
        raise InputTypeError(f"{name} is empty; numbers in {unit} are needed" if unit else f"{name} is empty")
    return cells


def _cell(value, label: str = "the result"):
    """A value as a cell holds it: NaN (a filler) blank, an infinity words naming ``label``."""
    if isinstance(value, (float, np.floating)) and not math.isfinite(value):
        if math.isnan(value):
            return ""
        return _no_finite_value(value, label)
    if isinstance(value, np.generic):
        return value.item()
    return value


def spill(header: list, rows, headers: bool = True) -> list:
    """Rows of a result table for a spilled range, with a header row when asked.

    NaN is a filler and becomes a blank cell; an infinity becomes words naming
    its column (Excel has no infinite number).
    """
    labels = [str(h).split(" [")[0] for h in header]
    body = [[_cell(v, labels[c] if c < len(labels) else "the result") for c, v in enumerate(row)] for row in rows]
    return [list(header)] + body if headers else body


def call_with_cells(func, arguments):
    """Call a spreadsheet function with cell values shaped as Excel hands them over through xlwings.

    ``arguments`` holds one entry per argument, in order: a single value, or a
    range as a list of rows; None for a blank or skipped argument. A range
    given to a table argument stays a list of rows (``ndim=2``); given to any
    other argument, a one-cell range becomes its value and a single row or
    column a flat list, as xlwings' default conversion does.
    """
    tables = getattr(func, "table_arguments", ())
    names = list(inspect.signature(func).parameters)
    shaped = []
    for position, value in enumerate(arguments):
        name = names[position] if position < len(names) else ""
        if isinstance(value, list) and name not in tables:
            if len(value) == 1 and len(value[0]) == 1:
                value = value[0][0]
            elif len(value) == 1 or all(len(row) == 1 for row in value):
                value = [cell for row in value for cell in row]
        elif name in tables and value is not None and not isinstance(value, list):
            value = [[value]]
        shaped.append(value)
    return func(*shaped)
