"""Regression pins: our own output compared with our own earlier output, kept apart from the checks.

A pin catches an unintended change; it proves nothing about a figure being right (the checks of the
figures against standards, books, closed forms and second methods live in the other test modules).
When a pin fails after an intended change, regenerate what it pins (for the reference workbook:
``python -m notchwise.workbooks.build_reference workbooks/notchwise-reference.xlsx``) and commit it.
"""

from __future__ import annotations

import pytest

from notchwise.workbooks.build_reference import build
from notchwise.workbooks.cli import main
from tests.test_reference_workbook import REFERENCE, _contents


def _close(value):
    """A figure as compared: another numpy/scipy build may move its last digits; a real change is larger."""
    is_figure = isinstance(value, (int, float)) and not isinstance(value, bool)
    return pytest.approx(value, rel=1e-9, abs=1e-12) if is_figure else value


def assert_same_workbook(built_path, committed_path=REFERENCE):
    """Same sheets, names and cells; figures equal to what another numpy/scipy build may move."""
    built, committed = _contents(built_path), _contents(committed_path)
    assert built["names"] == committed["names"] and built["sheets"] == committed["sheets"]
    assert built["cells"].keys() == committed["cells"].keys()
    for where, (text, saved, kind) in committed["cells"].items():
        assert built["cells"][where] == (_close(text), _close(saved), kind), where


def test_regression_pin_committed_workbook_is_what_the_script_builds(tmp_path):
    # Regression pin: the committed file must be regenerated when the description changes.
    fresh = tmp_path / "fresh.xlsx"
    build(fresh)
    assert_same_workbook(fresh)
    again = tmp_path / "again.xlsx"
    build(again)
    assert again.read_bytes() == fresh.read_bytes(), "the build must be deterministic"


def test_regression_pin_demo_writes_the_committed_workbook(tmp_path):
    # Regression pin: ``notchwise demo --out`` writes the committed reference workbook.
    assert main(["demo", "--out", str(tmp_path / "elsewhere.xlsx")]) == 0
    assert_same_workbook(tmp_path / "elsewhere.xlsx")
