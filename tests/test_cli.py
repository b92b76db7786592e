"""The notchwise command on the demo cases."""

from __future__ import annotations

import argparse
import importlib
import subprocess
import sys

import pytest

from notchwise.addin import CAUTION
from notchwise.workbooks.cli import SUBCOMMANDS, main


def test_demo_prints_the_graded_tables_and_the_caution(capsys, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)  # the demo writes its workbook in the current folder
    assert main(["demo"]) == 0
    out = capsys.readouterr().out
    assert "NW_GRADE_SERIES" in out and "NW_GRADE_SHUNT" in out and "Error" not in out
    assert " ".join(CAUTION.split()) in " ".join(out.split())  # wrapped to the terminal's 100 columns


def test_version_prints_the_installed_version(capsys):
    from importlib import metadata

    with pytest.raises(SystemExit) as stop:
        main(["--version"])
    assert stop.value.code == 0
    assert capsys.readouterr().out.strip() == f"notchwise {metadata.version('notchwise')}"


def test_help_has_no_restructuredtext_markup_and_carries_the_caution(capsys):
    with pytest.raises(SystemExit):
        main(["--help"])
    out = capsys.readouterr().out
    assert "``" not in out and ":mod:" not in out
    assert " ".join(CAUTION.split()) in " ".join(out.split())


def test_help_imports_none_of_the_heavy_libraries():
    # checked by what is loaded, not by timing: `notchwise --help` must not wait for scipy, matplotlib, openpyxl
    code = (
        "import sys\n"
        "from notchwise.workbooks.cli import SUBCOMMANDS, main\n"
        "try:\n    main(['--help'])\nexcept SystemExit:\n    pass\n"
        "print(sorted(m for m in ('scipy', 'matplotlib', 'openpyxl', 'xlwings', 'xlsxwriter') if m in sys.modules),"
        " file=sys.stderr)\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert done.stderr.strip() == "[]"


@pytest.mark.parametrize("name", sorted(SUBCOMMANDS))
def test_each_subcommand_summary_is_the_one_its_module_registers(name):
    module, summary = SUBCOMMANDS[name]
    parser = argparse.ArgumentParser()
    subparsers = parser.add_subparsers()
    importlib.import_module(module).add_parser(subparsers)
    registered = {action.dest: action.help for action in subparsers._choices_actions}
    assert registered == {name: summary}


def test_a_chosen_subcommand_gets_its_own_arguments(capsys):
    with pytest.raises(SystemExit) as stop:
        main(["freeze"])
    assert stop.value.code == 2
    assert "required: path, out" in capsys.readouterr().err


def test_demo_output_fits_100_columns_with_units_and_progress_on_stderr(capsys, tmp_path, monkeypatch):
    from notchwise.workbooks.demo import WIDTH

    monkeypatch.chdir(tmp_path)
    assert main(["demo"]) == 0
    captured = capsys.readouterr()
    lines = captured.out.splitlines()
    assert WIDTH == 100 and max(len(line) for line in lines) <= WIDTH
    assert "26,600 rpm" in captured.out  # a single figure carries its unit, in significant figures
    assert "notchwise demo: computing Hoist start" in captured.err  # progress on stderr, stdout keeps the results
    # the whole start's figures stand under headings of their own, not under the notches' ones
    at = lines.index("whole start:")
    block = " ".join(lines[at + 1: at + 7])
    assert "acceleration" in block and "final speed" in block and "dwell" not in block and "cut-out" not in block


def test_format_table_wraps_headings_and_moves_long_text_under_its_row():
    from notchwise.workbooks.demo import format_table

    rows = [["figure", "value", "unit", "basis"], ["pickup", 235.7, "A", "word " * 40], ["caution", float("nan"), "", "x"]]
    text = format_table(rows, width=60)
    assert max(len(line) for line in text.splitlines()) <= 60
    assert "basis: word word" in text and "235.7" in text


def test_build_reference_says_what_it_wrote_and_where(tmp_path, capsys):
    from notchwise.workbooks.build_reference import main as build_main

    path = tmp_path / "ref.xlsx"
    assert build_main([str(path)]) == 0
    out = capsys.readouterr().out
    assert f"Wrote the Notchwise reference workbook to {path.resolve()}" in out and CAUTION in out
    assert path.is_file()


def test_format_table_moves_a_long_first_cell_of_a_row_of_words_under_it():
    from notchwise.workbooks.demo import format_table

    rows = [["section", "energy [J]", "verdict"], [1, 4692.4, "ok"], ["a closing note far longer than a column", float("nan"), "x"]]
    text = format_table(rows, width=40)
    assert max(len(line) for line in text.splitlines()) <= 40
    assert "section: a closing note far longer than a column" in " ".join(text.split()) and "4,692" in text
