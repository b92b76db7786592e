"""Benchmark: median time per call, core alone and through the add-in layer.

Run with ``python -m tests.benchmark``; it prints figures and asserts nothing
(speed targets are read off, never tested by timing). Each case is a pair of
zero-argument callables; add yours to ``CASES`` under your subject.
"""

from __future__ import annotations

import statistics
import timeit

import numpy as np

from notchwise.addin import udfs
from notchwise.workbooks.audit import audit_bytes
from notchwise.formulas.dc_motor import SeriesMotor, ShuntMotor, developed_torque_nm, magnetization_curve, steady_speed_rpm
from notchwise.formulas.grading import check_sections, grade_uniform
from notchwise.formulas.protection import ride_through
from notchwise.formulas.relays import CURVES, operate_time_s
from notchwise.formulas.thermal import thermal_element
from notchwise.formulas.start_sim import simulate_start
from notchwise.formulas.worst_case import sweep_corners

CURVE_ROWS = [[0.0, 6.0], [40.0, 62.0], [80.0, 112.0], [120.0, 150.0], [160.0, 178.0], [220.0, 205.0],
              [300.0, 228.0], [400.0, 246.0], [500.0, 258.0]]
CURVE_TABLE = np.array(CURVE_ROWS)
SHUNT = ShuntMotor(0.085, 0.375)


def series_motor() -> SeriesMotor:
    """The hoist motor built from its table, as every cell call does: the curve's fit is core work."""
    return SeriesMotor(0.062, magnetization_curve(CURVE_TABLE[:, 0], CURVE_TABLE[:, 1], 700.0))


#: A chart curve: 1,000 currents from 1.05 to 30 times a 100 A pickup, as a column range.
CURVE_CURRENTS = np.geomspace(105.0, 3000.0, 1000)
CURVE_COLUMN = [[float(i)] for i in CURVE_CURRENTS]
#: A start of 10,000 samples over 10 s: a current-limit start falling 420 -> 290 A on each of five notches, then 120 A.
START_T = np.linspace(0.0, 10.0, 10_000)
START_I = np.where(START_T < 7.5, 420.0 - 130.0 * ((START_T % 1.5) / 1.5), 120.0)
START_ROWS = [[float(t), float(i)] for t, i in zip(START_T, START_I)]
THERMAL = thermal_element(120.0, 1.05, 900.0)

#: name -> (core call, add-in call, target in ms for the core call)
CASES = {
    "grade shunt": (
        lambda: grade_uniform(SHUNT, 460.0, 380.0, 210.0, None, 2.0),
        lambda: udfs.NW_GRADE_SHUNT(460.0, 0.085, 380.0, 210.0, None, 2.0, None),
        1.0,
    ),
    "grade series (curve)": (
        lambda: grade_uniform(series_motor(), 230.0, 420.0, 290.0, None, 2.0),
        lambda: udfs.NW_GRADE_SERIES(230.0, 0.062, 420.0, 290.0, CURVE_ROWS, None, 2.0, None),
        1.0,
    ),
    "check sections (series)": (
        lambda: check_sections(series_motor(), 230.0, [0.19, 0.125, 0.095, 0.07], 290.0, 420.0, 480.0, 2.0),
        lambda: udfs.NW_CHECK_SECTIONS("series", 230.0, 0.062, [[0.19], [0.125], [0.095], [0.07]], 290.0, 420.0,
                                       480.0, CURVE_ROWS, None, None, 2.0, None),
        1.0,
    ),
    "series speed": (
        lambda: steady_speed_rpm(series_motor(), 230.0, 200.0, 0.0, 2.0),
        lambda: udfs.NW_SERIES_SPEED(230.0, 0.062, 200.0, CURVE_ROWS, 700.0, 2.0),
        1.0,
    ),
    "series torque": (
        lambda: developed_torque_nm(series_motor(), 200.0),
        lambda: udfs.NW_SERIES_TORQUE(200.0, CURVE_ROWS, 700.0),
        1.0,
    ),
    "relay curve, 1,000 points": (
        lambda: operate_time_s(CURVES["IEC VI"], CURVE_CURRENTS, 100.0, 0.3),
        lambda: udfs.NW_RELAY_TIME("IEC VI", CURVE_COLUMN, 100.0, 0.3),
        5.0,
    ),
    "ride-through, 10,000 samples": (
        lambda: ride_through(START_T, START_I, CURVES["IEC VI"], 140.0, 1.2, 550.0, 0.0, THERMAL),
        lambda: udfs.NW_RIDE_THROUGH(START_ROWS, "IEC VI", 140.0, 1.2, 550.0, None, 120.0, 1.05, 900.0, None, None),
        5.0,
    ),
}


