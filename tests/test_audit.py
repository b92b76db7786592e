"""``notchwise audit``: recomputation against closed forms, its verdicts, exit codes, and hostile files.

The recomputed values are checked against the closed forms of the DC machine
laws on a linear magnetization curve (tests/workbook_files.py: A. E.
Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*, 6th ed.,
McGraw-Hill, 2003, ch. 7), never against our own output.
"""

from __future__ import annotations

import hashlib
import io
import os
import re
import stat
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest
import xlsxwriter
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from notchwise.addin import CAUTION
from notchwise.workbooks import audit, audit_compare, audit_recompute
from notchwise.workbooks.cli import main
from tests import workbook_files as wf

SMALL = wf.torque_workbook([50.0, 150.0])
REFERENCE = Path(__file__).resolve().parents[1] / "workbooks" / "notchwise-reference.xlsx"


def run_audit(tmp_path, data: bytes, name="book.xlsx", capsys=None):
    path = tmp_path / name
    path.write_bytes(data)
    report = tmp_path / "report.html"
    status = main(["audit", str(path), "--report", str(report)])
    return status, report


def test_closed_form_results_agree_and_exit_0(tmp_path, capsys):
    status, report = run_audit(tmp_path, wf.torque_workbook([25.0, 150.0, 390.0]))
    out = capsys.readouterr().out
    assert status == 0, out
    assert "3 cells checked: 3 agree, 0 differ" in out
    assert CAUTION in out
    page = report.read_text(encoding="utf-8")
    assert "competent person" in page and "SHA-256" in page and "1e-09" in page


def test_speed_closed_form_through_cross_sheet_references_and_names(tmp_path, capsys):
    # n = (V - IR)/kΦ, kΦ = I/1000 V/rpm: 220 V, 0.1 ohm, 100 A gives 2100 rpm (Fitzgerald et al., ch. 7).
    def speed(book, sheet):
        sheet.write_number("D1", 220.0)
        sheet.write_formula("E1", "=NW_SERIES_SPEED($D$1,0.1,'Torques'!A2,lin_curve,'Curve data'!$D$1,-0)",
                            None, wf.speed_closed_form(220.0, 0.1, 100.0))

    status, _ = run_audit(tmp_path, wf.torque_workbook([50.0, 100.0], extra=speed))
    assert wf.speed_closed_form(220.0, 0.1, 100.0) == pytest.approx(2100.0)
    assert status == 0, capsys.readouterr().out
    found = {c.address: c for c in audit.audit_bytes(wf.torque_workbook([50.0, 100.0], extra=speed)).cells}
    sources = [s for _, s, _ in found["E1"].inputs]
    assert sources == ["$D$1", "0.1", "'Torques'!A2", "lin_curve", "'Curve data'!$D$1", "-0"]
    assert found["E1"].inputs[3][2] == wf.LINEAR_CURVE


def test_a_result_off_by_one_part_in_a_million_differs_and_is_named(tmp_path, capsys):
    def off(i_a):
        return wf.torque_closed_form(i_a) * (1 + 1e-6) if i_a == 150.0 else wf.torque_closed_form(i_a)

    status, report = run_audit(tmp_path, wf.torque_workbook([25.0, 150.0], saved=off))
    out = capsys.readouterr().out
    assert status == 1
    assert "DIFFERS: Torques!B2" in out and "Torques!B1" not in out
    assert "differs" in report.read_text(encoding="utf-8")


def test_within_the_stated_tolerance_agrees(tmp_path, capsys):
    status, _ = run_audit(tmp_path, wf.torque_workbook([150.0], saved=lambda i: wf.torque_closed_form(i) * (1 + 1e-10)))
    assert status == 0, capsys.readouterr().out


