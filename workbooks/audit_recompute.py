"""Recomputing NW_ cells: references resolved from the saved cells, whole formulas evaluated by PyPI's ``formulas``.

A formula that calls an NW_ function is evaluated whole, ordinary spreadsheet
functions and arithmetic included (``=ROUND(NW_...(...), 4)``,
``=NW_...(v_supply*1, ...)``), by the spreadsheet-formula library
`formulas <https://pypi.org/project/formulas/>`_ with every NW_ function of
:mod:`notchwise.addin.udfs` plugged in. The audit adds only what the library
does not do: it reads the references (cells, ranges, other sheets, defined
names) from the values saved in the workbook, passes a skipped argument as a
blank (the library would pass 0), and computes each distinct NW_ call once
per audit. Anything it cannot evaluate is reported with its reason, never
passed.
"""

from __future__ import annotations

import contextlib
import contextvars
import dataclasses
import functools
import importlib.util
import inspect
import logging
import re
import sys
from importlib import metadata
from pathlib import Path

from openpyxl.formula import Tokenizer
from openpyxl.formula.tokenizer import TokenizerError
from openpyxl.utils.cell import get_column_letter, range_boundaries

from notchwise.addin import udfs
from notchwise.addin.cells import call_with_cells

from .audit_archive import LIMITS

__all__ = ["NotVerifiable", "spreadsheet_formulas", "calls_nw", "prepare", "Prepared", "Region", "Resolver", "Recomputer",
           "cell_name"]

#: The error values of a spreadsheet cell.
ERRORS = frozenset(("#NULL!", "#DIV/0!", "#VALUE!", "#REF!", "#NAME?", "#NUM!", "#N/A", "#GETTING_DATA"))
#: Prefixes a file puts before the names of functions its program does not know or added late.
PREFIXES = ("_xludf.", "_xll.", "_xlfn.", "_xlws.")
_SKIPPED = "_NW_SKIPPED"  # the library's name for a skipped argument of an NW_ call
_REFERENCE = re.compile(r"_NW_REF_(\d+)")  # the library's name for the k-th reference of a formula


class NotVerifiable(Exception):
    """A formula calls an NW_ function in a way the audit cannot recompute; the message says why."""


def spreadsheet_formulas():
    """PyPI's ``formulas`` package, never the repository's own ``formulas/`` folder.

    Run from the repository's root, ``import formulas`` would find the folder
    of Notchwise's core (installed as ``notchwise.formulas``) first on
    ``sys.path``. The package is therefore loaded from the files of the
    installed distribution named ``formulas`` and registered under its name.
    """
    try:
        init = Path(metadata.distribution("formulas").locate_file("formulas/__init__.py")).resolve()
    except metadata.PackageNotFoundError:
        raise ImportError("the audit needs the package 'formulas' from PyPI (pip install formulas)") from None
    loaded = sys.modules.get("formulas")
    if loaded is not None:
        if Path(getattr(loaded, "__file__", "") or "").resolve() == init:
            return loaded
        raise ImportError(f"another module named formulas is already imported ({loaded.__file__}); "
                          f"the audit needs PyPI's formulas ({init})")
    spec = importlib.util.spec_from_file_location("formulas", init, submodule_search_locations=[str(init.parent)])
    module = importlib.util.module_from_spec(spec)
    sys.modules["formulas"] = module
    try:
        spec.loader.exec_module(module)
    except BaseException:
        del sys.modules["formulas"]
        raise
    return module


@functools.cache
def _library():
    """(the formulas package, its function table with every NW_ function plugged in, its error-value type)."""
    library = spreadsheet_formulas()
    functions = library.get_functions()
    for name in udfs.__all__:
        functions[name] = functools.partial(_plugged, name)
    return library, functions, importlib.import_module(f"{library.__name__}.tokens.operand").XlError


_EVALUATING = contextvars.ContextVar("evaluating")


def _plugged(name, *arguments):
    """An NW_ function as the library calls it: through the audit that is evaluating the formula."""
    return _EVALUATING.get().call(name, arguments)


# -- the formula's text ---------------------------------------------------------------------


