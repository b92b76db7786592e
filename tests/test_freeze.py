"""``notchwise freeze``: every NW_ figure as a plain value, the formula kept as a note."""

import openpyxl
import pytest

from notchwise.addin import CAUTION
from notchwise.workbooks.audit_recompute import calls_nw
from notchwise.workbooks.cli import main
from notchwise.workbooks.freeze import FIRST_SHEET
from tests.test_reference_workbook import REFERENCE, _contents


@pytest.fixture(scope="module")
def frozen(tmp_path_factory):
    out = tmp_path_factory.mktemp("freeze") / "frozen.xlsx"
    assert main(["freeze", str(REFERENCE), str(out)]) == 0
    return out


def test_every_nw_result_becomes_its_saved_value_with_the_formula_as_note(frozen):
    original = _contents(REFERENCE)["cells"]
    book = openpyxl.load_workbook(frozen)
    assert book.sheetnames[0] == FIRST_SHEET and book.sheetnames[1:] == _contents(REFERENCE)["sheets"]
    nw_cells = [(s, c) for (s, c), (text, _, kind) in original.items() if kind == "f" and calls_nw(str(text))]
    assert nw_cells
    for sheet, coordinate in nw_cells:
        cell = book[sheet][coordinate]
        assert cell.data_type != "f" and cell.value == pytest.approx(original[sheet, coordinate][1])
        assert str(original[sheet, coordinate][0]) in cell.comment.text
    for (sheet, coordinate), (_, saved, _) in original.items():
        cell = book[sheet][coordinate]
        value = cell.value
        assert not (cell.data_type == "f" and calls_nw(str(getattr(value, "text", value)))), (sheet, coordinate)
        if (sheet, coordinate) not in nw_cells and saved is not None and not isinstance(saved, str):
            assert value == pytest.approx(saved) or isinstance(value, str)  # spilled cells and inputs keep their figures


def test_the_first_sheet_says_what_the_copy_is(frozen):
    text = " ".join(str(c.value) for c in openpyxl.load_workbook(frozen)[FIRST_SHEET]["A"] if c.value)
    assert "saved" in text and "note" in text and "Charts" in text and CAUTION in text


@pytest.mark.parametrize("content", [b"", b"not a zip at all", b"PK\x03\x04 truncated"])
def test_a_file_that_is_not_a_workbook_is_one_line_and_exit_2(tmp_path, capsys, content):
    bad = tmp_path / "bad.xlsx"
    bad.write_bytes(content)
    assert main(["freeze", str(bad), str(tmp_path / "out.xlsx")]) == 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err


def test_a_missing_file_and_an_overwrite_are_refused(tmp_path, capsys):
    assert main(["freeze", str(tmp_path / "absent.xlsx"), str(tmp_path / "out.xlsx")]) == 2
    assert "absent.xlsx not found" in capsys.readouterr().err
    target = tmp_path / "same.xlsx"
    target.write_bytes(REFERENCE.read_bytes())
    assert main(["freeze", str(target), str(target)]) == 2
    assert target.read_bytes() == REFERENCE.read_bytes()