@pytest.mark.parametrize(
    "formula, reason",
    [
        ("=NW_NO_SUCH_THING(A1)", "NW_NO_SUCH_THING is not a function of this Notchwise version"),
        ("=IFERRORX(NW_SERIES_TORQUE(A1,lin_curve,lin_speed),0)", "uses IFERRORX, a spreadsheet function the audit cannot evaluate"),
        ("=NW_SERIES_TORQUE(A1,[2]Sheet1!A1:B4,lin_speed)", "another workbook"),
        ("=NW_SERIES_TORQUE(A1,Nowhere!A1:B4,lin_speed)", "does not have"),
        ("=NW_SERIES_TORQUE(A1,lin_curve,lin_speed,1,2)", "at most 3 arguments"),
        ("=NW_SERIES_TORQUE(Torques:Torques!A1,lin_curve,lin_speed)", "several sheets"),
        ("=NW_SERIES_TORQUE(Table1[amps],lin_curve,lin_speed)", "neither a cell reference nor a defined name"),
        ("=NW_SERIES_TORQUE(A1,lin_curve,lin_speed", "cannot"),
    ],
)
def test_what_cannot_be_recomputed_is_named_with_its_reason_and_exits_3(tmp_path, capsys, formula, reason):
    def odd(book, sheet):
        sheet.write_formula("C1", formula, None, 1.0)

    status, report = run_audit(tmp_path, wf.torque_workbook([50.0], extra=odd))
    out = capsys.readouterr().out
    assert status == 3, out
    cell = {c.address: c for c in audit.audit_bytes(wf.torque_workbook([50.0], extra=odd)).cells}["C1"]
    assert cell.verdict == "not verified" and reason in cell.reason, cell.reason
    assert "1 not verified" in out and f"NOT VERIFIED: Torques!C1: {cell.reason}" in out
    assert "exit status 3" in out and "could not be verified" in report.read_text(encoding="utf-8")


def test_a_cell_without_a_saved_result_is_not_compared(tmp_path):
    def blank(book, sheet):
        sheet.write_formula("C1", "=NW_SERIES_TORQUE(A1,lin_curve,lin_speed)", None, "")

    cell = {c.address: c for c in audit.audit_bytes(wf.torque_workbook([50.0], extra=blank)).cells}["C1"]
    assert cell.verdict == "not verified" and "no saved result" in cell.reason


def test_report_escapes_what_the_workbook_says(tmp_path, capsys):
    def hostile(book, sheet):
        sheet.write_formula("C1", '=NW_CHECK_SECTIONS("<script>alert(1)</script>",1,1,A1,1,1,1)', None, "x")

    _, report = run_audit(tmp_path, wf.torque_workbook([50.0], extra=hostile))
    page = report.read_text(encoding="utf-8")
    assert "<script>alert" not in page and "&lt;script&gt;alert(1)&lt;/script&gt;" in page


def test_the_input_is_never_changed_and_the_report_is_written_atomically(tmp_path, capsys):
    data = wf.torque_workbook([50.0])
    status, report = run_audit(tmp_path, data)
    assert status == 0
    assert hashlib.sha256((tmp_path / "book.xlsx").read_bytes()).hexdigest() == hashlib.sha256(data).hexdigest()
    assert hashlib.sha256(data).hexdigest() in report.read_text(encoding="utf-8")
    assert sorted(p.name for p in tmp_path.iterdir()) == ["book.xlsx", "report.html"]  # no temporary left


def test_a_report_that_would_overwrite_the_workbook_is_refused(tmp_path, capsys):
    path = tmp_path / "book.xlsx"
    path.write_bytes(wf.torque_workbook([50.0]))
    assert main(["audit", str(path), "--report", str(path)]) == 2
    assert path.read_bytes() == wf.torque_workbook([50.0])


def test_the_reference_workbook_agrees_everywhere(tmp_path, capsys):
    status, _ = run_audit(tmp_path, REFERENCE.read_bytes())
    out = capsys.readouterr().out
    assert status == 0, out
    found = audit.audit_bytes(REFERENCE.read_bytes())
    assert found.cells and all(c.verdict == "agrees" for c in found.cells)


def _tamper(data: bytes, sheet_xml: str, cell: str) -> bytes:
    """The workbook with the saved value of ``cell`` in ``sheet_xml`` changed, the rest byte for byte."""
    import re

    def change(body: bytes) -> bytes:
        pattern = re.compile(rb'(<c r="' + cell.encode() + rb'"[^>]*>(?:<f[^<]*</f>)?<v>)([^<]*)(</v>)')
        match = pattern.search(body)
        assert match, cell
        new = str(float(match.group(2)) * 1.01).encode()
        return body[: match.start(2)] + new + body[match.end(2):]

    return wf.replace_member(data, sheet_xml, change)