@functools.lru_cache(maxsize=4096)
def _tokens(formula: str) -> tuple:
    """The formula's tokens (kept for the texts that recur: defined names, sweep formulas, calls_nw then prepare)."""
    try:
        return tuple(Tokenizer(formula).items)
    except (TokenizerError, IndexError) as error:  # openpyxl's tokenizer pops an empty stack on some damaged formulas
        raise NotVerifiable(f"the formula cannot be parsed ({error})") from None


def _function_name(token_value: str) -> str:
    name = token_value[:-1].rsplit("!", 1)[-1]
    for prefix in PREFIXES:
        if name.lower().startswith(prefix):
            name = name[len(prefix):]
    return name.upper()


def _opens_function(token) -> bool:
    return token.type == "FUNC" and token.subtype == "OPEN"


def calls_nw(formula: str) -> bool:
    """True where the formula text calls a function named NW_..."""
    if "NW_" not in formula.upper():
        return False
    try:
        tokens = _tokens(formula)
    except NotVerifiable:  # unparseable: listed, so that the reason shows in the report
        return re.search(r"NW_\w*\s*\(", formula, re.IGNORECASE) is not None
    return any(_opens_function(t) and _function_name(t.value).startswith("NW_") for t in tokens)


@dataclasses.dataclass
class Prepared:
    """A formula as the library is given it, with what the audit must supply."""

    text: str  # references replaced by _NW_REF_k, skipped NW_ arguments by _NW_SKIPPED
    references: list  # text of reference k
    calls: list  # (NW_ function, [argument texts]) in the order they appear
    functions: set  # every function the formula calls


def prepare(formula: str) -> Prepared:
    """Read the formula once: its references, its NW_ calls and their arguments, the functions it uses."""
    out, references, calls, functions = ["="], [], [], set()
    frames = []  # open brackets: [NW_ call index or None, argument tokens so far]

    def emit(text: str) -> None:
        out.append(text)
        for frame in frames:
            if frame[0] is not None:
                frame[1].append(text)

    def close_argument(frame) -> None:
        index, current = frame[0], frame[1]
        argument = "".join(current).strip()
        if not argument:
            out.append(_SKIPPED)
        calls[index][1].append(argument)
        frame[1] = []

    for token in _tokens(formula):
        if _opens_function(token):
            name = _function_name(token.value)
            functions.add(name)
            emit(name + "(")
            if name.startswith("NW_"):
                calls.append((name, []))
                frames.append([len(calls) - 1, [], False])
            else:
                frames.append([None, [], False])
        elif token.subtype == "OPEN":
            emit(token.value)
            frames.append([None, [], False])
        elif token.subtype == "CLOSE":
            frame = frames.pop() if frames else [None, [], False]
            if frame[0] is not None and (frame[2] or "".join(frame[1]).strip()):
                close_argument(frame)
            emit(token.value)
        elif token.type == "SEP" and token.subtype == "ARG" and frames and frames[-1][0] is not None:
            frame = frames.pop()
            close_argument(frame)
            frame[2] = True  # a separator seen: an empty last argument is a skipped one
            emit(",")  # part of the enclosing calls' arguments, not of this one's
            frames.append(frame)
        elif token.type == "OPERAND" and token.subtype == "RANGE":
            out.append(f"_NW_REF_{len(references)}")
            for frame in frames:
                if frame[0] is not None:
                    frame[1].append(token.value)
            references.append(token.value)
        else:
            emit(token.value)
    return Prepared("".join(out), references, calls, functions)


# -- references -----------------------------------------------------------------------------


@dataclasses.dataclass(frozen=True)
class Region:
    """A block of cells of one sheet, named by the defined name it came through, if any."""

    sheet: str
    min_col: int
    min_row: int
    max_col: int
    max_row: int
    name: str = ""

    def cells(self):
        for r in range(self.min_row, self.max_row + 1):
            for c in range(self.min_col, self.max_col + 1):
                yield r, c


def cell_name(row: int, col: int) -> str:
    return f"{get_column_letter(col)}{row}"


