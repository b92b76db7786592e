"""The reference workbook: built as described, its figures saved, and shown as saved by LibreOffice.

The checks of the figures themselves live with the core modules; here the
workbook is checked as a file: that the committed file is what the script
builds (a regression pin, kept in tests/test_regression_pins.py), that every NW_ cell
carries its result, and that a real spreadsheet program (LibreOffice Calc,
headless) shows the saved figures without recalculating.
"""

from __future__ import annotations

import csv
import io
import os
import re
import shutil
import subprocess
import zipfile
from pathlib import Path

import openpyxl
import pytest

from notchwise.addin import CAUTION
from notchwise.workbooks.audit_recompute import calls_nw
from notchwise.workbooks.cli import main
from notchwise.workbooks.build_reference import CALC_ID, SHEETS, build

REFERENCE = Path(__file__).resolve().parents[1] / "workbooks" / "notchwise-reference.xlsx"


def _contents(path) -> dict:
    """Every cell's formula (or value) and saved value, sheet by sheet, and the defined names."""
    formulas = openpyxl.load_workbook(path, data_only=False)
    values = openpyxl.load_workbook(path, data_only=True)
    cells = {}
    for ws in formulas.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                if cell.value is not None:
                    text = getattr(cell.value, "text", cell.value)
                    cells[ws.title, cell.coordinate] = (text, values[ws.title][cell.coordinate].value, cell.data_type)
    names = {name: d.attr_text for name, d in formulas.defined_names.items()}
    return {"cells": cells, "names": names, "sheets": formulas.sheetnames}


def test_every_nw_cell_has_its_result_saved_and_is_listed():
    contents = _contents(REFERENCE)["cells"]
    nw = {(s, c): v for (s, c), v in contents.items() if v[2] == "f" and calls_nw(v[0])}
    assert len(nw) >= 3 + 2 + 1 + 26  # hoist, conveyor, contractor results and the 26 sweep cells
    assert all(saved is not None for _, saved, _ in nw.values())
    listed = {(v[0], contents.get(("Computed cells", f"B{r}"), (None,))[0])
              for (s, c), v in contents.items() if s == "Computed cells" and c.startswith("A")
              for r in [int(c[1:])]}
    for sheet, cell in nw:
        assert (sheet, cell) in listed, f"{sheet}!{cell} is missing from the Computed cells sheet"


def test_inputs_are_named_with_units_beside_them():
    book = openpyxl.load_workbook(REFERENCE)
    for sheet in SHEETS:
        for item in sheet.inputs:
            target = book.defined_names[item.name]
            ((title, ref),) = list(target.destinations)
            assert title == sheet.name
            first = ref.split(":")[0].replace("$", "")
            ws = book[title]
            if hasattr(item, "unit"):
                assert ws[first].value == item.value
                assert ws[first].offset(column=1).value == item.unit
            elif item.columns[-1] == "unit":  # a name/value table: a unit beside every value
                rows = ws[ref.replace("$", "")]
                assert all(row[-1].value for row in rows)
            else:  # a table: units in its header row
                assert all("[" in ws[first].offset(row=-1, column=k).value for k in range(len(item.columns)))


def test_file_keeps_its_saved_figures_on_opening():
    # ECMA-376 Part 1, 18.2.2 (calcPr): no fullCalcOnLoad, and a calcId no older than current Excel's.
    workbook_xml = zipfile.ZipFile(REFERENCE).read("xl/workbook.xml").decode()
    calc = re.search(r"<calcPr[^>]*/>", workbook_xml).group(0)
    assert "fullCalcOnLoad" not in calc and f'calcId="{CALC_ID}"' in calc


def test_chart_is_drawn_from_the_sweep_cells():
    archive = zipfile.ZipFile(REFERENCE)
    chart = archive.read("xl/charts/chart1.xml").decode()
    refs = re.findall(r"<c:f>([^<]+)</c:f>", chart)
    assert len(refs) == 2  # x: the currents, y: the speeds
    contents = _contents(REFERENCE)["cells"]
    x_range, y_range = (ref.split("!")[1].replace("$", "") for ref in refs)
    for cell in openpyxl.load_workbook(REFERENCE)["Hoist"][y_range]:
        assert contents["Hoist", cell[0].coordinate][0].startswith("=NW_SERIES_SPEED(")
    for cell in openpyxl.load_workbook(REFERENCE)["Hoist"][x_range]:
        assert isinstance(contents["Hoist", cell[0].coordinate][0], (int, float))


def test_cautions_are_in_the_workbook():
    text = " ".join(str(v[0]) for (s, _), v in _contents(REFERENCE)["cells"].items() if s in ("Cautions", "Start here"))
    for words in ("competent person", "local codes", "licensed", "must never be run unloaded", "notchwise.addin.udfs",
                  "Import Functions"):
        assert words in text, words


