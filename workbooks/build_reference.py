"""Build the Notchwise reference workbook from a declarative description of its sheets.

Run ``python -m notchwise.workbooks.build_reference [PATH]`` (or ``notchwise demo``); the
committed ``workbooks/notchwise-reference.xlsx`` is what it writes.

Each sheet is a list of named inputs (a value or a table, with units) and of
results: a call of one ``NW_`` function of :mod:`notchwise.addin.udfs` by name, with its
arguments given as defined names of inputs, literals, or ``None`` for a
skipped optional argument. A sweep calls a function once per cell of an input
column, and may carry a native scatter chart drawn from its cells. Adding a
case means adding entries to ``SHEETS``: no new code.

Every result cell is written as a formula together with the value our
function gives for the saved inputs, so the workbook shows its figures before
any recalculation, with or without the add-in.
"""

from __future__ import annotations

import argparse
import datetime as dt
from dataclasses import dataclass, field
from pathlib import Path

import xlsxwriter
from xlsxwriter.utility import xl_cell_to_rowcol, xl_range_abs, xl_rowcol_to_cell

from notchwise.addin import CAUTION, udfs
from notchwise.addin.cells import call_with_cells
from notchwise.workbooks import manifest
from notchwise.workbooks.demo_cases import CONTRACTOR, CONVEYOR, HOIST, HOIST_PROTECTION, HOIST_START

__all__ = [
    "Input", "Table", "Link", "Literal", "Result", "Part", "Sweep", "Chart", "Sheet", "Computed", "SHEETS", "build",
    "DEFAULT_PATH",
]

DEFAULT_PATH = Path(__file__).with_name("notchwise-reference.xlsx")
SERIES_WARNING = "Series motors must never be run unloaded: with no load they race to destruction."
#: Fixed document date, so that the same description always gives the same file.
BUILT = dt.datetime(2026, 1, 5, 9, 0, 0)
#: Calculation engine id written in the file. Excel recalculates every formula on opening a file whose
#: id is older than its own (ECMA-376 Part 1, 18.2.2 calcPr); 191029 is that of Excel 2019 and
#: Microsoft 365 (from memory), so those show the saved figures until the add-in is live.
CALC_ID = 191029

EACH = object()  # in a sweep's arguments: the input cell of the row

FUNCTION_BASIS = {
    "grading": (
        "Uniform current-limit grading (notchwise.formulas.grading): M. G. Say and E. O. Taylor, Direct Current "
        "Machines, 2nd ed., Pitman, 1986, starting and speed control; A. E. Fitzgerald, C. Kingsley Jr., "
        "S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, sec. 7.6."
    ),
    "start": (
        "Time-domain start L di/dt = V - Vb - R i - kΦ(i) n, J dω/dt = T - T_load (notchwise.formulas.start_sim), closed "
        "form for the shunt motor, Radau otherwise: A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, Electric "
        "Machinery, 6th ed., McGraw-Hill, 2003, sec. 7.9; E. Hairer and G. Wanner, Solving Ordinary "
        "Differential Equations II, 2nd ed., Springer, 1996 (Radau IIA)."
    ),
    "heating": (
        "Section energy, r.m.s. duty, adiabatic rise m·c·ΔT = E and R(θ) = R20(1 + α(θ - 20 °C)) "
        "(notchwise.formulas.resistors); alloy data and the IEEE Std 32 rise limits from memory, see formulas/resistors.py."
    ),
    "relay": (
        "Inverse-time elements t = m(k/(M^α - 1) + c) (notchwise.formulas.relays): IEC 60255-151:2009, Table 1; "
        "IEEE Std C37.112-1996, Table 1; operate progress Σ dt/t(I); thermal element IEC 60255-149."
    ),
    "machine": (
        "DC machine laws E = kΦn, T = (60/2π)kΦI, V = E + IR + Vb (notchwise.formulas.dc_motor): A. E. Fitzgerald, "
        "C. Kingsley Jr., S. D. Umans, Electric Machinery, 6th ed., McGraw-Hill, 2003, ch. 7, Eqs. 7.1-7.8; "
        "curve between points: F. N. Fritsch and R. E. Carlson, SIAM J. Numer. Anal., vol. 17, no. 2, 1980."
    ),
}


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
    columns: tuple  # of (label with unit, function name, arguments with EACH, basis)
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