class Resolver:
    """Regions and saved values of references, from the workbook's cells and defined names."""

    def __init__(self, book):
        self.book = book
        self.titles = {title.casefold(): title for title in book.sheets}  # sheet names ignore case

    def resolve(self, text: str, sheet: str, depth: int = 0, name: str = ""):
        """A :class:`Region`, or the constant a defined name stands for."""
        if "!" in text:
            where, ref = text.rsplit("!", 1)
            if where.startswith("'") and where.endswith("'"):
                where = where[1:-1].replace("''", "'")
            if "[" in where:
                raise NotVerifiable(f"{text} refers to another workbook")
            if ":" in where:
                raise NotVerifiable(f"{text} spans several sheets")
            if where.casefold() not in self.titles:
                raise NotVerifiable(f"{text} refers to a sheet this workbook does not have")
            where = self.titles[where.casefold()]
        else:
            where, ref = sheet, text
            names = self.book.names
            defined = names.get(sheet, {}).get(text.lower()) or names[""].get(text.lower())
            if defined is not None:
                return self._name(defined, text, sheet, depth, name or text)
        try:
            min_col, min_row, max_col, max_row = range_boundaries(ref.replace("$", ""))
        except (ValueError, TypeError):
            raise NotVerifiable(f"{text} is neither a cell reference nor a defined name of this workbook") from None
        cells = self.book.sheets[where]
        min_row, max_row = min_row or 1, max_row or max(cells.max_row, 1)  # whole columns and rows end at the data
        min_col, max_col = min_col or 1, max_col or max(cells.max_col, 1)
        if (max_row - min_row + 1) * (max_col - min_col + 1) > LIMITS.range_cells:
            raise NotVerifiable(f"{text} spans more than {LIMITS.range_cells:,} cells")
        return Region(where, min_col, min_row, max_col, max_row, name)

    def values(self, found) -> list:
        """The saved values of a region as a list of rows (a constant as one cell)."""
        if not isinstance(found, Region):
            return [[found]]
        saved = self.book.sheets[found.sheet].values
        return [[saved.get((r, c)) for c in range(found.min_col, found.max_col + 1)]
                for r in range(found.min_row, found.max_row + 1)]

    def _name(self, defined, text, sheet, depth, name):
        target = (defined.value or "").lstrip("=")
        if depth > 3:
            raise NotVerifiable(f"defined name {text} refers to names too deeply")
        try:
            return float(target)
        except ValueError:
            pass
        if target.startswith('"') and target.endswith('"'):
            return target[1:-1].replace('""', '"')
        tokens = [t for t in _tokens("=" + target) if t.type != "WHITE-SPACE"]
        if len(tokens) != 1 or tokens[0].subtype != "RANGE":
            raise NotVerifiable(f"defined name {text} is a formula ({target}), not a range")
        return self.resolve(tokens[0].value, sheet, depth + 1, name)


# -- evaluation -----------------------------------------------------------------------------


def _frozen(value):
    """A hashable key of a cell value or range that keeps types apart (True is not 1.0)."""
    if isinstance(value, list):
        return tuple(_frozen(v) for v in value)
    return type(value).__name__, value


