"""``notchwise diagram``: a demo case's starting diagram or its coordination diagram, as a PNG.

``--kind start`` (the default): left, current and speed against time with the
cut-out instants marked and each notch's simulated peak labelled; right, the
speed-current characteristic of every notch with the path the start takes
across them. ``--kind coordination``: the time-current coordination diagram of
the hoist's protection, both axes logarithmic, drawn from the very cells of
the reference workbook's chart (the same case description, the same ``NW_``
calls). matplotlib, scipy and the workbook writer are imported only when the
command runs, so the rest of the command line stays quick to start.
"""

from __future__ import annotations

import sys
from pathlib import Path

from notchwise.addin import CAUTION
from notchwise.workbooks.demo_cases import HOIST, STARTS
from notchwise.workbooks.palette import GREY, QUANTITY_COLOURS

__all__ = ["add_parser", "run", "demo_start", "KINDS", "output_path", "peak_labels"]

#: What ``--kind`` draws.
KINDS = ("start", "coordination")
DEFAULT_POINTS = 2000
#: Fewer samples than this draw visibly coarse lines, and the title says so.
COARSE_BELOW = 200
#: Styles of the workbook's series (:class:`notchwise.workbooks.schema.Series`) in matplotlib's terms.
LINE_STYLES = {"line": {"ls": "-", "lw": 2.0}, "dash": {"ls": "--", "lw": 1.6}, "points": {"ls": "none", "marker": "o", "ms": 7}}


def add_parser(subparsers) -> None:
    """Register the ``diagram`` subcommand."""
    parser = subparsers.add_parser(
        "diagram", help="draw the starting diagram or the coordination diagram of a demo case as a PNG",
        description="Draw a demo case's starting diagram (current and speed against time, and the speed-current "
        "plane) or the hoist's time-current coordination diagram, as a PNG. Exit 0: written; 2: bad arguments or "
        "the file cannot be written.",
    )
    parser.add_argument("--kind", choices=KINDS, default="start", help="what to draw (default: start)")
    parser.add_argument("--case", choices=sorted(STARTS), default=HOIST.key,
                        help="demo case of the starting diagram (default: hoist; the coordination diagram is the hoist's)")
    parser.add_argument("--output", help="PNG file to write (default: start-<case>.png or coordination-hoist.png)")
    parser.add_argument("--points", type=int, default=DEFAULT_POINTS,
                        help=f"samples of the time history of the starting diagram (default {DEFAULT_POINTS})")
    parser.set_defaults(run=run)


def _say(words: str) -> None:
    """A line of progress on stderr, so that stdout keeps the result alone."""
    print(f"notchwise diagram: {words}", file=sys.stderr, flush=True)


def output_path(name: str | None, default: str) -> Path:
    """The file actually written: ``name`` (or ``default``) with ``.png`` added where it lacks it.

    Raises
    ------
    FileNotFoundError
        Where the folder to write into does not exist.
    """
    path = Path(name or default)
    if path.suffix.lower() != ".png":
        path = path.with_name(path.name + ".png")
    if not path.parent.is_dir():
        raise FileNotFoundError(f"the folder {path.parent} does not exist")
    return path


def demo_start(key):
    """Case, its inputs, motor and simulated start of the demo start ``key`` of ``STARTS``.

    The inputs are those of the case's description, the same the reference workbook uses: the cut-out
    current is the one set there, not the graded switching current.
    """
    import numpy as np

    from notchwise.formulas.dc_motor import SeriesMotor, ShuntMotor, k_phi_from_rating, magnetization_curve
    from notchwise.formulas.grading import grade_uniform
    from notchwise.formulas.start_sim import simulate_start

    case, switching = STARTS[key]
    data = {**case.inputs, **switching.inputs}
    if case is HOIST:
        rows = np.array(data["mag_curve"])
        motor = SeriesMotor(data["r_motor"], magnetization_curve(rows[:, 0], rows[:, 1], data["mag_speed"]))
    else:
        k_phi = k_phi_from_rating(data["v_supply"], data["i_rated"], data["n_rated"], data["r_motor"], data["brush_drop"])
        motor = ShuntMotor(data["r_motor"], k_phi)
    grading = grade_uniform(
        motor, data["v_supply"], data["i_peak"], data["i_switch"], data.get("notches"), data["brush_drop"]
    )
    result = simulate_start(
        motor, data["v_supply"], grading.r_section_ohm, data["l_circuit"], data["inertia"], data["load_torque"],
        i_cut_a=data["i_cut"], brush_drop_v=data["brush_drop"],
    )
    return case, data, motor, result


def peak_labels(result, history):
    """(time [s], simulated peak [A], text) of each notch's peak label, the running notch last.

    The figure is the simulated peak of the start (``StartResult.i_peak_a``, ``i_peak_run_a``), never the
    largest sample of the history, which misses the peak when the samples are few; the samples only
    place the label in time (at the notch's largest sample).
    """
    import numpy as np

    peaks = [*result.i_peak_a, result.i_peak_run_a]
    labels = []
    for notch, peak in enumerate(peaks, start=1):
        inside = np.nonzero(history.notch == notch)[0]
        at = history.t_s[inside[np.argmax(history.i_a[inside])]] if inside.size else history.t_s[-1]
        labels.append((float(at), float(peak), f"{peak:.0f} A"))
    return labels