@pytest.mark.parametrize(
    "cell, named",
    [("F20", "Hoist!F20"), ("G10", "Hoist!F9:J13"), ("G30", "Hoist!G30")],
)
def test_a_tampered_saved_result_exits_1_naming_the_cell(tmp_path, capsys, cell, named):
    # sheet2.xml is the Hoist sheet: F20 a scalar result, G10 inside a spilled table, G30 a sweep cell.
    status, _ = run_audit(tmp_path, _tamper(REFERENCE.read_bytes(), "xl/worksheets/sheet2.xml", cell))
    out = capsys.readouterr().out
    assert status == 1
    assert f"DIFFERS: {named}" in out
    assert out.count("DIFFERS") == 1


# -- files that cannot be read: exit 2, one line, no traceback ------------------------------


def _exit_2(tmp_path, capsys, data: bytes, words: str, name="book.xlsx"):
    status, report = run_audit(tmp_path, data, name)
    captured = capsys.readouterr()
    assert status == 2
    assert words in captured.err, captured.err
    assert len(captured.err.strip().splitlines()) == 1 and "Traceback" not in captured.err
    assert not report.exists()


def test_not_a_zip(tmp_path, capsys):
    _exit_2(tmp_path, capsys, b"current,speed\n100,900\n", "not a zip archive")


