"""``notchwise diagram``: the starting diagram of a demo case as a PNG.

Left: current and speed against time, with the cut-out instants marked.
Right: the speed-current characteristic of every notch with the path the start
takes across them. matplotlib is imported only when the command runs, so the
rest of the command line stays quick to start.
"""

from __future__ import annotations

import numpy as np

from notchwise.formulas.dc_motor import SeriesMotor, ShuntMotor, k_phi_from_rating, magnetization_curve, steady_speed_rpm
from notchwise.formulas.grading import grade_uniform, notch_resistances_ohm
from notchwise.formulas.start_sim import simulate_start, start_history
from notchwise.addin import CAUTION
from notchwise.workbooks.demo_cases import HOIST, STARTS

__all__ = ["add_parser", "run", "demo_start"]


def add_parser(subparsers) -> None:
    """Register the ``diagram`` subcommand."""
    parser = subparsers.add_parser("diagram", help="draw the starting diagram or the coordination diagram of a demo case as a PNG")
    parser.add_argument("--case", choices=sorted(STARTS), default=HOIST.key, help="demo case (default: hoist)")
    parser.add_argument("--output", help="PNG file to write (default: start-<case>.png)")
    parser.add_argument("--points", type=int, default=2000, help="samples of the time history (default 2000)")
    parser.set_defaults(run=run)


def demo_start(key):
    """Case, its inputs, motor and simulated start of the demo start ``key`` of ``STARTS``.

    The inputs are those of the case's description, the same the reference workbook uses: the cut-out
    current is the one set there, not the graded switching current.
    """
    case, switching = STARTS[key]
    data = {**case.inputs, **switching.inputs}
    if case is HOIST:
        rows = np.array(data["mag_curve"])
        motor = SeriesMotor(data["r_motor"], magnetization_curve(rows[:, 0], rows[:, 1], data["mag_speed"]))
    else:
        k_phi = k_phi_from_rating(data["v_supply"], data["i_rated"], data["n_rated"], data["r_armature"], data["brush_drop"])
        motor = ShuntMotor(data["r_armature"], k_phi)
    grading = grade_uniform(
        motor, data["v_supply"], data["i_peak"], data["i_switch"], data.get("notches"), data["brush_drop"]
    )
    result = simulate_start(
        motor, data["v_supply"], grading.r_section_ohm, data["l_circuit"], data["inertia"], data["load_torque"],
        i_cut_a=data["i_cut"], brush_drop_v=data["brush_drop"],
    )
    return case, data, motor, result


def _characteristics(motor, data, r_notch, i_top):
    """Steady speed against current on each notch, down to standstill."""
    v_eff = data["v_supply"] - data["brush_drop"]
    curves = []
    for r in r_notch:
        i = np.linspace(max(i_top * 0.02, 1.0), min(v_eff / r, i_top), 300)
        curves.append((i, steady_speed_rpm(motor, data["v_supply"], i, r - motor.r_ohm, data["brush_drop"])))
    return curves


def run(arguments) -> int:
    """Simulate the chosen demo case and write its starting diagram."""
    import matplotlib

    matplotlib.use("Agg")
    from matplotlib import pyplot as plt

    case, data, motor, result = demo_start(arguments.case)
    history = start_history(result, motor, arguments.points)
    cuts = result.t_start_s + result.dwell_s
    r_notch = notch_resistances_ohm(motor.r_ohm, result.r_section_ohm)
    i_cut = data["i_cut"]

    figure, (timeline, plane) = plt.subplots(1, 2, figsize=(13.5, 5.6), gridspec_kw={"width_ratios": [1.5, 1]})
    colours = plt.get_cmap("viridis")(np.linspace(0.05, 0.85, r_notch.size))

    speed_axis = timeline.twinx()
    timeline.plot(history.t_s, history.i_a, color="#c0392b", lw=2.0, label="armature current")
    speed_axis.plot(history.t_s, history.n_rpm, color="#1f4e79", lw=2.0, label="speed")
    timeline.axhline(data["i_peak"], color="#c0392b", ls=":", lw=1.0, label=f"design peak {data['i_peak']:.0f} A")
    timeline.axhline(i_cut, color="#c0392b", ls="--", lw=1.0, label=f"cut-out current {i_cut:.0f} A")
    for k, t_cut in enumerate(cuts):
        timeline.axvline(t_cut, color="grey", lw=0.8, ls="--")
        timeline.text(t_cut, 0.02, f" cut {k + 1}", rotation=90, transform=timeline.get_xaxis_transform(),
                      fontsize=8, color="dimgrey", va="bottom")
    for notch in range(1, result.notches + 2):
        inside = np.nonzero(history.notch == notch)[0]
        top = inside[np.argmax(history.i_a[inside])]
        timeline.annotate(f"{history.i_a[top]:.0f} A", (history.t_s[top], history.i_a[top]),
                          xytext=(0, 5), textcoords="offset points", fontsize=7, color="#c0392b", ha="center")
    timeline.set_xlabel("time from closing the line contactor [s]")
    timeline.set_ylabel("armature current [A]", color="#c0392b")
    speed_axis.set_ylabel("speed [rpm]", color="#1f4e79")
    timeline.set_ylim(0.0, 1.15 * max(data["i_peak"], history.i_a.max()))
    speed_axis.set_ylim(0.0, 1.1 * max(result.n_final_rpm, history.n_rpm.max()))
    timeline.set_xlim(0.0, history.t_s[-1])
    timeline.grid(alpha=0.3)
    lines = timeline.get_lines()[:3] + speed_axis.get_lines()[:1]
    timeline.legend(lines, [line.get_label() for line in lines], loc="center left", bbox_to_anchor=(0.01, 0.45), fontsize=8)
    timeline.set_title(
        f"Current and speed in time: {result.notches} notches, acceleration {result.t_accel_s:.2f} s", fontsize=10
    )

    i_top = min(1.3 * data["i_peak"], motor.i_max_a)
    for k, (i, n) in enumerate(_characteristics(motor, data, r_notch, i_top)):
        label = f"notch {k + 1} ({r_notch[k]:.3g} ohm)" if k < result.notches else f"run ({r_notch[k]:.3g} ohm)"
        plane.plot(i, n, color=colours[k], lw=1.2, label=label)
    plane.plot(history.i_a, history.n_rpm, color="black", lw=2.2, label="path of the start")
    plane.plot(result.i_cut_a, result.n_cut_rpm, "o", color="black", ms=4)
    plane.axvline(i_cut, color="#c0392b", ls="--", lw=1.0)
    plane.axvline(data["i_peak"], color="#c0392b", ls=":", lw=1.0)
    plane.set_xlim(0.0, i_top)
    plane.set_ylim(0.0, 1.25 * result.n_final_rpm)
    plane.set_xlabel("armature current [A]")
    plane.set_ylabel("speed [rpm]")
    plane.grid(alpha=0.3)
    plane.legend(fontsize=7, loc="upper right")
    plane.set_title("Speed-current characteristic of each notch", fontsize=10)

    figure.suptitle(f"{case.title}: starting diagram", fontsize=12, fontweight="bold")
    figure.text(0.01, 0.01, "Invented demo data. " + CAUTION, fontsize=7, color="dimgrey", wrap=True)
    figure.tight_layout(rect=(0, 0.05, 1, 0.95))
    output = arguments.output or f"start-{case.key}.png"
    figure.savefig(output, dpi=130)
    plt.close(figure)
    print(f"wrote {output}")
    print(CAUTION)
    return 0