def _characteristics(motor, data, r_notch, i_top):
    """Steady speed against current on each notch, down to standstill."""
    import numpy as np

    from notchwise.formulas.dc_motor import steady_speed_rpm

    v_eff = data["v_supply"] - data["brush_drop"]
    curves = []
    for r in r_notch:
        i = np.linspace(max(i_top * 0.02, 1.0), min(v_eff / r, i_top), 300)
        curves.append((i, steady_speed_rpm(motor, data["v_supply"], i, r - motor.r_ohm, data["brush_drop"])))
    return curves


def _draw_start(plt, arguments):
    """The starting diagram of ``arguments.case``: a figure."""
    import numpy as np

    from notchwise.formulas.grading import notch_resistances_ohm
    from notchwise.formulas.start_sim import start_history

    _say(f"simulating the {arguments.case} start ...")
    case, data, motor, result = demo_start(arguments.case)
    history = start_history(result, motor, arguments.points)
    cuts = result.t_start_s + result.dwell_s
    r_notch = notch_resistances_ohm(motor.r_ohm, result.r_section_ohm)
    i_cut, current, speed = data["i_cut"], QUANTITY_COLOURS["current"], QUANTITY_COLOURS["speed"]
    labels = peak_labels(result, history)

    _say("drawing ...")
    figure, (timeline, plane) = plt.subplots(1, 2, figsize=(14, 6.4), gridspec_kw={"width_ratios": [1.5, 1]})
    speed_axis = timeline.twinx()
    timeline.plot(history.t_s, history.i_a, color=current, lw=2.0, label="armature current")
    speed_axis.plot(history.t_s, history.n_rpm, color=speed, lw=2.0, label="speed")
    timeline.axhline(data["i_peak"], color=current, ls=":", lw=1.0, label=f"design peak {data['i_peak']:.0f} A")
    timeline.axhline(i_cut, color=current, ls="--", lw=1.0, label=f"switching current {i_cut:.0f} A")
    timeline.vlines(cuts, 0.0, 1.0, transform=timeline.get_xaxis_transform(), colors=GREY, lw=0.8, ls="--",
                    label="cut-out instants")
    for k, t_cut in enumerate(cuts):
        timeline.annotate(f"cut {k + 1}", (t_cut, 0.02), xycoords=("data", "axes fraction"), xytext=(3, 0),
                          textcoords="offset points", rotation=90, fontsize=8, color=GREY, va="bottom", ha="left")
    times, peaks, _ = zip(*labels)
    timeline.plot(times, peaks, ls="none", marker="_", ms=14, mew=2, color=current,
                  label="simulated peak of each notch")
    texts = []
    for t, peak, text in labels:
        texts.append(timeline.annotate(text, (t, peak), xytext=(5, 1), textcoords="offset points", fontsize=7.5, color=current,
                          ha="left", va="bottom", annotation_clip=True, zorder=5,
                          bbox={"fc": "white", "ec": "none", "alpha": 0.85, "pad": 0.5}))
    timeline.set_xlabel("time from closing the line contactor [s]")
    timeline.set_ylabel("armature current [A]", color=current)
    speed_axis.set_ylabel("speed [rpm]", color=speed)
    timeline.set_ylim(0.0, 1.2 * max(data["i_peak"], max(peaks), history.i_a.max()))  # room for the labels
    speed_axis.set_ylim(0.0, 1.15 * max(result.n_final_rpm, history.n_rpm.max()))
    timeline.set_xlim(0.0, 1.05 * history.t_s[-1])  # room after the last peak for its label
    timeline.grid(alpha=0.3)
    handles = [*timeline.get_lines(), *timeline.collections, *speed_axis.get_lines()]
    timeline.legend(handles, [h.get_label() for h in handles], loc="upper center", bbox_to_anchor=(0.5, -0.13),
                    ncol=3, fontsize=8, frameon=False)
    title = f"Current and speed in time: {result.notches} notches, acceleration {result.t_accel_s:.2f} s"
    if arguments.points < COARSE_BELOW:
        title += f"\n{arguments.points} samples drawn: the lines are coarse; the labelled peaks are the simulated ones"
    timeline.set_title(title, fontsize=10)

    i_top = min(1.3 * data["i_peak"], motor.i_max_a)
    colours = plt.get_cmap("viridis")(np.linspace(0.05, 0.85, r_notch.size))
    for k, (i, n) in enumerate(_characteristics(motor, data, r_notch, i_top)):
        label = f"notch {k + 1} ({r_notch[k]:.3g} ohm)" if k < result.notches else f"run ({r_notch[k]:.3g} ohm)"
        plane.plot(i, n, color=colours[k], lw=1.2, label=label)
    plane.plot(history.i_a, history.n_rpm, color="black", lw=2.2, label="path of the start")
    plane.plot(result.i_cut_a, result.n_cut_rpm, "o", color="black", ms=4, label="cut-out points")
    plane.axvline(i_cut, color=current, ls="--", lw=1.0, label=f"switching current {i_cut:.0f} A")
    plane.axvline(data["i_peak"], color=current, ls=":", lw=1.0, label=f"design peak {data['i_peak']:.0f} A")
    plane.set_xlim(0.0, i_top)
    plane.set_ylim(0.0, 1.25 * result.n_final_rpm)
    plane.set_xlabel("armature current [A]")
    plane.set_ylabel("speed [rpm]")
    plane.grid(alpha=0.3)
    plane.legend(fontsize=7, loc="upper center", bbox_to_anchor=(0.5, -0.13), ncol=3, frameon=False)
    plane.set_title("Speed-current characteristic of each notch", fontsize=10)
    figure.suptitle(f"{case.title}: starting diagram", fontsize=12, fontweight="bold")
    _keep_inside(figure, timeline, texts)
    return figure, f"start-{case.key}.png"


