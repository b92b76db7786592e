"""The ``notchwise diagram`` command: it writes a PNG and keeps matplotlib out of the CLI's import."""

from __future__ import annotations

import subprocess
import sys

import pytest

from notchwise.workbooks.cli import main


@pytest.mark.parametrize("case", ["hoist", "conveyor"])
def test_diagram_writes_a_png(tmp_path, case, capsys):
    output = tmp_path / f"{case}.png"
    assert main(["diagram", "--case", case, "--output", str(output), "--points", "400"]) == 0
    assert output.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # PNG signature (ISO/IEC 15948:2004, sec. 5.2)
    assert "competent person" in capsys.readouterr().out


def test_the_diagram_module_does_not_import_matplotlib():
    # matplotlib is imported inside run(); (xlwings, loaded by the other subcommands, imports it on its own)
    code = "import sys, notchwise.workbooks.diagram; print('matplotlib' in sys.modules)"
    assert subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip() == "False"


def test_an_unknown_case_is_refused_by_name(capsys):
    with pytest.raises(SystemExit):
        main(["diagram", "--case", "dragline"])
    assert "invalid choice: 'dragline'" in capsys.readouterr().err
