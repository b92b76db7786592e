"""Lay out described sheets as an .xlsx workbook with XlsxWriter, and record every computed cell.

Every result cell is written as a formula together with the value our function gives for the
saved inputs (called by name through :func:`notchwise.addin.cells.call_with_cells`), so the
workbook shows its figures before any recalculation, with or without the add-in.
"""

from __future__ import annotations

import datetime as dt
from pathlib import Path

import xlsxwriter
from xlsxwriter.utility import xl_cell_to_rowcol, xl_range_abs, xl_rowcol_to_cell

from notchwise.addin import CAUTION, SERIES_WARNING, udfs
from notchwise.addin.cells import call_with_cells
from notchwise.workbooks import manifest
from notchwise.workbooks.schema import EACH, Chart, Computed, Input, Link, Literal, Result, Sheet, Sweep

__all__ = ["BUILT", "CALC_ID", "write_workbook"]

#: Fixed document date, so that the same description always gives the same file.
BUILT = dt.datetime(2026, 1, 5, 9, 0, 0)
#: Calculation engine id written in the file. Excel recalculates every formula on opening a file whose
#: id is older than its own (ECMA-376 Part 1, 18.2.2 calcPr); 191029 is that of Excel 2019 and
#: later versions (from memory), so those show the saved figures until the add-in is live.
CALC_ID = 191029

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
    def start_sheet(self, sheets, how_to_go_live):
        ws = self.book.add_worksheet("Start here")
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110)
        ws.write(0, 0, "Notchwise reference workbook: DC motor starters, worked cases", self.fmt["title"])
        ws.write(1, 0, CAUTION, self.fmt["caution"])
        ws.write(2, 0, SERIES_WARNING, self.fmt["caution"])
        row = 4
        ws.write(row, 0, "Making the functions live", self.fmt["band"])
        for line in how_to_go_live:
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
            for c, (_, function, arguments, basis, *pick) in enumerate(sweep.columns):
                formula, value, inputs = self._call(function, arguments, each=(ref, current))
                if pick and isinstance(value, list):  # one cell of a one-row result (schema.Sweep)
                    formula, value = f"=INDEX({formula[1:]},1,{pick[0]})", value[0][pick[0] - 1]
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

    def cautions_sheet(self, cautions):
        ws = self.book.add_worksheet("Cautions")
        ws.fit_to_pages(1, 0)
        ws.set_column(0, 0, 110)
        ws.write(0, 0, "Cautions", self.fmt["title"])
        for r, line in enumerate(cautions, start=2):
            ws.write(r, 0, line, self.fmt["caution"] if r < 5 else None)



def write_workbook(path, sheets, how_to_go_live, cautions) -> list:
    """Write ``sheets`` with a start sheet, the Computed cells and the Cautions; returns the computed cells."""
    writer = _Writer(Path(path))
    writer.start_sheet(sheets, how_to_go_live)
    for sheet in sheets:
        writer.case_sheet(sheet)
    writer.computed_sheet()
    writer.cautions_sheet(cautions)
    writer.manifest_sheet()
    writer.book.close()
    return writer.computed
