"""Lay out described sheets as an .xlsx workbook with XlsxWriter, and record every computed cell.

Every result cell is written as a formula together with the value our function gives for the
saved inputs (called by name through :func:`notchwise.addin.cells.call_with_cells`), so the
workbook shows its figures before any recalculation, with or without the add-in.
"""

from __future__ import annotations

import dataclasses
import datetime as dt
import io
import math
import re

import xlsxwriter
from xlsxwriter.utility import xl_cell_to_rowcol, xl_range_abs, xl_rowcol_to_cell

from notchwise.addin import CAUTION, SERIES_WARNING, udfs
from notchwise.addin.cells import call_with_cells
from notchwise.workbooks import manifest
from notchwise.workbooks.palette import GREY, INK, MIST, MIST_EDGE, QUANTITY_COLOURS, RED, SAND, SAND_EDGE
from notchwise.workbooks.schema import EACH, SIGNIFICANT, Chart, Computed, Input, Link, Literal, Result, Sheet, Sweep, decimals

__all__ = ["BUILT", "CALC_ID", "write_workbook", "drawn_charts", "number_format", "DrawnChart"]

#: Fixed document date, so that the same description always gives the same file.
BUILT = dt.datetime(2026, 1, 5, 9, 0, 0)
#: Calculation engine id written in the file. Excel recalculates every formula on opening a file whose
#: id is older than its own (ECMA-376 Part 1, 18.2.2 calcPr); 191029 is that of Excel 2019 and
#: later versions (from memory), so those show the saved figures until the add-in is live.
CALC_ID = 191029

#: Units of counted quantities: a whole number of these is shown without decimals.
COUNTED_UNITS = ("", "-", "1/h", "turns", "notch")


def number_format(value: float, unit: str = "") -> str:
    """The number format for ``value`` in ``unit``: SIGNIFICANT figures with thousands separators.

    26,600 rpm rather than 26600.0000 rpm, 0.1676 ohm, 420.0 A; a whole count
    (notch, starts per hour) without decimals; very small or very large
    magnitudes in scientific notation.
    """
    if float(value).is_integer() and unit in COUNTED_UNITS:
        return "#,##0"
    if not math.isfinite(value):
        return "General"
    places = decimals(value)
    if places is None:
        return "0." + "0" * (SIGNIFICANT - 1) + "E+00"
    return "#,##0" + ("." + "0" * places if places else "")


def _unit_of(label) -> str:
    """The unit in brackets at the end of a column label (``speed [rpm]`` -> ``rpm``), else ''."""
    found = re.search(r"\[([^\]]*)\]\s*$", str(label))
    return found.group(1) if found else ""


@dataclasses.dataclass(frozen=True)
class DrawnChart:
    """A chart of a sheet as written: its description and, per series, the numbers its cells hold."""

    sheet: str
    spec: Chart
    lines: tuple  # of (Series, x values, y values)