def test_truncated_zip(tmp_path, capsys):
    data = wf.torque_workbook([50.0])
    _exit_2(tmp_path, capsys, data[: len(data) // 2], "not a zip archive (or it is truncated)")


def test_zip_without_a_workbook(tmp_path, capsys):
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w") as z:
        z.writestr("notes.txt", "hello")
    _exit_2(tmp_path, capsys, out.getvalue(), "holds no spreadsheet")


def test_entity_expansion_bomb(tmp_path, capsys):
    _exit_2(tmp_path, capsys, wf.entity_bomb(), "entity-expansion")


def test_entity_declaration_in_a_sheet(tmp_path, capsys):
    def sheet_bomb(body: bytes) -> bytes:
        return wf.ENTITY_BOMB.split(b"<sst")[0] + body.split(b"?>", 1)[1]

    data = wf.replace_member(wf.torque_workbook([50.0]), "xl/worksheets/sheet1.xml", sheet_bomb)
    _exit_2(tmp_path, capsys, data, "entity-expansion")


def test_zip_that_expands_a_thousandfold(tmp_path, capsys):
    _exit_2(tmp_path, capsys, wf.ratio_bomb(), "zip bomb")


def test_zip_member_larger_than_it_declares(tmp_path, capsys):
    padded = wf.replace_member(wf.torque_workbook([50.0]), "xl/worksheets/sheet1.xml", lambda b: b + b" " * 3_000_000)
    _exit_2(tmp_path, capsys, wf.lying_sizes(padded, "xl/worksheets/sheet1.xml"), "damaged")


def test_zip_expanding_beyond_the_total_limit(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(audit.LIMITS, "expanded_bytes", 10_000)
    _exit_2(tmp_path, capsys, wf.torque_workbook([50.0]), "the limit is")


def test_too_many_cells(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(audit.LIMITS, "cells", 50)
    _exit_2(tmp_path, capsys, wf.torque_workbook([float(i) for i in range(1, 60)]), "more than 50 cells")


def test_missing_file_and_a_folder(tmp_path, capsys):
    assert main(["audit", str(tmp_path / "absent.xlsx")]) == 2
    assert main(["audit", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "absent.xlsx not found" in err and err.count("is not a file") == 1 and "Traceback" not in err


def test_macro_part_is_reported_never_run(tmp_path, capsys):
    data = wf.torque_workbook([50.0], vba=b"\xd0\xcf\x11\xe0 not a real VBA project")
    status, report = run_audit(tmp_path, data, "book.xlsm")
    out = capsys.readouterr().out
    assert status == 0
    assert "macro part (xl/vbaProject.bin)" in out and "not run" in out
    assert "vbaProject.bin" in report.read_text(encoding="utf-8")


def test_huge_sparse_sheet_is_read_by_its_cells_not_its_dimension(tmp_path, capsys):
    data = wf.sparse_far_cell()
    sheet = zipfile.ZipFile(io.BytesIO(data)).read("xl/worksheets/sheet1.xml")
    assert b'<dimension ref="A1:XFD1048576"/>' in sheet
    status, _ = run_audit(tmp_path, data)
    assert status == 0, capsys.readouterr().out


def test_progress_bar_on_large_workbooks(tmp_path, capsys, monkeypatch):
    monkeypatch.setattr(audit, "PROGRESS_FROM", 3)
    status, _ = run_audit(tmp_path, wf.torque_workbook([10.0, 20.0, 30.0, 40.0]))
    err = capsys.readouterr().err
    assert status == 0 and "4/4 cells" in err


def test_legacy_array_padding_and_scalar_fill_are_understood():
    assert audit_compare.compare([[1.0, 2.0], [3.0, 4.0], ["#N/A", "#N/A"]], [[1.0, 2.0], [3.0, 4.0]]).agrees
    assert not audit_compare.compare([[1.0, 2.0], [3.0, 4.0], [5.0, "#N/A"]], [[1.0, 2.0], [3.0, 4.0]]).agrees
    assert audit_compare.compare([["x", "x"]], [["x"]]).agrees
    assert not audit_compare.compare([[1.0]], [[1.0], [2.0]]).agrees
    assert audit_compare.compare([[None]], [[""]]).agrees
    assert not audit_compare.compare([[True]], [[1.0]]).agrees


def test_excel_prefixes_of_unknown_functions_are_read():
    assert audit_recompute.calls_nw("=_xludf.NW_SERIES_TORQUE(A1,B1:C4,D1)")
    assert audit_recompute.prepare("=_xludf.nw_series_torque(A1, B1:C4 ,D1)").calls == [
        ("NW_SERIES_TORQUE", ["A1", "B1:C4", "D1"])]
    assert not audit_recompute.calls_nw('="NW_SERIES_TORQUE(1)"')


def test_an_xlsxwriter_array_formula_over_a_larger_range(tmp_path):
    out = io.BytesIO()
    book = xlsxwriter.Workbook(out, {"in_memory": True})
    sheet = book.add_worksheet("S")
    sheet.write_array_formula("A1:A3", "{=NW_SERIES_TORQUE(B1:B2,C1:D4,E1)}", None, wf.torque_closed_form(50.0))
    sheet.write_number("A2", wf.torque_closed_form(150.0))
    sheet.write_string("A3", "#N/A")
    sheet.write_column("B1", [50.0, 150.0])
    for r, row in enumerate(wf.LINEAR_CURVE):
        sheet.write_row(r, 2, row)
    sheet.write_number("E1", wf.CURVE_SPEED)
    book.close()
    cell = audit.audit_bytes(out.getvalue()).cells[0]
    assert cell.address == "A1:A3" and cell.verdict == "agrees", cell


@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_any_damaged_copy_of_a_workbook_is_read_or_refused_never_a_crash(data):
    original = bytearray(SMALL)
    for _ in range(data.draw(st.integers(1, 8))):
        at = data.draw(st.integers(0, len(original) - 1))
        original[at] = data.draw(st.integers(0, 255))
    cut = data.draw(st.integers(len(original) // 2, len(original)))
    try:
        found = audit.audit_bytes(bytes(original[:cut]))
    except audit.UnreadableWorkbook as error:
        assert str(error) and "\n" not in str(error)
    else:
        assert all(c.verdict in ("agrees", "differs", "not verified") for c in found.cells)


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(data=st.data())
def test_any_damaged_sheet_inside_a_sound_zip_is_read_or_refused_never_a_crash(data):
    member = data.draw(st.sampled_from(["xl/worksheets/sheet1.xml", "xl/sharedStrings.xml", "xl/workbook.xml"]))

    def damage(body: bytes) -> bytes:
        body = bytearray(body)
        for _ in range(data.draw(st.integers(1, 4))):
            body[data.draw(st.integers(0, len(body) - 1))] = data.draw(st.sampled_from(list(b'<>"=/ 09aZ&;(),:!$')))
        return bytes(body)

    try:
        found = audit.audit_bytes(wf.replace_member(SMALL, member, damage))
    except audit.UnreadableWorkbook as error:
        assert str(error)
    else:
        assert all(c.verdict in ("agrees", "differs", "not verified") for c in found.cells)


# -- nothing unverified passes (whole formulas, typed-over results, no NW_ cells, foreign saves) ----


def _formula_cell(formula: str, saved):
    def add(book, sheet):
        sheet.write_formula("C1", formula, None, saved)

    return add


@pytest.mark.parametrize(
    "formula, closed_form",
    [
        # ROUND to 4 decimals: ISO/IEC 26300-2 (OpenFormula), 6.17.51 ROUND; Python's round agrees away from ties.
        ("=ROUND(NW_SERIES_TORQUE(A1,lin_curve,lin_speed),4)", round(wf.torque_closed_form(50.0), 4)),
        ("=NW_SERIES_TORQUE(A1*1,lin_curve,lin_speed)", wf.torque_closed_form(50.0)),
        ("=2*NW_SERIES_TORQUE((A1+0),lin_curve,lin_speed)", 2 * wf.torque_closed_form(50.0)),
        ("=_xlfn.IFERROR(NW_SERIES_TORQUE(SUM(A1),lin_curve,lin_speed),0)", wf.torque_closed_form(50.0)),
        ("=NW_SERIES_TORQUE(A1,lin_curve,lin_speed)+NW_SERIES_TORQUE(A1,lin_curve,lin_speed)",
         2 * wf.torque_closed_form(50.0)),
    ],
)
def test_whole_formulas_are_recomputed_and_a_wrong_saved_value_differs_and_is_named(tmp_path, capsys, formula,
                                                                                       closed_form):
    status, _ = run_audit(tmp_path, wf.torque_workbook([50.0], extra=_formula_cell(formula, closed_form)))
    out = capsys.readouterr().out
    assert status == 0 and "2 agree" in out, out
    status, _ = run_audit(tmp_path, wf.torque_workbook([50.0], extra=_formula_cell(formula, closed_form + 0.01)))
    out = capsys.readouterr().out
    assert status == 1 and "DIFFERS: Torques!C1" in out, out
    assert f"value: saved {closed_form + 0.01:.10g}, recomputed {closed_form:.10g}" in out


def test_each_distinct_call_is_computed_once(tmp_path):
    formula = "=NW_SERIES_TORQUE(A1,lin_curve,lin_speed)+NW_SERIES_TORQUE(A1,lin_curve,lin_speed)"
    found = audit.audit_bytes(wf.torque_workbook([50.0], extra=_formula_cell(formula, 0.0)))
    assert (found.calls, found.distinct_calls) == (3, 1)  # B1 and C1 twice, all with the same arguments
    parameters = ["NW_SERIES_TORQUE: current", "NW_SERIES_TORQUE: mag_curve", "NW_SERIES_TORQUE: mag_speed"]
    assert [p for p, _, _ in found.cells[1].inputs] == parameters * 2


def _reference_with(sheet_xml: str, old: bytes, new: bytes) -> bytes:
    def change(body: bytes) -> bytes:
        assert body.count(old) == 1, old
        return body.replace(old, new)

    return wf.replace_member(REFERENCE.read_bytes(), sheet_xml, change)


RESIDUAL = b"NW_SERIES_RESIDUAL_SPEED(hoist_v_supply,hoist_r_motor,hoist_mag_curve,hoist_mag_speed,hoist_brush_drop)"


def test_reference_round_wrapped_call_with_a_changed_saved_value_differs_and_is_named(tmp_path, capsys):
    # Measured in issue 11: this formula with a changed saved value used to pass as "not recomputed" (exit 0).
    wrapped = _reference_with("xl/worksheets/sheet2.xml", b"<f>" + RESIDUAL + b"</f><v>26600.0</v>",
                              b"<f>ROUND(" + RESIDUAL + b",4)</f><v>26600.0</v>")
    status, _ = run_audit(tmp_path, wrapped)
    assert status == 0, capsys.readouterr().out
    changed = _reference_with("xl/worksheets/sheet2.xml", b"<f>" + RESIDUAL + b"</f><v>26600.0</v>",
                              b"<f>ROUND(" + RESIDUAL + b",4)</f><v>26601.0</v>")
    status, _ = run_audit(tmp_path, changed)
    out = capsys.readouterr().out
    assert status == 1 and "DIFFERS: Hoist!F20" in out and out.count("DIFFERS") == 1, out


def test_reference_expression_argument_is_recomputed(tmp_path, capsys):
    # Measured in issue 11: conveyor_v_supply*1 as an argument used to leave the cell "not recomputed".
    data = _reference_with("xl/worksheets/sheet5.xml", b"<f>NW_SHUNT_KPHI(conveyor_v_supply,",
                           b"<f>NW_SHUNT_KPHI(conveyor_v_supply*1,")
    status, _ = run_audit(tmp_path, data)
    out = capsys.readouterr().out
    assert status == 0 and " 0 differ, 0 typed over, 0 not verified" in out, out


def test_reference_result_replaced_by_a_typed_number_is_named(tmp_path, capsys):
    # Measured in issue 11: the typed-over cell used to leave the count silently (49 of 50 "agree").
    def type_over(body: bytes) -> bytes:
        typed, count = re.subn(rb'(<c r="F20" s="\d+">)<f>' + re.escape(RESIDUAL) + rb"</f>", rb"\1", body)
        assert count == 1
        return typed

    data = wf.replace_member(REFERENCE.read_bytes(), "xl/worksheets/sheet2.xml", type_over)
    status, _ = run_audit(tmp_path, data)
    out = capsys.readouterr().out
    assert status == 1, out
    assert re.search(r"\d+ agree, 0 differ, 1 typed over", out), out
    assert "TYPED OVER: Hoist!F20: F20 holds the typed value 26600 where the workbook was built with a formula " \
           "calling NW_SERIES_RESIDUAL_SPEED" in out


def test_a_workbook_without_nw_cells_is_not_a_pass(tmp_path, capsys):
    out_file = io.BytesIO()
    book = xlsxwriter.Workbook(out_file, {"in_memory": True})
    sheet = book.add_worksheet("Plain")
    sheet.write_number("A1", 2.0)
    sheet.write_formula("B1", "=A1*2", None, 4.0)
    book.close()
    status, report = run_audit(tmp_path, out_file.getvalue())
    out = capsys.readouterr().out
    assert status == 4, out
    assert "NO NW_ CELLS" in out and "exit status 4: the workbook has no NW_ cells: nothing was checked" in out
    assert "no cells that call NW_ functions: nothing was checked" in report.read_text(encoding="utf-8")


def test_a_file_saved_without_the_functions_is_named_as_such(tmp_path, capsys):
    def foreign(book, sheet):
        sheet.write_formula("C1", "=NW_SERIES_TORQUE(A2,lin_curve,lin_speed)", None, "#NAME?")

    status, _ = run_audit(tmp_path, wf.torque_workbook([50.0, 80.0], saved=lambda i: "#NAME?" if i == 80.0 else
                                                        wf.torque_closed_form(i), extra=foreign))
    out = capsys.readouterr().out
    assert status == 3, out
    assert ("saved by a spreadsheet program without the NW_ functions: 2 cells hold #NAME? instead of their "
            "results (Torques!C1, Torques!B2)") in out
    assert "DIFFERS" not in out and "NOT VERIFIED: Torques!B2: saved as #NAME?" in out


def _without(member: str) -> bytes:
    """The small workbook with one zip member left out."""
    source, out = zipfile.ZipFile(io.BytesIO(wf.torque_workbook([50.0]))), io.BytesIO()
    with zipfile.ZipFile(out, "w") as target:
        for info in source.infolist():
            if info.filename != member:
                target.writestr(info, source.read(info))
    return out.getvalue()


@pytest.mark.parametrize(
    "member, words",
    [
        ("xl/workbook.xml", "not a workbook: the zip holds no spreadsheet (it has no xl/workbook.xml)"),
        ("xl/worksheets/sheet1.xml", "the workbook is incomplete: the zip does not hold the sheet 'Torques'"),
    ],
)
def test_a_zip_missing_a_workbook_part_is_refused_with_a_sentence(tmp_path, capsys, member, words):
    _exit_2(tmp_path, capsys, _without(member), words)


def test_constants_that_feed_nw_calls_are_listed_through_other_formulas(tmp_path):
    def through(book, sheet):
        sheet.write_number("E1", 40.0)
        sheet.write_formula("E2", "=E1+10", None, 50.0)
        sheet.write_formula("C1", "=NW_SERIES_TORQUE(E2,lin_curve,lin_speed)", None, wf.torque_closed_form(50.0))

    found = audit.audit_bytes(wf.torque_workbook([25.0], extra=through))
    constants = {(s, c): (n, v) for s, c, n, v in found.constants}
    assert constants[("Torques", "E1")] == ("", 40) and ("Torques", "E2") not in constants
    assert constants[("Torques", "A1")] == ("", 25)
    assert constants[("Curve data", "D1")] == ("lin_speed", 1000)
    assert all(("Curve data", f"{col}{row}") in constants for col in "AB" for row in range(2, 6))
    assert ("Curve data", "A1") not in constants  # the header row is not read by any call


def test_the_report_reads_like_an_audit(tmp_path, capsys):
    old_umask = os.umask(0o022)
    try:
        status, report = run_audit(tmp_path, _tamper(REFERENCE.read_bytes(), "xl/worksheets/sheet2.xml", "G10"))
    finally:
        os.umask(old_umask)
    out = capsys.readouterr().out
    assert status == 1
    page = report.read_text(encoding="utf-8")
    assert stat.S_IMODE(report.stat().st_mode) == 0o644  # as any file the user writes, not 0600
    assert page.index("<h2>Summary</h2>") < page.index("SHA-256") < page.index("<h2>Cells")
    assert '<a href="#cell-1">Hoist!F9:J13</a>' in page and '<tr id="cell-1" class="differs">' in page
    assert "@page { size: A4 landscape" in page and "max-width: 1240px" in page
    assert page.count("<td class=off>") == 2  # the tampered entry, in the saved and the recomputed table
    # The terminal shows the differing entry under its column's label, not the header row.
    header = [c for c in audit.audit_bytes(REFERENCE.read_bytes()).cells if c.address == "F9:J13"][0].saved[0]
    assert f"row 2, {header[1]}: saved" in out and f"saved {header[0]}" not in out


def test_the_default_report_goes_beside_the_workbook(tmp_path, capsys, monkeypatch):
    folder = tmp_path / "received"
    folder.mkdir()
    (folder / "book.xlsx").write_bytes(wf.torque_workbook([50.0]))
    monkeypatch.chdir(tmp_path)
    assert main(["audit", str(folder / "book.xlsx")]) == 0
    assert (folder / "book-audit.html").is_file() and not (tmp_path / "book-audit.html").exists()


@pytest.mark.parametrize("where", ["repository", "elsewhere"])
def test_pypis_formulas_is_loaded_even_from_the_repository_root(tmp_path, where):
    # From the repository's root, sys.path[0] is the root, whose formulas/ folder is Notchwise's core.
    root = Path(__file__).resolve().parents[1]
    code = ("import sys; from notchwise.workbooks.audit_recompute import spreadsheet_formulas as f; m = f(); "
            "import formulas, notchwise.formulas; print(m.__file__); print(formulas is m, hasattr(m, 'Parser'), "
            "notchwise.formulas.__name__)")
    run = subprocess.run([sys.executable, "-c", code], cwd=root if where == "repository" else tmp_path,
                         capture_output=True, text=True, check=True)
    location, checks = run.stdout.splitlines()
    assert Path(location).parent != root / "formulas"
    assert checks == "True True notchwise.formulas"


def test_every_exit_status_is_documented_in_the_help_and_the_readme(capsys):
    with pytest.raises(SystemExit):
        main(["audit", "--help"])
    shown = " ".join(capsys.readouterr().out.split())
    readme = (Path(__file__).resolve().parents[1] / "README.md").read_text(encoding="utf-8")
    paragraph = " ".join(readme[readme.index("`notchwise audit PATH"):readme.index("## The reference workbook")].split())
    for code, meaning in audit.EXIT.items():
        assert f"{code}: {meaning}" in shown
        assert f"{code}: " in paragraph
