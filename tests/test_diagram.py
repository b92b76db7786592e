"""The ``notchwise diagram`` command: it writes a PNG and keeps matplotlib out of the CLI's import."""

from __future__ import annotations

import subprocess
import sys

import numpy as np
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


def test_the_diagram_starts_the_hoist_from_the_workbook_s_own_inputs():
    from notchwise.workbooks.build_reference import SHEETS
    from notchwise.workbooks.diagram import demo_start

    inputs = {item.name: item.value for sheet in SHEETS for item in sheet.inputs if hasattr(item, "value")}
    _, data, _, result = demo_start("hoist")
    assert data["i_cut"] == inputs["hoist_i_cut"] == 300.0  # the cut-out set on the Hoist start sheet
    np.testing.assert_allclose(result.i_cut_a[: result.notches], 300.0, rtol=1e-6)
