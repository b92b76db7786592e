"""The notchwise command on the demo cases."""

from __future__ import annotations

from notchwise.addin import CAUTION
from notchwise.workbooks.cli import main


def test_demo_prints_the_graded_tables_and_the_caution(capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # the demo writes its workbook in the current folder
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    assert "NW_GRADE_SERIES" in out and "NW_GRADE_SHUNT" in out and "Error" not in out
    assert CAUTION in out