def _keep_inside(figure, axes, texts):
    """Widen the time axis until every label ends inside ``axes`` (labels stand right of their peak,
    clear of the cut line before it and, the notch being wide enough, of the one after)."""
    for _ in range(4):
        figure.canvas.draw()
        box = axes.get_window_extent()
        overflow = max(text.get_window_extent().x1 for text in texts) - box.x1
        if overflow <= 0:
            return
        left, right = axes.get_xlim()
        axes.set_xlim(left, right + 1.2 * overflow * (right - left) / box.width)


#: How the coordination diagram labels a series beside it, by the quantity it draws.
def _label_point(xs, ys):
    return f"{xs[0]:.0f} A, {ys[0]:.3g} s"


def _label_span(xs, ys):
    return f"interval {ys[-1] - ys[0]:.2g} s at {xs[0]:.0f} A"


def _label_current(xs, ys):
    return f"{xs[0]:.0f} A"


ANNOTATE = {"stall": _label_point, "interval": _label_span, "running": _label_current}


def coordination_chart(progress=None):
    """The workbook's coordination chart (a :class:`~notchwise.workbooks.writer.DrawnChart`), computed in memory."""
    from notchwise.workbooks.build_reference import charts

    return next(chart for chart in charts(progress=progress) if chart.spec.key == "coordination")


def _draw_coordination(plt, arguments):
    """The hoist's time-current coordination diagram, drawn from the workbook chart's own cells: a figure."""
    from notchwise.workbooks.build_reference import say_progress

    drawn = coordination_chart(progress=say_progress("notchwise diagram"))
    spec = drawn.spec
    _say("drawing ...")
    figure, axes = plt.subplots(figsize=(11, 7.6))
    for series, xs, ys in drawn.lines:
        colour = QUANTITY_COLOURS[series.colour]
        axes.plot(xs, ys, color=colour, label=series.label, **LINE_STYLES[series.style])
        if series.colour in ANNOTATE and xs:
            axes.annotate(ANNOTATE[series.colour](xs, ys), (xs[-1], ys[-1]), xytext=(6, -4),
                          textcoords="offset points", fontsize=8, color=colour, ha="left", va="top",
                          bbox={"fc": "white", "ec": "none", "alpha": 0.85, "pad": 1.0})
    axes.set_xscale("log")
    axes.set_yscale("log")
    axes.set_xlim(*spec.x_range)
    axes.set_ylim(*spec.y_range)
    axes.set_xlabel(spec.x_label)
    axes.set_ylabel(spec.y_label)
    axes.grid(which="major", alpha=0.45)
    axes.grid(which="minor", alpha=0.15)
    axes.legend(fontsize=8, loc="upper left", bbox_to_anchor=(1.01, 1.0), frameon=False)
    axes.set_title(spec.title, fontsize=12, fontweight="bold")
    return figure, "coordination-hoist.png"


def run(arguments) -> int:
    """Draw the chosen diagram and write it as a PNG; exit 2 with one sentence on bad arguments."""
    from notchwise.formulas.errors import InputError
    from notchwise.formulas.start_sim import checked_points

    try:
        checked_points(arguments.points)
        default = f"start-{arguments.case}.png" if arguments.kind == "start" else "coordination-hoist.png"
        output = output_path(arguments.output, default)
    except (InputError, FileNotFoundError) as error:
        print(f"notchwise diagram: {error}", file=sys.stderr)
        return 2

    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    figure, _ = (_draw_start if arguments.kind == "start" else _draw_coordination)(plt, arguments)
    figure.text(0.01, 0.01, "Invented demo data. " + CAUTION, fontsize=7, color=GREY, wrap=True)
    figure.tight_layout(rect=(0, 0.04, 1, 0.96))
    try:
        figure.savefig(output, dpi=130, format="png")
    except OSError as error:
        print(f"notchwise diagram: cannot write {output}: {error.strerror or error}", file=sys.stderr)
        return 2
    finally:
        plt.close(figure)
    print(f"wrote {output}")
    print(CAUTION)
    return 0
