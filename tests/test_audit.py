"""``notchwise audit``: recomputation against closed forms, its verdicts, exit codes, and hostile files.

The recomputed values are checked against the closed forms of the DC machine
laws on a linear magnetization curve (tests/workbook_files.py: A. E.
Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*, 6th ed.,
McGraw-Hill, 2003, ch. 7), never against our own output.
"""

from __future__ import annotations

import hashlib
import io
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