def _audit_case():
    """Audit of a workbook with 1,000 NW_ cells (tests/workbook_files.py), built once outside the timing."""
    from tests.workbook_files import torque_workbook

    data = torque_workbook([0.4 * (k + 1) for k in range(1000)])
    return lambda: audit_bytes(data)


def _help_case():
    """``notchwise --help`` in a fresh interpreter, as a user starts it (the interpreter's own start included)."""
    import subprocess
    import sys

    command = [sys.executable, "-m", "notchwise.workbooks.cli", "--help"]
    return lambda: subprocess.run(command, capture_output=True, check=True)


#: name -> (zero-argument callable building the timed call, target in s): whole commands, timed once each run.
JOBS = {
    "audit, 1,000 NW_ cells": (_audit_case, 2.0),
    "notchwise --help": (_help_case, 1.0),
}


#: The start in time: a 5-notch shunt start with inductance (closed form), its reference, and a sweep.
START_SECTIONS = grade_uniform(SHUNT, 460.0, 380.0, 210.0, None, 2.0).r_section_ohm
START = dict(motor=SHUNT, v_supply_v=460.0, sections_ohm=START_SECTIONS, l_circuit_h=0.006, inertia_kgm2=14.0,
             load=500.0, i_cut_a=215.0, brush_drop_v=2.0)
SWEEP_POINTS = (10, 10, 10)


def start_section() -> None:
    """Time the 5-notch start against a tight general solve (Radau, rtol 1e-10) and a 1,000-corner sweep."""
    fast = simulate_start(**START)
    reference = simulate_start(**START, method="integrate", rtol=1e-10)
    peak_error = np.max(np.abs(fast.i_peak_a / reference.i_peak_a - 1.0))
    dwell_error = np.max(np.abs(fast.dwell_s / reference.dwell_s - 1.0))
    fast_ms = median_ms(lambda: simulate_start(**START))
    reference_ms = median_ms(lambda: simulate_start(**START, method="integrate", rtol=1e-10), repeat=3)
    general_ms = median_ms(lambda: simulate_start(**START, method="integrate"), repeat=3)
    print()
    print(f"5-notch shunt start, closed form: {fast_ms:.3f} ms median (target 10 ms)")
    print(f"  tight general solve (Radau rtol 1e-10): {reference_ms:.1f} ms, ratio {reference_ms / fast_ms:.0f}x;"
          f" default general solve (rtol 1e-7): {general_ms:.1f} ms")
    print(f"  largest difference from the tight solve: peak current {100 * peak_error:.2e} %,"
          f" dwell {100 * dwell_error:.2e} % (target 0.5 %)")
    motor = series_motor()
    series = dict(motor=motor, v_supply_v=230.0, sections_ohm=grade_uniform(motor, 230.0, 420.0, 290.0, None, 2.0).r_section_ohm,
                  l_circuit_h=0.004, inertia_kgm2=6.5, load=520.0, i_cut_a=301.0, brush_drop_v=2.0)
    series_error = np.max(np.abs(simulate_start(**series).i_peak_a / simulate_start(**series, rtol=1e-10).i_peak_a - 1.0))
    print(f"4-notch series start (magnetization curve, Radau rtol 1e-7): {median_ms(lambda: simulate_start(**series), repeat=3):.1f} ms,"
          f" peak within {100 * series_error:.1e} % of rtol 1e-10")
    arguments = {k: v for k, v in START.items() if k != "sections_ohm"}
    sweep_s = median_ms(lambda: sweep_corners(sections_20c_ohm=START_SECTIONS, hot_c=300.0, points=SWEEP_POINTS,
                                              **arguments), repeat=3) / 1e3
    print(f"worst-case sweep, {np.prod(SWEEP_POINTS)} corners: {sweep_s:.2f} s median (target 2 s)")


def median_ms(call, repeat: int = 7) -> float:
    """Median over ``repeat`` runs of the time per call, in ms."""
    runs = timeit.Timer(call).autorange()[0]
    return statistics.median(t / runs for t in timeit.repeat(call, number=runs, repeat=repeat)) * 1e3


def main() -> None:
    print(f"{'case':32s} {'core ms':>9s} {'add-in ms':>10s} {'layer adds µs':>14s} {'target ms':>10s}")
    for name, (core, cell, target) in CASES.items():
        core_ms, cell_ms = median_ms(core), median_ms(cell)
        print(f"{name:32s} {core_ms:9.4f} {cell_ms:10.4f} {1e3 * (cell_ms - core_ms):14.1f} {target:10.2f}")
    print(f"\n{'job':32s} {'median s':>9s} {'target s':>10s}")
    for name, (make, target) in JOBS.items():
        job = make()
        seconds = statistics.median(timeit.repeat(job, number=1, repeat=5))
        print(f"{name:32s} {seconds:9.3f} {target:10.2f}")
    start_section()


if __name__ == "__main__":
    main()
