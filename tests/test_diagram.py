"""The ``notchwise diagram`` command: it writes a PNG and keeps matplotlib out of the CLI's import."""

from __future__ import annotations

import argparse
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


def test_peak_labels_are_the_simulated_peaks_not_the_largest_samples():
    # with 10 samples the largest sample of notch 1 is far below its peak; the label must give the peak
    from notchwise.formulas.start_sim import start_history
    from notchwise.workbooks.diagram import demo_start, peak_labels

    _, _, motor, result = demo_start("hoist")
    history = start_history(result, motor, 10)
    labels = peak_labels(result, history)
    np.testing.assert_allclose([peak for _, peak, _ in labels], [*result.i_peak_a, result.i_peak_run_a], rtol=1e-12)
    assert [text for _, _, text in labels] == [f"{peak:.0f} A" for peak in (*result.i_peak_a, result.i_peak_run_a)]
    assert history.i_a[history.notch == 1].max() < result.i_peak_a[0] - 10.0  # the samples alone would mislead


@pytest.mark.parametrize("points", ["1", "0", "-5", "10000000"])
def test_bad_points_give_one_sentence_and_exit_2(tmp_path, capsys, points):
    assert main(["diagram", "--points", points, "--output", str(tmp_path / "x.png")]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and err.startswith("notchwise diagram: points") and "Traceback" not in err
    assert not (tmp_path / "x.png").exists()


def test_a_folder_that_does_not_exist_gives_one_sentence_and_exit_2(tmp_path, capsys):
    missing = tmp_path / "no such folder" / "start.png"
    assert main(["diagram", "--output", str(missing)]) == 2
    err = capsys.readouterr().err.strip()
    assert len(err.splitlines()) == 1 and "does not exist" in err and str(missing.parent) in err


def test_a_name_without_png_is_reported_as_the_file_written(tmp_path, capsys, monkeypatch):
    monkeypatch.chdir(tmp_path)
    assert main(["diagram", "--output", "hoist-start", "--points", "50"]) == 0
    assert "wrote hoist-start.png" in capsys.readouterr().out
    assert (tmp_path / "hoist-start.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_every_line_of_the_starting_diagram_has_a_legend_entry_and_labels_stay_inside(monkeypatch):
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    from notchwise.workbooks import diagram

    figure, _ = diagram._draw_start(plt, argparse.Namespace(case="conveyor", points=400))
    try:
        for axes in figure.axes:
            legend_texts = {t.get_text() for a in figure.axes if a.get_legend() for t in a.get_legend().get_texts()}
            for line in [*axes.get_lines(), *axes.collections]:
                assert line.get_label() in legend_texts, line.get_label()
        timeline = figure.axes[0]
        figure.canvas.draw()
        box = timeline.get_window_extent()
        for text in timeline.texts:
            extent = text.get_window_extent()
            assert box.x0 <= extent.x0 and extent.x1 <= box.x1 and box.y0 <= extent.y0 and extent.y1 <= box.y1
    finally:
        plt.close(figure)


def test_current_and_speed_have_the_same_colours_in_the_png_and_the_workbook_chart():
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import colors
    from matplotlib import pyplot as plt

    from notchwise.workbooks import diagram
    from notchwise.workbooks.build_reference import SHEETS
    from notchwise.workbooks.palette import QUANTITY_COLOURS

    chart = next(r.chart for s in SHEETS for r in s.results if r.function == "NW_START_HISTORY")
    assert chart.colours == ("current", "speed")
    figure, _ = diagram._draw_start(plt, argparse.Namespace(case="hoist", points=50))
    try:
        drawn = {line.get_label(): colors.to_hex(line.get_color()) for a in figure.axes for line in a.get_lines()}
    finally:
        plt.close(figure)
    assert drawn["armature current"] == QUANTITY_COLOURS["current"].lower()
    assert drawn["speed"] == QUANTITY_COLOURS["speed"].lower()


def test_the_coordination_diagram_is_a_png_drawn_from_the_workbook_chart_s_cells(tmp_path, capsys):
    from notchwise.addin.protection import NW_RELAY_TIME, NW_THERMAL_TIME
    from notchwise.workbooks.demo_cases import HOIST_PROTECTION
    from notchwise.workbooks.diagram import coordination_chart

    output = tmp_path / "coordination.png"
    assert main(["diagram", "--kind", "coordination", "--output", str(output)]) == 0
    assert output.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    captured = capsys.readouterr()
    assert "competent person" in captured.out and "computing" in captured.err  # progress on stderr
    lines = {series.label: (xs, ys) for series, xs, ys in coordination_chart().lines}
    p = HOIST_PROTECTION.inputs
    xs, ys = lines["motor relay, inverse-time"]
    assert list(xs) == p["sweep_current"]
    np.testing.assert_allclose(ys, [NW_RELAY_TIME(p["curve"], i, p["pickup"], p["multiplier"]) for i in xs])
    xs, ys = lines["thermal element, hot"]
    np.testing.assert_allclose(ys, [NW_THERMAL_TIME(i, p["i_full_load"], p["k_factor"], p["tau"], p["i_full_load"])
                                    for i in xs])
    assert lines["stall point (withstand time)"] == ((p["i_stall"],), (p["t_stall"],))
    assert min(lines["motor start (simulated)"][1]) > 0.0  # a log axis: the t = 0 row is left out