class Recomputer:
    """Evaluates NW_ formulas of one workbook; each distinct NW_ call is computed once."""

    def __init__(self, book):
        self.resolver = Resolver(book)
        self.results: dict = {}  # (function, arguments) -> result
        self.compiled: dict = {}  # prepared text -> the library's compiled formula
        self.calls = 0  # NW_ calls the formulas made
        self._seen: list = []  # (function, arguments) of the formula being evaluated
        self._fault = None

    def check(self, prepared: Prepared) -> None:
        """Refuse, with the reason, a formula that uses a function the audit cannot evaluate."""
        _, functions, _ = _library()
        missing = functions.default_factory()
        for name in sorted(prepared.functions):
            if name.startswith("NW_") and name not in udfs.__all__:
                raise NotVerifiable(f"{name} is not a function of this Notchwise version")
            if functions.get(name, missing) is missing:
                raise NotVerifiable(f"the formula uses {name}, a spreadsheet function the audit cannot evaluate")
        for name, arguments in prepared.calls:
            parameters = inspect.signature(getattr(udfs, name)).parameters
            if len(arguments) > len(parameters):
                raise NotVerifiable(f"{name} takes at most {len(parameters)} arguments; the formula gives {len(arguments)}")

    def evaluate(self, prepared: Prepared, sheet: str):
        """(the formula's result as cells, [(function, arguments)] of its NW_ calls, regions it reads)."""
        library, _, _ = _library()
        regions = [self.resolver.resolve(text, sheet) for text in prepared.references]
        self._seen, self._fault = [], None
        token = _EVALUATING.set(self)
        try:
            with _quiet_library():
                compiled = self.compiled.get(prepared.text)
                if compiled is None:
                    compiled = self._compile(library, prepared.text)
                inputs = [self._input(name, regions) for name in compiled.inputs]
                result = compiled(*inputs)
        except NotVerifiable:
            raise
        except Exception as error:
            if self._fault is not None:
                raise self._fault from None
            raise NotVerifiable(f"the spreadsheet-formula library could not evaluate the formula "
                                f"({type(error).__name__}: {_first_line(error)})") from None
        finally:
            _EVALUATING.reset(token)
        if self._fault is not None:
            raise self._fault
        return _cells(result), self._seen, [r for r in regions if isinstance(r, Region)]

    def _compile(self, library, text: str):
        try:
            compiled = library.Parser().ast(text)[1].compile()
        except Exception as error:
            raise NotVerifiable(f"the spreadsheet-formula library cannot read the formula ({_first_line(error)})") from None
        if compiled.inputs:  # a formula without inputs was computed while compiling: compile it again next time
            self.compiled[text] = compiled
        return compiled

    def _input(self, name: str, regions: list):
        import numpy as np

        if name == _SKIPPED:
            return _SKIP
        match = _REFERENCE.fullmatch(name)
        if match is None:
            raise NotVerifiable(f"the formula refers to {name}, which the audit cannot resolve")
        values = self.resolver.values(regions[int(match.group(1))])
        return np.array([[_to_library(v) for v in row] for row in values], dtype=object)

    def call(self, name: str, arguments):
        """One NW_ call made by the library: arguments back to cells, computed once per distinct arguments."""
        try:
            values = [_from_library(a) for a in arguments]
        except NotVerifiable as why:
            self._fault = why
            raise
        key = name, _frozen(values)
        if key not in self.results:
            self.results[key] = call_with_cells(getattr(udfs, name), values)
        self.calls += 1
        self._seen.append((name, values))
        return _result_to_library(self.results[key])


_SKIP = object()  # a skipped argument, handed to the NW_ function as a blank


def _first_line(error) -> str:
    text = str(error.args[0] if len(error.args) == 1 else error)
    return " ".join(text.split())[:200]


@contextlib.contextmanager
def _quiet_library():
    """The library's scheduler logs every failing node with a traceback; the audit reports the reason itself."""
    loggers = [logging.getLogger(name) for name in ("schedula", "schedula.utils.sol", "formulas")]
    before = [logger.disabled for logger in loggers]
    for logger in loggers:
        logger.disabled = True
    try:
        yield
    finally:
        for logger, disabled in zip(loggers, before):
            logger.disabled = disabled


def _to_library(value):
    """A saved cell value as the library holds it: blanks and error values in its own types."""
    import schedula

    if value is None:
        return schedula.EMPTY
    if isinstance(value, str) and value in ERRORS:
        return _library()[2](value)
    return value


def _from_library(value):
    """A value from the library as xlwings hands it over: a value, or a range as a list of rows."""
    import numpy as np

    import schedula

    if value is _SKIP or value is None or value is schedula.EMPTY:
        return None
    if isinstance(value, np.ndarray):
        if value.ndim == 0:
            return _from_library(value.item())
        if value.ndim != 2:
            raise NotVerifiable("an argument is a range expression the audit cannot resolve")
        return [[_from_library(v) for v in row] for row in value.tolist()]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, float, np.integer, np.floating)):
        return float(value)
    if isinstance(value, str):
        return str(value)
    raise NotVerifiable(f"an argument is {type(value).__name__}, which the audit cannot hand to an NW_ function")


def _result_to_library(result):
    import numpy as np

    if isinstance(result, list):
        return np.array([[_to_library(v) for v in row] for row in result], dtype=object)
    return _to_library(result)


def _cells(result):
    """The formula's result as cells: one value, or a list of rows."""
    value = _from_library(result)
    if isinstance(value, list) and len(value) == 1 and len(value[0]) == 1:
        return value[0][0]
    return value
