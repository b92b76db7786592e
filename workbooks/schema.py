"""The declarative description of a reference workbook: what a sheet holds, not how it is drawn.

A :class:`Sheet` lists named inputs (:class:`Input`, :class:`Table`, :class:`Link`) and
results (:class:`Result`, :class:`Sweep`, each with an optional :class:`Chart`); a
:class:`Part` names some columns of a spilled result for a later result to take. The cases
themselves are in :mod:`notchwise.workbooks.cases`; :mod:`notchwise.workbooks.writer` lays them out.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

__all__ = [
    "SIGNIFICANT", "decimals", "EACH", "Input", "Table", "Link", "Part", "Literal", "Result", "Series", "Chart", "Sweep", "Sheet", "Computed",
]

EACH = object()  # in a sweep's arguments: the input cell of the row

#: Significant figures a figure is shown with, in the workbook and on the terminal (cells keep every digit).
SIGNIFICANT = 4


def decimals(value: float) -> int | None:
    """Decimals that show ``value`` to SIGNIFICANT figures; None where scientific notation reads better.

    26600 -> 0 (26,600), 0.1676 -> 4, 420.0 -> 1.
    """
    if value == 0:
        return 0
    magnitude = math.floor(math.log10(abs(value)))
    if magnitude < -3 or magnitude >= 9:
        return None
    return max(0, SIGNIFICANT - 1 - magnitude)


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
    row: str = ""  # a figure's name: only the row whose first cell holds this text (one figure of a table)


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
    name: str = ""  # defined name over a single-cell result, for later cells to take


@dataclass(frozen=True)
class Series:
    """One line of a sheet's chart, drawn from columns of any block of the workbook.

    ``block`` is the title of a :class:`Result` or :class:`Sweep`, or the defined
    name of a :class:`Table`, on any sheet; ``x`` and ``y`` count its columns as
    for :class:`Chart`. ``first_row`` leaves rows of its body out at the top (a
    logarithmic axis cannot show the zero of t = 0). ``colour`` is a quantity of
    :data:`notchwise.workbooks.palette.QUANTITY_COLOURS`; ``style`` is ``line``,
    ``dash`` or ``points``.
    """

    label: str
    block: str
    x: int
    y: int
    colour: str
    style: str = "line"
    first_row: int = 0


@dataclass(frozen=True)
class Chart:
    """A native scatter chart drawn from cells, so it follows edits.

    Columns count across the block the chart belongs to: for a sweep, 0 is the
    input column and 1, 2, ... its result columns; for a spilled table
    result, 0 is its first column (its header row names the series). A
    starting diagram, for instance, is a chart of a time-history table.
    ``colours`` names the quantity of each column of ``y`` then ``y2``
    (:data:`notchwise.workbooks.palette.QUANTITY_COLOURS`).

    A chart of a :class:`Sheet` (its ``charts``) draws ``series`` from any
    blocks instead; ``log`` makes both axes logarithmic (base 10), as on a
    time-current coordination diagram, and ``x_range``/``y_range`` fix their
    extent.
    """

    title: str
    x: int = 0
    y: tuple = ()
    y_label: str = ""
    y2: tuple = ()  # columns drawn against a second value axis on the right
    y2_label: str = ""
    markers: bool = True
    colours: tuple = ()
    series: tuple = ()  # of Series, for a chart of a sheet
    x_label: str = ""
    log: bool = False
    x_range: tuple = ()  # (least, largest) of the horizontal axis
    y_range: tuple = ()
    key: str = ""  # short name for the command line (notchwise diagram --kind KEY)


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
    points: tuple = ()  # Tables of points to draw, written below the results: their cells link to results
    charts: tuple = ()  # Charts of Series from any blocks, below everything else


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
    unit: str = ""  # of a single value
    labels: tuple = ()  # head a table result that has no header row