class _Writer:
    """Lays out the described sheets with XlsxWriter and records every computed cell."""

    def __init__(self, path, progress=None):
        self.book = xlsxwriter.Workbook(path if hasattr(path, "write") else str(path), {"in_memory": True})
        self.progress = progress or (lambda sheet, title: None)
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
        self.styles = {
            "title": {"bold": True, "font_size": 15, "font_color": INK},
            "story": {"italic": True, "font_color": GREY, "text_wrap": False},
            "band": {"bold": True, "font_color": "#FFFFFF", "bg_color": INK},
            "caution": {"bold": True, "font_color": RED},
            "label": {"font_color": INK},
            "input": {"bg_color": SAND, "border": 1, "border_color": SAND_EDGE},
            "head": {"bold": True, "font_color": INK, "bottom": 1, "bottom_color": MIST_EDGE},
            "result": {"bg_color": MIST, "border": 1, "border_color": MIST_EDGE},
            "plain": {},
            "unit": {"italic": True, "font_color": GREY},
            "name": {"font_color": GREY, "font_size": 9},
        }
        self.fmt = {style: self.book.add_format(props) for style, props in self.styles.items()}
        self._numbers = {}  # (style, number format or "wrapped") -> format
        self.values: dict[str, object] = {}  # defined name -> value as the cells hold it
        self.computed: list[Computed] = []
        self.blocks = {}  # Result/Sweep title or Table name -> (sheet, first body row, first column, body rows)
        self.drawn: list[DrawnChart] = []

    def _number(self, style, value, unit):
        """The format of ``style`` with the number format chosen for ``value`` in ``unit``."""
        key = (style, number_format(value, unit))
        if key not in self._numbers:
            self._numbers[key] = self.book.add_format({**self.styles[style], "num_format": key[1]})
        return self._numbers[key]

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

    def _wrapped(self, style):
        """The format of ``style`` with its text wrapped at the column's width."""
        key = (style, "wrapped")
        if key not in self._numbers:
            self._numbers[key] = self.book.add_format({**self.styles[style], "text_wrap": True, "valign": "top"})
        return self._numbers[key]

    def _cell_format(self, style, value, unit):
        return self.fmt[style] if isinstance(value, str) else self._number(style, value, unit)

    def _write_input(self, ws, row, col, value, style, unit=""):
        """An input cell; a :class:`Link` becomes ``=name`` saved with the linked value. Returns the value."""
        if isinstance(value, Link):
            linked = self.values[value.name]
            ws.write_formula(row, col, f"={value.name}", self._cell_format(style, linked, unit), linked)
            return linked
        self._write_value(ws, row, col, value, style, unit)
        return value

    def _write_value(self, ws, row, col, value, style, unit=""):
        fmt = self._cell_format(style, value, unit)
        if isinstance(value, str):
            if value:
                ws.write_string(row, col, value, fmt)
            else:
                ws.write_blank(row, col, None, fmt)
        else:
            ws.write_number(row, col, value, fmt)

    def _write_result(self, ws, row, col, formula, result, units=("",)):
        """Formula and saved value; a table spills, its other cells hold the saved values.

        ``units`` gives the unit of each column (of the one cell), which with each value's
        magnitude chooses its number format.
        """
        if not isinstance(result, list):
            ws.write_formula(row, col, formula, self._cell_format("result", result, units[0]), result)
            return xl_rowcol_to_cell(row, col)
        last_row, last_col = row + len(result) - 1, col + len(result[0]) - 1
        header = all(isinstance(v, str) for v in result[0])
        units = [_unit_of(v) for v in result[0]] if header else [units[0]] * len(result[0])
        for r, cells in enumerate(result):
            for c, value in enumerate(cells):
                unit = cells[2] if header and result[0][2:3] == ["unit"] and c == 1 else units[c]
                if r or c:
                    self._write_value(ws, row + r, col + c, value, "result", unit)
                else:
                    ws.write_dynamic_array_formula(row, col, last_row, last_col, formula,
                                                   self._cell_format("result", value, unit), value)
        return f"{xl_rowcol_to_cell(row, col)}:{xl_rowcol_to_cell(last_row, last_col)}"

    # -- sheets ----------------------------------------------------------------------------
    def start_sheet(self, sheets, how_to_go_live):
        ws = self.book.add_worksheet("Start here")
        wrapped = self._wrapped
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110, wrapped("plain"))
        ws.write(0, 0, "Notchwise reference workbook: DC motor starters, worked cases", self.fmt["title"])
        ws.write(1, 0, CAUTION, wrapped("caution"))
        ws.write(2, 0, SERIES_WARNING, wrapped("caution"))
        row = 4
        ws.write(row, 0, "Making the functions live", wrapped("band"))
        for line in how_to_go_live:
            row += 1
            ws.write(row, 0, line, wrapped("plain"))
        row += 2
        ws.write(row, 0, "How the sheets read", wrapped("band"))
        ws.write(row + 1, 0, "Input: a named cell you may change (the defined name is shown beside it)",
                 wrapped("input"))
        ws.write(row + 2, 0, "Result: a formula calling an NW_ function; a table spills from its first cell",
                 wrapped("result"))
        ws.write(row + 3, 0, "Units stand beside every value, or in the header row of a table; figures show "
                 f"{SIGNIFICANT} significant figures, the cells keep every digit.", wrapped("unit"))
        row += 5
        ws.write(row, 0, "Sheets", wrapped("band"))
        for sheet in sheets:
            row += 1
            ws.write(row, 0, f"{sheet.name}: {sheet.title}", wrapped("plain"))
        for name, what in (
            ("Computed cells", "the manifest: every computed cell with its function, inputs, result as built and "
             "published basis"),
            ("Cautions", "what these figures are not, and who must check them"),
        ):
            row += 1
            ws.write(row, 0, f"{name}: {what}", wrapped("plain"))
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
        if sheet.points:
            ws.write(row, 5, "Points drawn on the chart below (they link to the cells above: do not type over "
                     "them)", self.fmt["head"])
            row += 1
            for item in sheet.points:
                row = self._input(ws, sheet, item, row, 5, style="result") + 2
        for spec in sheet.charts:
            row = self._sheet_chart(ws, sheet.name, spec, row, 5)

    def _block(self, key, sheet_name, first, col, rows):
        """Record where a block's body lies, for the charts of any sheet."""
        if key in self.blocks:
            raise ValueError(f"two blocks are called {key!r}; a chart could not tell them apart")
        self.blocks[key] = (sheet_name, first, col, rows)

    def _input(self, ws, sheet, item, row, col, style="input"):
        if isinstance(item, Input):
            ws.write(row, col, item.label, self.fmt["label"])
            value = self._write_input(ws, row, col + 1, item.value, style, item.unit)
            ws.write(row, col + 2, item.unit, self.fmt["unit"])
            ws.write(row, col + 3, item.name, self.fmt["name"])
            self.book.define_name(item.name, f"='{sheet.name}'!{xl_rowcol_to_cell(row, col + 1, True, True)}")
            self.values[item.name] = value
            return row
        ws.write(row, col, item.label, self.fmt["label"])
        ws.write(row, col + 3 + max(0, len(item.columns) - 2), item.name, self.fmt["name"])
        ws.write_row(row + 1, col + 1, item.columns, self.fmt["head"])
        first = row + 2
        units = [_unit_of(label) for label in item.columns]
        values = [
            [self._write_input(ws, first + r, col + 1 + c, value, style, cells[2] if item.columns[2:3] == ("unit",)
                               else units[c]) for c, value in enumerate(cells)]
            for r, cells in enumerate(item.rows)
        ]
        last = first + len(item.rows) - 1
        self.book.define_name(item.name, f"='{sheet.name}'!{xl_range_abs(first, col + 1, last, col + len(item.columns))}")
        self.values[item.name] = values
        self._block(item.name, sheet.name, first, col + 1, values)
        return last

    def _result(self, ws, sheet, result: Result, row, col):
        self.progress(sheet.name, result.title)
        ws.write(row, col, result.title, self.fmt["head"])
        row += 1
        if result.labels:
            ws.write_row(row, col, result.labels, self.fmt["unit"])
            row += 1
        formula, value, inputs = self._call(result.function, result.arguments)
        units = [_unit_of(label) for label in result.labels] or [result.unit]
        where = self._write_result(ws, row, col, formula, value, units)
        if result.unit:
            ws.write(row, col + 1, result.unit, self.fmt["unit"])
        if result.name:
            self.book.define_name(result.name, f"='{sheet.name}'!{xl_rowcol_to_cell(row, col, True, True)}")
            self.values[result.name] = value
        header = [str(v) for v in value[0]] if isinstance(value, list) and all(isinstance(v, str) for v in value[0]) else []
        first = row + (1 if header else 0)
        body = value[len(header) > 0:] if isinstance(value, list) else [[value]]
        self._block(result.title, sheet.name, first, col, body)
        for part in result.parts:
            rows = range(len(body))
            if part.row:
                rows = [r for r in rows if body[r][0] == part.row]
                if len(rows) != 1:
                    raise ValueError(f"{result.function} has no single row {part.row!r} for the part {part.name}")
            self.book.define_name(part.name, f"='{sheet.name}'!" + xl_range_abs(
                first + rows[0], col + part.first_column, first + rows[-1], col + part.last_column))
            named = [body[r][part.first_column: part.last_column + 1] for r in rows]
            self.values[part.name] = named[0][0] if part.row and part.first_column == part.last_column else named
        if result.chart and isinstance(value, list):
            names = header or [f"column {k + 1}" for k in range(len(value[0]))]
            self._chart(ws, sheet.name, result.chart, names, first, row + len(value) - 1, col,
                        (row, col + len(value[0]) + 1))
        self.computed.append(Computed(sheet.name, where, result.function, formula, inputs, value, result.basis,
                                      result.title, unit=result.unit, labels=result.labels))
        return row + (len(value) - 1 if isinstance(value, list) else 0)

    def _sweep(self, ws, sheet, sweep: Sweep, row, col):
        self.progress(sheet.name, sweep.title)
        ws.write(row, col, sweep.title, self.fmt["head"])
        row += 1
        ws.write_row(row, col, (sweep.input.columns[0], *(c[0] for c in sweep.columns)), self.fmt["unit"])
        first = row + 1
        body = []
        for r, (current,) in enumerate(sweep.input.rows):
            at = first + r
            self._write_value(ws, at, col, current, "input", _unit_of(sweep.input.columns[0]))
            ref = xl_rowcol_to_cell(at, col)
            cells = [current]
            for c, (label, function, arguments, basis, *pick) in enumerate(sweep.columns):
                formula, value, inputs = self._call(function, arguments, each=(ref, current))
                if pick and isinstance(value, list):  # one cell of a one-row result (schema.Sweep)
                    formula, value = f"=INDEX({formula[1:]},1,{pick[0]})", value[0][pick[0] - 1]
                where = self._write_result(ws, at, col + 1 + c, formula, value, (_unit_of(label),))
                self.computed.append(Computed(sheet.name, where, function, formula, inputs, value, basis,
                                              sweep.title, in_sweep=True))
                cells.append(value)
            body.append(cells)
        last = first + len(sweep.input.rows) - 1
        self.book.define_name(sweep.input.name, f"='{sheet.name}'!{xl_range_abs(first, col, last, col)}")
        self._block(sweep.title, sheet.name, first, col, body)
        if sweep.chart:
            names = [sweep.input.columns[0], *(c[0] for c in sweep.columns)]
            self._chart(ws, sheet.name, sweep.chart, names, first, last, col, (row, col + 2 + len(sweep.columns)))
        return last

    def _chart(self, ws, sheet_name, spec: Chart, names, first, last, col, where):
        """A scatter chart of block columns ``spec.y`` against ``spec.x``, rows ``first`` to ``last``."""
        chart = self.book.add_chart({"type": "scatter", "subtype": "straight_with_markers" if spec.markers else "straight"})
        colours = [QUANTITY_COLOURS[quantity] for quantity in spec.colours] or [INK, RED, MIST_EDGE, SAND_EDGE]
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
        self._dress(chart, spec, names[spec.x], spec.y_label or names[spec.y[0]])
        if spec.y2:
            chart.set_y2_axis({"name": spec.y2_label or names[spec.y2[0]]})
        chart.set_legend({"none": True} if len(spec.y) + len(spec.y2) == 1 else {"position": "bottom"})
        ws.insert_chart(*where, chart, {"x_scale": 1.25, "y_scale": 1.2})

    def _dress(self, chart, spec: Chart, x_label, y_label):
        """Title, axes (logarithmic where asked) and plot area of a chart."""
        grid = {"visible": True, "line": {"color": MIST}}
        chart.set_title({"name": spec.title, "name_font": {"size": 11, "color": INK}})
        axes = []
        for label, extent in ((x_label, spec.x_range), (y_label, spec.y_range)):
            axis = {"name": label, "major_gridlines": grid}
            if spec.log:
                axis.update({"log_base": 10, "minor_gridlines": {"visible": True, "line": {"color": "#F1F4F6"}},
                             "crossing": "min"})
            if extent:
                axis.update({"min": extent[0], "max": extent[1]})
            axes.append(axis)
        chart.set_x_axis(axes[0])
        chart.set_y_axis(axes[1])
        chart.set_plotarea({"fill": {"color": "#FCFCFA"}})

    def _sheet_chart(self, ws, sheet_name, spec: Chart, row, col):
        """A chart of series from any blocks of the workbook, inserted at ``row``; returns the row below it."""
        chart = self.book.add_chart({"type": "scatter", "subtype": "straight"})
        lines = []
        for series in spec.series:
            on, first, left, body = self.blocks[series.block]
            rows = body[series.first_row:]
            colour = QUANTITY_COLOURS[series.colour]
            if series.style == "points":
                line, marker = {"none": True}, {"type": "circle", "size": 8, "fill": {"color": colour},
                                                "border": {"color": colour}}
            else:
                line = {"color": colour, "width": 2.0, **({"dash_type": "dash"} if series.style == "dash" else {})}
                marker = {"type": "none"}
            top, bottom = first + series.first_row, first + len(body) - 1
            chart.add_series({
                "name": series.label,
                "categories": [on, top, left + series.x, bottom, left + series.x],
                "values": [on, top, left + series.y, bottom, left + series.y],
                "line": line,
                "marker": marker,
            })
            numbers = [(r[series.x], r[series.y]) for r in rows
                       if all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in (r[series.x], r[series.y]))]
            lines.append((series, tuple(x for x, _ in numbers), tuple(y for _, y in numbers)))
        self._dress(chart, spec, spec.x_label, spec.y_label)
        chart.set_legend({"position": "right"})
        chart.set_size({"width": 980, "height": 620})
        ws.insert_chart(row, col, chart)
        self.drawn.append(DrawnChart(sheet_name, spec, tuple(lines)))
        return row + 33

    def computed_sheet(self):
        ws = self.book.add_worksheet("Computed cells")
        ws.set_landscape()
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 1, 16)
        ws.set_column(2, 2, 26)
        ws.set_column(3, 4, 60)
        ws.set_column(5, 5, 34)
        ws.set_column(6, 6, 90)
        ws.write(0, 0, "Computed cells: the manifest of this workbook", self.fmt["title"])
        ws.write(1, 0, "This manifest lists every cell Notchwise computed when it built this file: its formula, "
                 "inputs, result as built and published basis. A cell listed here that now holds a typed value "
                 "has been typed over. Recompute them all without a spreadsheet: notchwise audit FILE --report "
                 "report.html. " + CAUTION, self.fmt["caution"])
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
                self._write_value(ws, row, 5, value, "plain")
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
        ws.fit_to_pages(1, 0)
        ws.write_row(0, 0, manifest.HEADER)
        for row, cell in enumerate(self.computed, start=1):
            ws.write_row(row, 0, (cell.sheet, cell.where, cell.function))

    def cautions_sheet(self, cautions):
        ws = self.book.add_worksheet("Cautions")
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110)
        ws.write(0, 0, "Cautions", self.fmt["title"])
        for r, line in enumerate(cautions, start=2):
            ws.write(r, 0, line, self._wrapped("caution" if r < 5 else "plain"))


def _write(path, sheets, how_to_go_live, cautions, progress=None) -> _Writer:
    writer = _Writer(path, progress)
    writer.start_sheet(sheets, how_to_go_live)
    for sheet in sheets:
        writer.case_sheet(sheet)
    writer.computed_sheet()
    writer.cautions_sheet(cautions)
    writer.manifest_sheet()
    writer.book.close()
    return writer


def write_workbook(path, sheets, how_to_go_live, cautions, progress=None) -> list:
    """Write ``sheets`` with a start sheet, the Computed cells and the Cautions; returns the computed cells.

    ``progress(sheet, title)``, if given, is called before each result is computed.
    """
    return _write(path, sheets, how_to_go_live, cautions, progress).computed


def drawn_charts(sheets, how_to_go_live, cautions, progress=None) -> list:
    """The charts of the sheets (:attr:`Sheet.charts`) with the numbers their cells hold, the workbook kept in memory.

    The command line draws its PNGs from these, so a PNG shows what the workbook's chart shows.
    """
    return _write(io.BytesIO(), sheets, how_to_go_live, cautions, progress).drawn