def test_demo_writes_the_workbook_and_prints_the_caution(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    assert (tmp_path / "notchwise-reference.xlsx").is_file()
    assert " ".join(CAUTION.split()) in " ".join(out.split())  # wrapped to the terminal's 100 columns
    assert "NW_GRADE_SERIES" in out and "unloaded" in out
    # demo --out writing the committed workbook: tests/test_regression_pins.py


def test_demo_reports_a_folder_it_cannot_write(tmp_path, capsys):
    assert main(["demo", "--out", str(tmp_path / "no" / "such" / "folder.xlsx")]) == 2


# -- LibreOffice ---------------------------------------------------------------------------


def _soffice():
    found = shutil.which("soffice") or shutil.which("libreoffice")
    if found is None:
        if os.environ.get("CI") == "true":
            pytest.fail("LibreOffice (soffice) must be installed in CI: see .ci/run")
        pytest.skip("LibreOffice is not installed here (it is in CI)")
    return found


@pytest.fixture(scope="module")
def shown_by_libreoffice(tmp_path_factory):
    """Every sheet of the reference workbook as LibreOffice shows it, from its headless CSV export."""
    soffice = _soffice()
    work = tmp_path_factory.mktemp("libreoffice")
    source = work / "reference.xlsx"
    shutil.copyfile(REFERENCE, source)
    # Filter options: comma, double quote, UTF-8, from line 1, ..., raw values not as formatted, all sheets (-1).
    target = "csv:Text - txt - csv (StarCalc):44,34,76,1,,0,false,true,false,false,false,-1"
    subprocess.run(
        [soffice, f"-env:UserInstallation=file://{work}/profile", "--headless", "--norestore",
         "--convert-to", target, "--outdir", str(work / "out"), str(source)],
        check=True, timeout=240, capture_output=True,
    )
    shown = {}
    for sheet in openpyxl.load_workbook(REFERENCE, read_only=True).sheetnames:
        path = work / "out" / f"reference-{sheet}.csv"
        shown[sheet] = list(csv.reader(io.StringIO(path.read_text(encoding="utf-8"))))
    return shown


def _bounds(ref):
    min_col, min_row, max_col, max_row = openpyxl.utils.cell.range_boundaries(ref.replace("$", ""))
    return min_row, max_row, min_col, max_col


def _as_shown(shown, sheet, coordinate):
    row, col = openpyxl.utils.cell.coordinate_to_tuple(coordinate)
    rows = shown[sheet]
    return rows[row - 1][col - 1] if row <= len(rows) and col <= len(rows[row - 1]) else ""


def _agrees(text: str, saved) -> bool:
    if isinstance(saved, (int, float)):
        try:
            return abs(float(text) - saved) <= 1e-12 * max(1.0, abs(saved))  # LibreOffice prints 15 digits
        except ValueError:
            return False
    return text == ("" if saved is None else str(saved))


def test_libreoffice_shows_the_saved_results_of_nw_cells(shown_by_libreoffice):
    # Every NW_ cell that is not a spilled table: those are array formulas, which LibreOffice 7.4
    # recomputes on import (see the next test), and are checked there.
    formulas = openpyxl.load_workbook(REFERENCE)
    values = openpyxl.load_workbook(REFERENCE, data_only=True)
    checked = 0
    for ws in formulas.worksheets:
        for row in ws.iter_rows():
            for cell in row:
                if cell.data_type == "f" and isinstance(cell.value, str) and calls_nw(cell.value):
                    saved = values[ws.title][cell.coordinate].value
                    text = _as_shown(shown_by_libreoffice, ws.title, cell.coordinate)
                    assert text != "#NAME?", f"LibreOffice recalculated {ws.title}!{cell.coordinate}"
                    assert _agrees(text, saved), (ws.title, cell.coordinate, text, saved)
                    checked += 1
    assert checked >= 2 + 26  # residual speed, k_phi and the sweep


def test_libreoffice_shows_every_computed_cell_as_built_on_the_computed_cells_sheet(shown_by_libreoffice):
    # Spilled tables are array formulas, which LibreOffice 7.4 recomputes on import (it keeps no cached
    # matrix results: sc/source/filter/oox/formulabuffer.cxx, applyArrayFormulas), so in place they read
    # #NAME? there; the Computed cells sheet lists every one of their cells with its saved figure.
    values = openpyxl.load_workbook(REFERENCE, data_only=True)
    listing = shown_by_libreoffice["Computed cells"]
    header = listing.index(["sheet", "cell", "function", "formula", "inputs (defined name = value)",
                            "result as built", "published basis"])
    rows = [r for r in listing[header + 1:] if r and r[0]]
    assert len(rows) > 60
    for sheet, cell, _, _, _, shown, _ in rows:
        assert _agrees(shown, values[sheet][cell].value), (sheet, cell, shown)


def test_libreoffice_shows_the_inputs(shown_by_libreoffice):
    # Saved values: an input linked to another sheet's input (=name) is a formula with its value saved.
    book = openpyxl.load_workbook(REFERENCE, data_only=True)
    for sheet in SHEETS:
        for item in sheet.inputs:
            ((title, ref),) = list(book.defined_names[item.name].destinations)
            for row in book[title].iter_rows(*_bounds(ref)):
                for cell in row:
                    assert _agrees(_as_shown(shown_by_libreoffice, title, cell.coordinate), cell.value)


def test_a_chart_of_a_spilled_table_is_drawn_from_its_cells_below_the_header(tmp_path):
    # The mechanism for a starting diagram: a chart of columns of a table result, by declaration only.
    from notchwise.workbooks.build_reference import Chart, Result, Sheet

    hoist = SHEETS[0]
    graded = hoist.results[0]
    charted = Result(graded.title, graded.function, graded.arguments, graded.basis,
                     chart=Chart("Resistance in circuit per notch", x=0, y=(1, 2), y_label="resistance [ohm]"))
    sheet = Sheet("Charted", hoist.title, hoist.story, hoist.inputs, (charted,))
    path = tmp_path / "charted.xlsx"
    cells = build(path, sheets=(sheet,))
    chart = zipfile.ZipFile(path).read("xl/charts/chart1.xml").decode()
    table = next(c for c in cells if c.function == "NW_GRADE_SERIES")
    first, last = table.where.split(":")
    first_row, last_row = int(re.sub(r"\D", "", first)), int(re.sub(r"\D", "", last))
    assert f"Charted!$F${first_row + 1}:$F${last_row}" in chart  # notch numbers, below the header row
    assert f"Charted!$G${first_row + 1}:$G${last_row}" in chart and f"Charted!$H${first_row + 1}:$H${last_row}" in chart
    assert "R in circuit [ohm]" in chart and "resistance [ohm]" in chart


# -- the coordination chart, number formats, texts -------------------------------------------


def test_coordination_chart_has_log_axes_and_series_drawn_from_nw_cells():
    archive = zipfile.ZipFile(REFERENCE)
    charts = [archive.read(n).decode() for n in archive.namelist() if n.startswith("xl/charts/chart")]
    chart = next(c for c in charts if "coordination diagram" in c)
    assert chart.count('<c:logBase val="10"/>') == 2  # both axes logarithmic (ECMA-376 Part 1, 21.2.2.103)
    contents = _contents(REFERENCE)["cells"]
    book = openpyxl.load_workbook(REFERENCE)
    refs = re.findall(r"<c:f>([^<]+)</c:f>", chart)
    assert len(refs) == 18  # x and y of nine series
    fed_by_nw = 0
    for ref in refs:
        sheet, cells = ref.rsplit("!", 1)
        sheet = sheet.strip("'")
        for row in book[sheet][cells.replace("$", "")] if ":" in cells else [[book[sheet][cells.replace("$", "")]]]:
            formula = contents[sheet, row[0].coordinate][0]
            assert isinstance(formula, (int, float)) or str(formula).startswith("="), ref
            fed_by_nw += str(formula).startswith("=NW_") or (
                isinstance(formula, str) and formula.startswith("=hoist_"))  # a link to an NW_ result or an input
    assert fed_by_nw > 0
    for function in ("NW_RELAY_TIME", "NW_THERMAL_TIME"):
        assert any(str(contents["Hoist protection", cell.coordinate][0]).startswith(f"={function}(")
                   for ref in refs if "Hoist protection" in ref and ":" in ref
                   for (cell,) in book["Hoist protection"][ref.rsplit("!", 1)[1].replace("$", "")])
    history = next(ref for ref in refs if "Hoist start" in ref)
    first = book["Hoist start"][history.rsplit("!", 1)[1].replace("$", "").split(":")[0]]
    assert contents["Hoist start", first.coordinate][0] != 0  # t = 0 (log axis) left out


def test_number_formats_follow_unit_and_magnitude():
    from notchwise.workbooks.writer import number_format

    assert number_format(26600.0, "rpm") == "#,##0"  # 26,600 rpm
    assert number_format(0.1676, "ohm") == "#,##0.0000"  # 0.1676 ohm
    assert number_format(420.0, "A") == "#,##0.0"
    assert number_format(3.0, "-") == "#,##0"  # a count
    assert number_format(2.5e-6, "s") == "0.000E+00"
    book = openpyxl.load_workbook(REFERENCE)
    contents = _contents(REFERENCE)["cells"]
    speed = next(key for key, value in contents.items() if str(value[0]).startswith("=NW_SERIES_RESIDUAL_SPEED("))
    assert book[speed[0]][speed[1]].number_format == "#,##0"
    sections = next(key for key, value in contents.items() if str(value[0]).startswith("=NW_GRADE_SERIES("))
    top = book[sections[0]][sections[1]]
    first_section = book[sections[0]].cell(top.row + 1, top.column + 2)  # section cut out [ohm], notch 1
    assert first_section.number_format == "#,##0.0000"


def test_every_sheet_prints_one_page_wide_and_start_here_wraps():
    book = openpyxl.load_workbook(REFERENCE)
    for ws in book.worksheets:
        # fitToWidth left out means 1 (ECMA-376 Part 1, 18.3.1.64 pageSetup: default 1)
        assert ws.page_setup.fitToWidth in (None, 1) and ws.page_setup.fitToHeight == 0, ws.title
        assert ws.sheet_properties.pageSetUpPr.fitToPage, ws.title
    start = book["Start here"]
    assert all(cell.alignment.wrap_text for row in start.iter_rows(min_row=2) for cell in row if cell.value), "wrap"


def test_the_install_line_is_the_readme_s_and_computed_cells_is_a_manifest():
    from notchwise.workbooks.cases import HOW_TO_GO_LIVE, INSTALL_LINE

    readme = (Path(__file__).parents[1] / "README.md").read_text(encoding="utf-8")
    for command in ("python -m pip install .", "xlwings addin install"):
        assert command in INSTALL_LINE and f"`{command}`" in readme
    assert any(INSTALL_LINE in line for line in HOW_TO_GO_LIVE)
    assert any("notchwise freeze" in line for line in HOW_TO_GO_LIVE)
    computed = openpyxl.load_workbook(REFERENCE)["Computed cells"]
    assert "manifest" in computed["A1"].value and "manifest" in computed["A2"].value


def test_hoist_lowering_speeds_rise_with_resistance_and_its_chart_draws_nw_cells():
    # Steady dynamic lowering of a DC motor: T = (60/2π)kΦ(I)I fixes I and kΦ for a torque, and
    # kΦ(I)n = Vb + I(Rm + Rx) (A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, Electric Machinery, 6th ed.,
    # McGraw-Hill, 2003, Eqs. 7.7-7.8), so at one torque the speed rises along a straight line in Rx.
    archive = zipfile.ZipFile(REFERENCE)
    charts = [archive.read(n).decode() for n in archive.namelist() if n.startswith("xl/charts/chart")]
    chart = next(c for c in charts if "one line per lowering point" in c)
    refs = re.findall(r"<c:f>([^<]+)</c:f>", chart)
    assert len(refs) == 8  # x and y of four series, one per lowering point
    contents = _contents(REFERENCE)["cells"]
    book = openpyxl.load_workbook(REFERENCE)
    values = openpyxl.load_workbook(REFERENCE, data_only=True)
    resistance = {name: values[d.attr_text.split("!")[0].strip("='")][d.attr_text.split("!")[1].replace("$", "")].value
                  for name, d in book.defined_names.items() if name.startswith("hoist_lowering_r")}
    columns = []
    for x_ref, y_ref in zip(refs[::2], refs[1::2]):
        sheet, cells = y_ref.rsplit("!", 1)
        assert sheet.strip("'") == "Hoist lowering"
        formulas = [contents["Hoist lowering", cell.coordinate][0] for (cell,) in book["Hoist lowering"][cells.replace("$", "")]]
        assert all(f.startswith("=NW_LOWERING_SPEED(") for f in formulas), y_ref
        (point,) = {re.search(r"hoist_lowering_r\d", f).group(0) for f in formulas}
        saved = [values["Hoist lowering"][cell.coordinate].value for (cell,) in book["Hoist lowering"][cells.replace("$", "")]]
        columns.append((resistance[point], saved))
    columns.sort()
    r = [c[0] for c in columns]
    assert len(set(r)) == 4
    for row in zip(*(c[1] for c in columns)):
        assert all(b > a for a, b in zip(row, row[1:]))  # more resistance, faster descent
        slopes = [(row[k] - row[0]) / (r[k] - r[0]) for k in range(1, 4)]
        assert slopes == pytest.approx([slopes[0]] * 3, rel=1e-6)  # a straight line in Rx
    checks = sorted(  # the checks at light and full load: (resistance, speeds of the body's first two rows)
        (resistance[re.search(r"hoist_lowering_r\d", v[0]).group(0)],
         [values["Hoist lowering"][c].offset(row=k, column=1).value for k in (1, 2)])
        for (s, c), v in contents.items() if s == "Hoist lowering" and str(v[0]).startswith("=NW_LOWERING_CHECK("))
    assert [r for r, _ in checks] == r
    for _, (light, full) in checks:
        assert full > light > 0
    for row in zip(*(speeds for _, speeds in checks)):
        assert all(b > a for a, b in zip(row, row[1:]))
