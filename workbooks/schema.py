"""The declarative description of a reference workbook: what a sheet holds, not how it is drawn.

A :class:`Sheet` lists named inputs (:class:`Input`, :class:`Table`, :class:`Link`) and
results (:class:`Result`, :class:`Sweep`, each with an optional :class:`Chart`); a
:class:`Part` names some columns of a spilled result for a later result to take. The cases
themselves are in :mod:`notchwise.workbooks.cases`; :mod:`notchwise.workbooks.writer` lays them out.
"""

from __future__ import annotations

from dataclasses import dataclass, field

__all__ = ["EACH", "Input", "Table", "Link", "Part", "Literal", "Result", "Chart", "Sweep", "Sheet", "Computed"]

EACH = object()  # in a sweep's arguments: the input cell of the row


@dataclass(frozen=True)
class Input:
    """A named input cell: defined name, label, value and unit."""

    name: str
    label: str
    value: object
    unit: str


@dataclass(frozen=True)
class Table:
    """A named input table: defined name over its numbers, column labels with units, rows."""

    name: str
    label: str
    columns: tuple
    rows: list


@dataclass(frozen=True)
class Link:
    """An input cell that repeats another sheet's named input (``=name``), so one edit serves both."""

    name: str


@dataclass(frozen=True)
class Part:
    """A defined name over some columns of a spilled table's body (header row left out).

    Later results may take it as an argument, so that one result feeds another
    and both follow edits: the graded sections feed the start in time, whose
    history feeds the protection check.
    """

    name: str
    first_column: int
    last_column: int


@dataclass(frozen=True)
class Literal:
    """A literal argument written into the formula (text, number or TRUE/FALSE)."""

    value: object

    def formula_text(self) -> str:
        if isinstance(self.value, bool):
            return "TRUE" if self.value else "FALSE"
        if isinstance(self.value, str):
            return '"' + self.value.replace('"', '""') + '"'
        return repr(self.value)


@dataclass(frozen=True)
class Result:
    """One call of an ``NW_`` function; ``labels`` head a result that has no header row of its own."""

    title: str
    function: str
    arguments: tuple
    basis: str
    unit: str = ""
    labels: tuple = ()
    chart: Chart | None = None
    parts: tuple = ()


@dataclass(frozen=True)
class Chart:
    """A native scatter chart drawn from cells, so it follows edits.

    Columns count across the block the chart belongs to: for a sweep, 0 is the
    input column and 1, 2, ... its result columns; for a spilled table
    result, 0 is its first column (its header row names the series). A
    starting diagram, for instance, is a chart of a time-history table.
    """

    title: str
    x: int
    y: tuple
    y_label: str = ""
    y2: tuple = ()  # columns drawn against a second value axis on the right
    y2_label: str = ""
    markers: bool = True


@dataclass(frozen=True)
class Sweep:
    """Functions called once per cell of an input column, one result column each."""

    title: str
    input: Table
    columns: tuple  # of (label with unit, function name, arguments with EACH, basis[, k]); with k, the k-th cell
    # (from 1) of the function's one-row result, written =INDEX(NW_...(...),1,k)
    chart: Chart | None = None


@dataclass(frozen=True)
class Sheet:
    """One worked case: its inputs apart on the left, its results on the right."""

    name: str
    title: str
    story: str
    inputs: tuple
    results: tuple = ()
    sweeps: tuple = ()
    notes: tuple = field(default_factory=tuple)


@dataclass(frozen=True)
class Computed:
    """One computed cell (or spilled range) as written, for the Computed cells sheet and the demo."""

    sheet: str
    where: str
    function: str
    formula: str
    inputs: str
    value: object
    basis: str
    title: str
    in_sweep: bool = False