def _hoist_sheet() -> Sheet:
    h = HOIST.inputs
    motor = ("hoist_v_supply", "hoist_r_motor")
    curve = ("hoist_mag_curve", "hoist_mag_speed")
    return Sheet(
        name="Hoist",
        title=HOIST.title,
        story=HOIST.story,
        inputs=(
            Input("hoist_v_supply", "Supply voltage at the starter", h["v_supply"], "V"),
            Input("hoist_r_motor", "Motor circuit resistance (armature + series field)", h["r_motor"], "ohm"),
            Input("hoist_i_peak", "Peak current on every notch", h["i_peak"], "A"),
            Input("hoist_i_switch", "Least switching current", h["i_switch"], "A"),
            Input("hoist_brush_drop", "Total brush drop", h["brush_drop"], "V"),
            Input("hoist_mag_speed", "Speed at which the curve was measured", h["mag_speed"], "rpm"),
            Input("hoist_n_max", "Highest safe speed of hoist and gearing", h["n_max"], "rpm"),
            Table("hoist_mag_curve", "Magnetization curve at mag_speed", ("current [A]", "EMF [V]"), h["mag_curve"]),
        ),
        results=(
            Result(
                "Graded starter sections (fewest notches that keep the switching current)",
                "NW_GRADE_SERIES",
                (*motor, "hoist_i_peak", "hoist_i_switch", "hoist_mag_curve", None, "hoist_brush_drop"),
                FUNCTION_BASIS["grading"],
                parts=(Part("hoist_sections", 2, 2),),
            ),
            Result(
                "Least load that holds the motor at or below n_max",
                "NW_SERIES_MIN_LOAD",
                (*motor, "hoist_n_max", *curve, "hoist_brush_drop"),
                FUNCTION_BASIS["machine"],
                labels=("least current [A]", "developed torque [N·m]"),
            ),
            Result(
                "Speed unloaded on residual flux alone (runaway warning figure)",
                "NW_SERIES_RESIDUAL_SPEED",
                (*motor, *curve, "hoist_brush_drop"),
                FUNCTION_BASIS["machine"],
                unit="rpm",
            ),
        ),
        sweeps=(
            Sweep(
                "Speed-current characteristic on full voltage",
                Table("hoist_sweep_current", "Armature current", ("current [A]",), [[i] for i in h["sweep_current"]]),
                (
                    ("speed [rpm]", "NW_SERIES_SPEED", (*motor, EACH, *curve, "hoist_brush_drop"),
                     FUNCTION_BASIS["machine"]),
                    ("developed torque [N·m]", "NW_SERIES_TORQUE", (EACH, *curve), FUNCTION_BASIS["machine"]),
                ),
                Chart("Hoist motor: speed against armature current", x=0, y=(1,)),
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _conveyor_sheet() -> Sheet:
    c = CONVEYOR.inputs
    return Sheet(
        name="Conveyor",
        title=CONVEYOR.title,
        story=CONVEYOR.story,
        inputs=(
            Input("conveyor_v_supply", "Supply voltage at the starter", c["v_supply"], "V"),
            Input("conveyor_r_armature", "Armature-circuit resistance", c["r_armature"], "ohm"),
            Input("conveyor_i_peak", "Peak current on every notch", c["i_peak"], "A"),
            Input("conveyor_i_switch", "Least switching current", c["i_switch"], "A"),
            Input("conveyor_notches", "Number of notches", c["notches"], "-"),
            Input("conveyor_brush_drop", "Total brush drop", c["brush_drop"], "V"),
            Input("conveyor_i_rated", "Rated armature current", c["i_rated"], "A"),
            Input("conveyor_n_rated", "Rated speed", c["n_rated"], "rpm"),
        ),
        results=(
            Result(
                "Graded starter sections on the given number of notches",
                "NW_GRADE_SHUNT",
                ("conveyor_v_supply", "conveyor_r_armature", "conveyor_i_peak", "conveyor_i_switch",
                 "conveyor_notches", "conveyor_brush_drop"),
                FUNCTION_BASIS["grading"],
            ),
            Result(
                "Back-EMF constant from the rating plate (rated voltage = supply voltage)",
                "NW_SHUNT_KPHI",
                ("conveyor_v_supply", "conveyor_i_rated", "conveyor_n_rated", "conveyor_r_armature",
                 "conveyor_brush_drop"),
                FUNCTION_BASIS["machine"],
                unit="V/rpm",
            ),
        ),
    )


def _contractor_sheet() -> Sheet:
    p = CONTRACTOR.inputs
    return Sheet(
        name="Contractor check",
        title=CONTRACTOR.title,
        story=CONTRACTOR.story + " Motor data and curve are those of the Hoist sheet.",
        inputs=(
            Table("contractor_sections", "Proposed sections, in the order cut out", ("section [ohm]",),
                  [[r] for r in p["sections"]]),
            Input("contractor_i_switch", "Current at which each notch is cut out", p["i_switch"], "A"),
            Input("contractor_i_limit", "Highest peak current allowed", p["i_limit"], "A"),
            Input("contractor_i_commutation", "Commutation limit of the motor", p["i_commutation"], "A"),
        ),
        results=(
            Result(
                "Peak current per notch and verdict against the limits",
                "NW_CHECK_SECTIONS",
                (Literal("series"), "hoist_v_supply", "hoist_r_motor", "contractor_sections", "contractor_i_switch",
                 "contractor_i_limit", "contractor_i_commutation", "hoist_mag_curve", None, None,
                 "hoist_brush_drop"),
                FUNCTION_BASIS["grading"],
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _hoist_start_sheet() -> Sheet:
    h, d = HOIST.inputs, HOIST_START.inputs
    start = ("hoist_motor", "hoist_sections", "hoist_load_torque", "hoist_i_cut")
    return Sheet(
        name="Hoist start",
        title=HOIST_START.title,
        story=HOIST_START.story + " Motor data link to the Hoist sheet; the sections are its graded ones.",
        inputs=(
            Table("hoist_motor", "Motor for the start in time (name, value)", ("name", "value", "unit"), [
                ["kind", "series", "-"],
                ["v_supply", Link("hoist_v_supply"), "V"],
                ["r_motor", Link("hoist_r_motor"), "ohm"],
                ["l_circuit", h["l_circuit"], "H"],
                ["inertia", h["inertia"], "kg·m²"],
                ["mag_speed", Link("hoist_mag_speed"), "rpm"],
                ["brush_drop", Link("hoist_brush_drop"), "V"],
            ]),
            Input("hoist_load_torque", "Hoisting torque of the rated load on the motor shaft", h["load_torque"], "N·m"),
            Input("hoist_i_cut", "Cut-out current of the accelerating relays", d["i_cut"], "A"),
            Input("hoist_history_points", "Points of the time history", d["history_points"], "-"),
            Input("hoist_alloy", "Grid element alloy", d["alloy"], "-"),
            Input("hoist_grid_mass", "Element mass per section", d["grid_mass"], "kg"),
            Input("hoist_starts_per_hour", "Starts per hour", d["starts_per_hour"], "1/h"),
            Input("hoist_v_low", "Supply band, low side", d["v_low"], "-"),
            Input("hoist_v_high", "Supply band, high side", d["v_high"], "-"),
            Input("hoist_tolerance", "Resistor tolerance", d["tolerance"], "-"),
            Input("hoist_hot", "Hot grid temperature", d["hot"], "°C"),
            Input("hoist_corner_points", "Points per swept quantity", d["corner_points"], "-"),
        ),
        results=(
            Result("Notch by notch: times, peaks, cut-out speeds, energy", "NW_START_SIM",
                   (*start, "hoist_mag_curve"), FUNCTION_BASIS["start"]),
            Result(
                "Starting diagram: the time history", "NW_START_HISTORY",
                (*start, "hoist_history_points", "hoist_mag_curve"), FUNCTION_BASIS["start"],
                chart=Chart("Hoist start: armature current and speed against time", x=0, y=(1,), y2=(2,),
                            markers=False),
                parts=(Part("hoist_start_history", 0, 1),),
            ),
            Result(
                "Grid sections: energy, duty, rise, cold and hot peaks", "NW_SECTION_HEATING",
                (*start, "hoist_alloy", "hoist_grid_mass", "hoist_starts_per_hour", None, None, "hoist_mag_curve"),
                FUNCTION_BASIS["heating"],
            ),
            Result(
                "Worst case over supply band, tolerance and grid temperature", "NW_WORST_CASE",
                (*start, "hoist_v_low", "hoist_v_high", "hoist_tolerance", "hoist_alloy", "hoist_hot",
                 "hoist_corner_points", None, "hoist_mag_curve"),
                FUNCTION_BASIS["start"],
            ),
        ),
        notes=(SERIES_WARNING,),
    )


def _hoist_protection_sheet() -> Sheet:
    p = HOIST_PROTECTION.inputs
    settings = ("hoist_start_history", "hoist_curve", "hoist_pickup", "hoist_multiplier")
    return Sheet(
        name="Hoist protection",
        title=HOIST_PROTECTION.title,
        story=HOIST_PROTECTION.story + " The current history is the one simulated on the Hoist start sheet.",
        inputs=(
            Input("hoist_curve", "Inverse-time curve of the motor relay", p["curve"], "-"),
            Input("hoist_i_full_load", "Full-load current of the motor", p["i_full_load"], "A"),
            Input("hoist_i_stall", "Current of a stall on notch 1 (jammed hook)", p["i_stall"], "A"),
            Input("hoist_t_stall", "Time the motor withstands that current", p["t_stall"], "s"),
            Input("hoist_pickup", "Pickup as set", p["pickup"], "A"),
            Input("hoist_multiplier", "TMS as set", p["multiplier"], "-"),
            Input("hoist_highset", "High-set pickup as set", p["highset"], "A"),
            Input("hoist_highset_delay", "High-set delay as set", p["highset_delay"], "s"),
            Input("hoist_k_factor", "Thermal element k factor", p["k_factor"], "-"),
            Input("hoist_tau", "Thermal time constant of the motor", p["tau"], "s"),
            Input("hoist_curve_up", "Curve of the feeder relay upstream", p["curve_up"], "-"),
            Input("hoist_pickup_up", "Pickup of the feeder relay", p["pickup_up"], "A"),
            Input("hoist_i_max", "Largest fault current at the motor", p["i_max"], "A"),
        ),
        results=(
            Result(
                "Settings proposed from the start, with their reasoning", "NW_PROPOSE_SETTINGS",
                ("hoist_start_history", "hoist_curve", "hoist_i_full_load", "hoist_i_stall", "hoist_t_stall"),
                FUNCTION_BASIS["relay"],
            ),
            Result(
                "Ride-through of the start with the settings as set", "NW_RIDE_THROUGH",
                (*settings, "hoist_highset", "hoist_highset_delay", "hoist_i_full_load", "hoist_k_factor",
                 "hoist_tau"),
                FUNCTION_BASIS["relay"],
            ),
            Result(
                "Coordination with the feeder relay upstream", "NW_COORDINATE",
                ("hoist_curve_up", "hoist_pickup_up", "hoist_curve", "hoist_pickup", "hoist_multiplier",
                 "hoist_i_max", None, "hoist_highset", "hoist_highset_delay"),
                FUNCTION_BASIS["relay"],
            ),
        ),
        sweeps=(
            Sweep(
                "Operating time of the motor relay as set",
                Table("hoist_relay_current", "Current", ("current [A]",), [[i] for i in p["sweep_current"]]),
                (("operating time [s]", "NW_RELAY_TIME", ("hoist_curve", EACH, "hoist_pickup", "hoist_multiplier"),
                  FUNCTION_BASIS["relay"]),),
                Chart("Motor relay: operating time against current", x=0, y=(1,)),
            ),
        ),
    )


#: The workbook's case sheets, in order. Add a case here to add a sheet.
SHEETS = (_hoist_sheet(), _hoist_start_sheet(), _hoist_protection_sheet(), _conveyor_sheet(), _contractor_sheet())

HOW_TO_GO_LIVE = (
    "The figures you see were computed by Notchwise when this file was built and are saved with it, so Excel "
    "shows them without the add-in. LibreOffice recomputes spilled tables on opening (they then read #NAME?); "
    "the Computed cells sheet lists every figure as built. To make the functions live:",
    "1. Install Python with Notchwise (pip install notchwise, or pip install -e . in its source folder) "
    "and the xlwings add-in (xlwings addin install).",
    "2. Save this workbook as an Excel macro-enabled workbook (.xlsm).",
    "3. On the xlwings ribbon tab set Interpreter to that Python, UDF Modules to notchwise.addin.udfs, "
    "then click Import Functions.",
    "4. Press Ctrl+Alt+F9 to recalculate every formula with the live functions.",
    "Without the add-in, editing an input turns the cells that depend on it into #NAME?.",
    "To check a workbook without a spreadsheet program: notchwise audit FILE --report report.html",
)

CAUTIONS = (
    "Results must be checked by a competent person before they are used to build, set or operate equipment.",
    "Local codes, the equipment makers' instructions and licensed engineering practice prevail over these figures.",
    SERIES_WARNING,
    "The models are steady-state: inductance, mechanical transients and heating of the resistors are not in "
    "these figures.",
    "The demo drives (Port of Merrow, Caldbeck Quarry) are invented; their data belong to no real machine.",
)

#: Palette of this workbook: ink blue headings, sand inputs, mist results.
INK, SAND, SAND_EDGE, MIST, MIST_EDGE, GREY = "#1D3B53", "#FBF1D4", "#B8912F", "#E3ECF1", "#5E7F95", "#6B6B6B"


class _Writer:
    """Lays out the described sheets with XlsxWriter and records every computed cell."""

    def __init__(self, path: Path):
        self.book = xlsxwriter.Workbook(str(path))
        self.book.set_properties({
            "title": "Notchwise reference workbook",
            "subject": "DC motor starters: worked demo cases",
            "author": "Notchwise",
            "comments": CAUTION,
            "created": BUILT,
        })
        # Keep the saved figures on opening: no full recalculation on load (ECMA-376 Part 1, 18.2.2).
        self.book.calc_on_load = False
        self.book.calc_id = CALC_ID
        f = self.book.add_format
        self.fmt = {
            "title": f({"bold": True, "font_size": 15, "font_color": INK}),
            "story": f({"italic": True, "font_color": GREY, "text_wrap": False}),
            "band": f({"bold": True, "font_color": "#FFFFFF", "bg_color": INK}),
            "caution": f({"bold": True, "font_color": "#8A2D1E"}),
            "label": f({"font_color": INK}),
            "input": f({"bg_color": SAND, "border": 1, "border_color": SAND_EDGE}),
            "head": f({"bold": True, "font_color": INK, "bottom": 1, "bottom_color": MIST_EDGE}),
            "result": f({"bg_color": MIST, "border": 1, "border_color": MIST_EDGE, "num_format": "0.0000"}),
            "unit": f({"italic": True, "font_color": GREY}),
            "name": f({"font_color": GREY, "font_size": 9}),
            "wrap": f({"text_wrap": True, "valign": "top"}),
        }
        self.values: dict[str, object] = {}  # defined name -> value as the cells hold it
        self.computed: list[Computed] = []

    # -- helpers ---------------------------------------------------------------------------
    def _argument(self, argument, each=None):
        """(formula text, cell value, description) of one argument."""
        if argument is None:
            return "", None, "(skipped: default)"
        if argument is EACH:
            ref, value = each
            return ref, value, f"{ref} = {value:g}"
        if isinstance(argument, Literal):
            return argument.formula_text(), argument.value, argument.formula_text()
        value = self.values[argument]
        shown = f"table of {len(value)} rows" if isinstance(value, list) else (
            f"{value:g}" if isinstance(value, float) else str(value))
        return argument, value, f"{argument} = {shown}"

    def _call(self, function, arguments, each=None):
        parts = [self._argument(a, each) for a in arguments]
        while parts and parts[-1][0] == "":
            parts.pop()
        formula = f"={function}({','.join(p[0] for p in parts)})"
        result = call_with_cells(getattr(udfs, function), [p[1] for p in parts])
        return formula, result, "; ".join(p[2] for p in parts)

    def _write_input(self, ws, row, col, value, fmt):
        """An input cell; a :class:`Link` becomes ``=name`` saved with the linked value. Returns the value."""
        if isinstance(value, Link):
            linked = self.values[value.name]
            ws.write_formula(row, col, f"={value.name}", fmt, linked)
            return linked
        self._write_value(ws, row, col, value, fmt)
        return value

    def _write_value(self, ws, row, col, value, fmt):
        if isinstance(value, str):
            if value:
                ws.write_string(row, col, value, fmt)
            else:
                ws.write_blank(row, col, None, fmt)
        else:
            ws.write_number(row, col, value, fmt)

    def _write_result(self, ws, row, col, formula, result):
        """Formula and saved value; a table spills, its other cells hold the saved values."""
        fmt = self.fmt["result"]
        if not isinstance(result, list):
            ws.write_formula(row, col, formula, fmt, result)
            return xl_rowcol_to_cell(row, col)
        last_row, last_col = row + len(result) - 1, col + len(result[0]) - 1
        ws.write_dynamic_array_formula(row, col, last_row, last_col, formula, fmt, result[0][0])
        for r, cells in enumerate(result):
            for c, value in enumerate(cells):
                if r or c:
                    self._write_value(ws, row + r, col + c, value, fmt)
        return f"{xl_rowcol_to_cell(row, col)}:{xl_rowcol_to_cell(last_row, last_col)}"

    # -- sheets ----------------------------------------------------------------------------
    def start_sheet(self, sheets):
        ws = self.book.add_worksheet("Start here")
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110)
        ws.write(0, 0, "Notchwise reference workbook: DC motor starters, worked cases", self.fmt["title"])
        ws.write(1, 0, CAUTION, self.fmt["caution"])
        ws.write(2, 0, SERIES_WARNING, self.fmt["caution"])
        row = 4
        ws.write(row, 0, "Making the functions live", self.fmt["band"])
        for line in HOW_TO_GO_LIVE:
            row += 1
            ws.write(row, 0, line)
        row += 2
        ws.write(row, 0, "How the sheets read", self.fmt["band"])
        ws.write(row + 1, 0, "Input: a named cell you may change (the defined name is shown beside it)",
                 self.fmt["input"])
        ws.write(row + 2, 0, "Result: a formula calling an NW_ function; a table spills from its first cell",
                 self.fmt["result"])
        ws.write(row + 3, 0, "Units stand beside every value, or in the header row of a table.", self.fmt["unit"])
        row += 5
        ws.write(row, 0, "Sheets", self.fmt["band"])
        for sheet in sheets:
            row += 1
            ws.write(row, 0, f"{sheet.name}: {sheet.title}")
        for name, what in (
            ("Computed cells", "every computed cell with its function, inputs, result and published basis"),
            ("Cautions", "what these figures are not, and who must check them"),
        ):
            row += 1
            ws.write(row, 0, f"{name}: {what}")
        ws.activate()

    def case_sheet(self, sheet: Sheet):
        ws = self.book.add_worksheet(sheet.name)
        ws.set_landscape()
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 46)
        ws.set_column(1, 1, 12)
        ws.set_column(2, 2, 8)
        ws.set_column(3, 3, 22)
        ws.set_column(4, 4, 3)
        ws.set_column(5, 10, 17)
        ws.write(0, 0, sheet.title, self.fmt["title"])
        ws.write(1, 0, sheet.story, self.fmt["story"])
        ws.write(2, 0, CAUTION, self.fmt["caution"])
        for k, note in enumerate(sheet.notes):
            ws.write(3 + k, 0, note, self.fmt["caution"])
        top = 4 + len(sheet.notes) + 1
        ws.write_row(top, 0, ("Inputs", "value", "unit", "defined name"), self.fmt["band"])
        row = top + 1
        for item in sheet.inputs:
            row = self._input(ws, sheet, item, row, 0) + 1
        ws.write_row(top, 5, ("Results", "", "", "", ""), self.fmt["band"])
        row = top + 1
        for result in sheet.results:
            row = self._result(ws, sheet, result, row, 5) + 2
        for sweep in sheet.sweeps:
            row = self._sweep(ws, sheet, sweep, row, 5) + 2

    def _input(self, ws, sheet, item, row, col):
        if isinstance(item, Input):
            ws.write(row, col, item.label, self.fmt["label"])
            value = self._write_input(ws, row, col + 1, item.value, self.fmt["input"])
            ws.write(row, col + 2, item.unit, self.fmt["unit"])
            ws.write(row, col + 3, item.name, self.fmt["name"])
            self.book.define_name(item.name, f"='{sheet.name}'!{xl_rowcol_to_cell(row, col + 1, True, True)}")
            self.values[item.name] = value
            return row
        ws.write(row, col, item.label, self.fmt["label"])
        ws.write(row, col + 3, item.name, self.fmt["name"])
        ws.write_row(row + 1, col + 1, item.columns, self.fmt["head"])
        first = row + 2
        values = [
            [self._write_input(ws, first + r, col + 1 + c, value, self.fmt["input"]) for c, value in enumerate(cells)]
            for r, cells in enumerate(item.rows)
        ]
        last = first + len(item.rows) - 1
        self.book.define_name(item.name, f"='{sheet.name}'!{xl_range_abs(first, col + 1, last, col + len(item.columns))}")
        self.values[item.name] = values
        return last

    def _result(self, ws, sheet, result: Result, row, col):
        ws.write(row, col, result.title, self.fmt["head"])
        row += 1
        if result.labels:
            ws.write_row(row, col, result.labels, self.fmt["unit"])
            row += 1
        formula, value, inputs = self._call(result.function, result.arguments)
        where = self._write_result(ws, row, col, formula, value)
        if result.unit:
            ws.write(row, col + 1, result.unit, self.fmt["unit"])
        header = [str(v) for v in value[0]] if isinstance(value, list) and all(isinstance(v, str) for v in value[0]) else []
        first = row + (1 if header else 0)
        for part in result.parts:
            self.book.define_name(part.name, f"='{sheet.name}'!" + xl_range_abs(
                first, col + part.first_column, row + len(value) - 1, col + part.last_column))
            self.values[part.name] = [cells[part.first_column: part.last_column + 1] for cells in value[len(header) > 0:]]
        if result.chart and isinstance(value, list):
            names = header or [f"column {k + 1}" for k in range(len(value[0]))]
            self._chart(ws, sheet.name, result.chart, names, first, row + len(value) - 1, col,
                        (row, col + len(value[0]) + 1))
        self.computed.append(Computed(sheet.name, where, result.function, formula, inputs, value, result.basis,
                                      result.title))
        return row + (len(value) - 1 if isinstance(value, list) else 0)

    def _sweep(self, ws, sheet, sweep: Sweep, row, col):
        ws.write(row, col, sweep.title, self.fmt["head"])
        row += 1
        ws.write_row(row, col, (sweep.input.columns[0], *(c[0] for c in sweep.columns)), self.fmt["unit"])
        first = row + 1
        for r, (current,) in enumerate(sweep.input.rows):
            at = first + r
            self._write_value(ws, at, col, current, self.fmt["input"])
            ref = xl_rowcol_to_cell(at, col)
            for c, (_, function, arguments, basis) in enumerate(sweep.columns):
                formula, value, inputs = self._call(function, arguments, each=(ref, current))
                where = self._write_result(ws, at, col + 1 + c, formula, value)
                self.computed.append(Computed(sheet.name, where, function, formula, inputs, value, basis,
                                              sweep.title, in_sweep=True))
        last = first + len(sweep.input.rows) - 1
        self.book.define_name(sweep.input.name, f"='{sheet.name}'!{xl_range_abs(first, col, last, col)}")
        if sweep.chart:
            names = [sweep.input.columns[0], *(c[0] for c in sweep.columns)]
            self._chart(ws, sheet.name, sweep.chart, names, first, last, col, (row, col + 2 + len(sweep.columns)))
        return last

    def _chart(self, ws, sheet_name, spec: Chart, names, first, last, col, where):
        """A scatter chart of block columns ``spec.y`` against ``spec.x``, rows ``first`` to ``last``."""
        chart = self.book.add_chart({"type": "scatter", "subtype": "straight_with_markers" if spec.markers else "straight"})
        colours = (INK, "#8A2D1E", MIST_EDGE, SAND_EDGE)
        for k, y in enumerate((*spec.y, *spec.y2)):
            colour = colours[k % len(colours)]
            chart.add_series({
                "name": names[y],
                "categories": [sheet_name, first, col + spec.x, last, col + spec.x],
                "values": [sheet_name, first, col + y, last, col + y],
                "line": {"color": colour, "width": 1.75},
                "marker": {"type": "diamond", "size": 6, "fill": {"color": SAND_EDGE}, "border": {"color": colour}}
                if spec.markers else {"type": "none"},
                "y2_axis": y in spec.y2,
            })
        grid = {"visible": True, "line": {"color": MIST}}
        chart.set_title({"name": spec.title, "name_font": {"size": 11, "color": INK}})
        chart.set_x_axis({"name": names[spec.x], "major_gridlines": grid})
        chart.set_y_axis({"name": spec.y_label or names[spec.y[0]], "major_gridlines": grid})
        if spec.y2:
            chart.set_y2_axis({"name": spec.y2_label or names[spec.y2[0]]})
        chart.set_legend({"none": True} if len(spec.y) + len(spec.y2) == 1 else {"position": "bottom"})
        chart.set_plotarea({"fill": {"color": "#FCFCFA"}})
        ws.insert_chart(*where, chart, {"x_scale": 1.25, "y_scale": 1.2})

    def computed_sheet(self):
        ws = self.book.add_worksheet("Computed cells")
        ws.set_landscape()
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 1, 16)
        ws.set_column(2, 2, 26)
        ws.set_column(3, 4, 60)
        ws.set_column(5, 5, 34)
        ws.set_column(6, 6, 90)
        ws.write(0, 0, "Every computed cell of this workbook, as built", self.fmt["title"])
        ws.write(1, 0, "Recompute them all without a spreadsheet: notchwise audit FILE --report report.html. "
                 + CAUTION, self.fmt["caution"])
        ws.write_row(3, 0, ("sheet", "cell", "function", "formula", "inputs (defined name = value)",
                            "result as built", "published basis"), self.fmt["band"])
        row = 4
        for cell in self.computed:
            for at, value, note in self._cells_of(cell):
                ws.write_string(row, 0, cell.sheet)
                ws.write_string(row, 1, at)
                ws.write_string(row, 2, cell.function)
                ws.write_string(row, 3, cell.formula if not note else f"{note} {cell.formula}")
                ws.write_string(row, 4, cell.inputs if not note else "as the first cell")
                self._write_value(ws, row, 5, value, None)
                ws.write_string(row, 6, cell.basis if not note else "")
                row += 1

    @staticmethod
    def _cells_of(cell: Computed):
        """(address, value, note) of every cell a result fills; a spill lists each of its cells."""
        if not isinstance(cell.value, list):
            return [(cell.where, cell.value, "")]
        first = cell.where.split(":")[0]
        top, left = xl_cell_to_rowcol(first)
        return [
            (xl_rowcol_to_cell(top + r, left + c), value, "" if (r, c) == (0, 0) else f"spilled from {first}:")
            for r, values in enumerate(cell.value)
            for c, value in enumerate(values)
        ]

    def manifest_sheet(self):
        """The hidden, machine-readable list of computed results that ``notchwise audit`` checks."""
        ws = self.book.add_worksheet(manifest.SHEET)
        ws.hide()
        ws.write_row(0, 0, manifest.HEADER)
        for row, cell in enumerate(self.computed, start=1):
            ws.write_row(row, 0, (cell.sheet, cell.where, cell.function))

    def cautions_sheet(self):
        ws = self.book.add_worksheet("Cautions")
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110)
        ws.write(0, 0, "Cautions", self.fmt["title"])
        for r, line in enumerate(CAUTIONS, start=2):
            ws.write(r, 0, line, self.fmt["caution"] if r < 5 else None)


def build(path=DEFAULT_PATH, sheets=SHEETS) -> list:
    """Write the reference workbook to ``path``; returns the computed cells as listed in it."""
    writer = _Writer(Path(path))
    writer.start_sheet(sheets)
    for sheet in sheets:
        writer.case_sheet(sheet)
    writer.computed_sheet()
    writer.cautions_sheet()
    writer.manifest_sheet()
    writer.book.close()
    return writer.computed


def main(argv=None) -> int:
    parser = argparse.ArgumentParser(description="Build the Notchwise reference workbook.")
    parser.add_argument("path", nargs="?", default=str(DEFAULT_PATH))
    build(parser.parse_args(argv).path)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
