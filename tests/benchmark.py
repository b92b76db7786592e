"""Benchmark: median time per call, core alone and through the add-in layer.

Run with ``python -m tests.benchmark``; it prints figures and asserts nothing
(speed targets are read off, never tested by timing). Each case is a pair of
zero-argument callables; add yours to ``CASES`` under your subject.
"""

from __future__ import annotations

import os
import statistics
import timeit

import numpy as np
from scipy.integrate import solve_ivp

from notchwise.addin import udfs
from notchwise.workbooks.audit import audit_bytes
from notchwise.formulas.dc_motor import (NM_PER_V_A_PER_RPM, CompoundMotor, SeriesMotor, ShuntMotor, developed_torque_nm,
                                         magnetization_curve, steady_speed_rpm)
from notchwise.formulas.grading import check_sections, grade_uniform, notch_resistances_ohm
from notchwise.formulas.protection import ride_through
from notchwise.formulas.relays import CURVES, operate_time_s
from notchwise.formulas.thermal import thermal_element
from notchwise.formulas.start_sim import load_torque, simulate_start
from notchwise.formulas.induction_motor import WoundRotorMotor, check_rotor, grade_rotor
from notchwise.formulas.rotor_start import simulate_rotor_start
from notchwise.formulas.braking import simulate_stop
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
#: The two motors above as name/value blocks, for the stop through the add-in.
STOP_SHUNT_CELLS = [["kind", "shunt"], ["v_supply", 460.0], ["r_motor", 0.085], ["l_circuit", 0.006],
                    ["inertia", 14.0], ["k_phi", 0.375]]
STOP_SERIES_CELLS = [["kind", "series"], ["v_supply", 230.0], ["r_motor", 0.062], ["l_circuit", 0.004],
                     ["inertia", 6.5], ["mag_speed", 700.0], ["brush_drop", 2.0]]
#: The Caldbeck Quarry ball-mill motor (invented): its block as cells, and the machine built from it.
ROTOR_ROWS = [["kind", "wound rotor"], ["v_line", 690.0], ["frequency", 50.0], ["poles", 6], ["r_stator", 0.02],
              ["x_stator", 0.12], ["x_magnetizing", 4.0], ["r_rotor", 0.025], ["x_rotor", 0.13], ["e_rotor", 750.0],
              ["inertia", 60.0]]
ROTOR = WoundRotorMotor(0.02, 0.12, 4.0, 0.025, 0.13, 690.0, 50.0, 6, 750.0, 60.0)
ROTOR_SECTIONS = grade_rotor(ROTOR, 6000.0, 3500.0).r_section_ohm

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
    "grade rotor (wound rotor)": (
        lambda: grade_rotor(WoundRotorMotor(0.02, 0.12, 4.0, 0.025, 0.13, 690.0, 50.0, 6, 750.0, 60.0), 6000.0, 3500.0),
        lambda: udfs.NW_GRADE_ROTOR(ROTOR_ROWS, 6000.0, 3500.0, None, None),
        1.0,
    ),
    "check rotor sections": (
        lambda: check_rotor(ROTOR, ROTOR_SECTIONS, 3500.0, 6500.0, 700.0),
        lambda: udfs.NW_CHECK_ROTOR(ROTOR_ROWS, [[float(r)] for r in ROTOR_SECTIONS], 3500.0, 6500.0, 700.0, None),
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
    "stop, shunt (constant flux)": (
        lambda: simulate_stop(SHUNT, 460.0, 1.1, "dynamic", 0.006, 14.0, 500.0, 1150.0),
        lambda: udfs.NW_STOP_SIM(STOP_SHUNT_CELLS, 1.1, "dynamic", 500.0, 1150.0, None, None, None, None),
        2.0,
    ),
    "stop, series (curve)": (
        lambda: simulate_stop(series_motor(), 230.0, 0.8, "dynamic", 0.004, 6.5, 520.0, 900.0, 0.0, 2.0),
        lambda: udfs.NW_STOP_SIM(STOP_SERIES_CELLS, 0.8, "dynamic", 520.0, 900.0, None, CURVE_ROWS, None, None),
        10.0,
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


def _audit_reference():
    """Audit of the committed reference workbook (50 NW_ cells, 11 simulated starts), read once outside the timing."""
    from pathlib import Path

    data = (Path(__file__).resolve().parents[1] / "workbooks" / "notchwise-reference.xlsx").read_bytes()
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
    "audit, reference workbook": (_audit_reference, 12.0),  # issue 12 measured 7-12 s
    "notchwise --help": (_help_case, 1.0),
}


#: The start in time: a 5-notch shunt start with inductance (closed form), its reference, and a sweep.
START_SECTIONS = grade_uniform(SHUNT, 460.0, 380.0, 210.0, None, 2.0).r_section_ohm
START = dict(motor=SHUNT, v_supply_v=460.0, sections_ohm=START_SECTIONS, l_circuit_h=0.006, inertia_kgm2=14.0,
             load=500.0, i_cut_a=215.0, brush_drop_v=2.0)
SWEEP_POINTS = (10, 10, 10)


def start_section() -> None:
    """Time the 5-notch shunt start (closed form) against a plain LSODA solve, and its 1,000-corner sweep."""
    fast = simulate_start(**START)
    reference = simulate_start(**START, method="integrate", rtol=1e-10)
    peak_error = np.max(np.abs(fast.i_peak_a / reference.i_peak_a - 1.0))
    dwell_error = np.max(np.abs(fast.dwell_s / reference.dwell_s - 1.0))
    fast_ms = median_ms(lambda: simulate_start(**START))
    lsoda_ms = median_ms(lambda: plain_lsoda_start(**START), repeat=3)
    general_ms = median_ms(lambda: simulate_start(**START, method="integrate"), repeat=3)
    print()
    print(f"5-notch shunt start, closed form: {fast_ms:.3f} ms median (target 10 ms, no slower than before);"
          f" ratio to a plain LSODA rtol 1e-9 solve ({lsoda_ms:.1f} ms) {fast_ms / lsoda_ms:.4f};"
          f" the general solver (Radau rtol 1e-7): {general_ms:.1f} ms")
    print(f"  largest difference from Radau at rtol 1e-10: peak current {100 * peak_error:.2e} %,"
          f" dwell {100 * dwell_error:.2e} % (target 0.5 %)")
    arguments = {k: v for k, v in START.items() if k != "sections_ohm"}
    sweep_s = median_ms(lambda: sweep_corners(sections_20c_ohm=START_SECTIONS, hot_c=300.0, points=SWEEP_POINTS,
                                              **arguments), repeat=3) / 1e3
    print(f"shunt worst-case sweep, {np.prod(SWEEP_POINTS)} corners: {sweep_s:.2f} s median (target 2 s); ratio to"
          f" 1,000 plain LSODA rtol 1e-9 starts ({lsoda_ms:.1f} s) {sweep_s / lsoda_ms:.4f}")


def plain_lsoda_stop(motor, v_supply_v, r_brake_ohm, mode, l_circuit_h, inertia_kgm2, load, n_start_rpm, n_end_rpm,
                     brush_drop_v=0.0):
    """The same stop as a plain tight solve (solve_ivp LSODA, rtol 1e-9), written with no care for speed.

    Constant load only (the benchmark's cases); the current of dynamic braking does not reverse.
    """
    c1 = NM_PER_V_A_PER_RPM
    v_loop = -brush_drop_v if mode == "dynamic" else v_supply_v - brush_drop_v
    r = motor.r_ohm + r_brake_ohm
    top = motor.i_max_a

    def rhs(t, state):
        i, n = state[0], state[1]
        flux = float(motor.k_phi(min(abs(i), top)))
        di = (v_loop + flux * n - r * i) / l_circuit_h
        if mode == "dynamic" and i <= 0.0 and di < 0.0:
            di = 0.0
        return [di, c1 * (-c1 * flux * i - load) / inertia_kgm2, i * i]

    def reaches_end(t, state):
        return state[1] - n_end_rpm

    reaches_end.terminal, reaches_end.direction = True, -1.0
    solution = solve_ivp(rhs, (0.0, 600.0), [0.0, n_start_rpm, 0.0], method="LSODA", rtol=1e-9, atol=1e-9,
                         events=reaches_end)
    return float(solution.t[-1]), float(solution.y[2, -1])


#: The stops of CASES as (motor builder, arguments of simulate_stop after the motor).
STOPS = {
    "constant flux": (lambda: SHUNT, (460.0, 1.1, "dynamic", 0.006, 14.0, 500.0, 1150.0, 0.0, 0.0), 2.0),
    "curve": (series_motor, (230.0, 0.8, "dynamic", 0.004, 6.5, 520.0, 900.0, 0.0, 2.0), 10.0),
}


def stop_section() -> None:
    """The braking stop (RODAS3 on plain floats) beside a plain LSODA rtol 1e-9 solve of the same stop."""
    print()
    for name, (build, arguments, target) in STOPS.items():
        fast = simulate_stop(build(), *arguments)
        t_ref, i2t_ref = plain_lsoda_stop(build(), *arguments)
        fast_ms = median_ms(lambda: simulate_stop(build(), *arguments))
        lsoda_ms = median_ms(lambda: plain_lsoda_stop(build(), *arguments), repeat=3)
        i2t = (fast.energy_brake_j + fast.energy_motor_j) / (build().r_ohm + arguments[1])
        print(f"stop, {name}: {fast_ms:.2f} ms median (target {target:g} ms); ratio to a plain LSODA rtol 1e-9 solve"
              f" ({lsoda_ms:.1f} ms) {fast_ms / lsoda_ms:.3f}; stop time within {100 * abs(fast.t_stop_s / t_ref - 1):.1e} %,"
              f" i²t within {100 * abs(i2t / i2t_ref - 1):.1e} %")


def ride_through_section() -> None:
    """The add-in layer's cost on NW_RIDE_THROUGH over 10,000 samples, beside the core call."""
    core, cell, _ = CASES["ride-through, 10,000 samples"]
    core_ms, cell_ms = median_ms(core), median_ms(cell)
    print(f"\nride-through, 10,000 samples: the add-in layer adds {cell_ms - core_ms:.2f} ms (target 2 ms) to the core's"
          f" {core_ms:.2f} ms; ratio layer/core {(cell_ms - core_ms) / core_ms:.2f}")


def plain_lsoda_rotor_start(load, i_cut_a=None, dwell_s=None):
    """The ball-mill start as a plain tight solve (solve_ivp LSODA, rtol 1e-9) of J dw/dt = T(s) - T_L, with no care for speed.

    Each step ends on the rotor-current event (current limit) or after its dwell (definite time).
    """
    r_total = ROTOR.r_rotor_side_ohm + np.cumsum(ROTOR_SECTIONS[::-1])[::-1]
    torque = load_torque(load)
    omega_s, w, out = ROTOR.omega_sync_rad_s, 0.0, []
    for k, r in enumerate(r_total):
        r_ref = float(ROTOR.to_stator_side_ohm(r))

        def rhs(t, y):
            s = 1.0 - y[0] / omega_s
            return [(float(ROTOR.torque_at_slip_nm(s, r_ref)) - float(torque.at(y[0] * 30.0 / np.pi))) / ROTOR.inertia_kgm2]

        def falls(t, y):
            return float(ROTOR.currents(1.0 - y[0] / omega_s, r_ref).rotor_a) - i_cut_a

        falls.terminal, falls.direction = True, -1.0
        span = 60.0 if dwell_s is None else dwell_s[k]
        solution = solve_ivp(rhs, (0.0, span), [w], method="LSODA", rtol=1e-9, atol=1e-9,
                             events=falls if dwell_s is None else None)
        w = float(solution.y[0, -1])
        out.append((solution.t[-1], w))
    return out


def rotor_start_section() -> None:
    """Time the 5-step start of the Caldbeck Quarry ball-mill motor (quasi-steady, Gauss-Legendre)."""
    table = [[0.0, 800.0], [300.0, 900.0], [700.0, 1500.0], [1000.0, 2200.0]]
    cases = {
        "current limit, constant load": dict(load=1000.0, i_cut_a=330.0),
        "current limit, load table": dict(load=table, i_cut_a=330.0),
        "definite time, load table": dict(load=table, dwell_s=[0.9, 0.5, 0.3, 0.2, 0.15]),
    }
    print()
    for name, arguments in cases.items():
        ms = median_ms(lambda: simulate_rotor_start(ROTOR, ROTOR_SECTIONS, **arguments))
        lsoda_ms = median_ms(lambda: plain_lsoda_rotor_start(**arguments), repeat=3)
        print(f"5-step rotor start, {name}: {ms:.3f} ms median (target 2 ms); ratio to a plain LSODA rtol 1e-9 solve"
              f" ({lsoda_ms:.1f} ms) {ms / lsoda_ms:.3f}")
    sections = [[float(r)] for r in ROTOR_SECTIONS]
    ms = median_ms(lambda: udfs.NW_START_SIM(ROTOR_ROWS, sections, 1000.0, 330.0, None, None))
    print(f"5-step rotor start through NW_START_SIM: {ms:.3f} ms median (target 2 ms)")
    for name, load in (("constant load", 1000.0), ("load table", table)):
        sweep_s = median_ms(lambda: sweep_corners(ROTOR, 690.0, ROTOR_SECTIONS, None, 60.0, load, -0.1, 0.1, 0.05,
                                                  "AISI 304", 20.0, 300.0, (10, 10, 10), i_cut_a=330.0), repeat=3) / 1e3
        print(f"wound-rotor worst case, 1000 corners, {name}: {sweep_s:.2f} s median (target 2 s)")


def compound_motor() -> CompoundMotor:
    """An invented compound motor: the hoist's curve read against ampere-turns per pole (x10), 1,200 shunt AT, 8 series turns."""
    return CompoundMotor(0.062, magnetization_curve(CURVE_TABLE[:, 0] * 10.0, CURVE_TABLE[:, 1], 700.0, "ampere-turns"),
                         1200.0, 8.0)


def plain_lsoda_start(motor, v_supply_v, sections_ohm, l_circuit_h, inertia_kgm2, load, i_cut_a, brush_drop_v=0.0):
    """The same start as a plain tight solve (solve_ivp LSODA, rtol 1e-9), written with no care for speed.

    The shaft is held at rest while the load out-pulls the motor; each notch ends on the cut-out event.
    """
    v_eff = v_supply_v - brush_drop_v
    c1 = NM_PER_V_A_PER_RPM
    torque = load_torque(load)
    y, out = [0.0, 0.0, 0.0], []
    for r in notch_resistances_ohm(motor.r_ohm, np.asarray(sections_ohm, dtype=float))[:-1]:
        def rhs(t, state):
            i, n = state[0], state[1]
            flux = float(motor.k_phi(max(i, 0.0)))
            dn = c1 * (c1 * flux * i - float(torque.at(n))) / inertia_kgm2
            return [(v_eff - r * i - flux * n) / l_circuit_h, 0.0 if n <= 0.0 and dn < 0.0 else dn, i * i]

        def falls(t, state):
            return state[0] - i_cut_a

        falls.terminal, falls.direction = True, -1.0
        solution = solve_ivp(rhs, (0.0, 60.0), y, method="LSODA", rtol=1e-9, atol=1e-9, events=falls)
        y = [float(solution.y[0, -1]), float(solution.y[1, -1]), 0.0]
        out.append((solution.t[-1], float(np.max(solution.y[0])), float(solution.y[2, -1])))
    return out


def fast_start_section() -> None:
    """Series and compound 4-notch starts (simulate_start: the fast integrator), beside a plain LSODA rtol 1e-9 solve."""
    today = {}
    for name, motor in (("series", series_motor()), ("compound", compound_motor())):
        case = dict(motor=motor, v_supply_v=230.0, sections_ohm=grade_uniform(motor, 230.0, 420.0, 290.0, None, 2.0).r_section_ohm,
                    l_circuit_h=0.004, inertia_kgm2=6.5, load=520.0, i_cut_a=301.0, brush_drop_v=2.0)
        fast = simulate_start(**case)
        tight = simulate_start(**case, method="integrate", rtol=1e-10)
        errors = {key: np.max(np.abs(np.atleast_1d(getattr(fast, key)) / np.atleast_1d(getattr(tight, key)) - 1.0))
                  for key in ("i_peak_a", "dwell_s", "i2t_a2s", "work_load_j", "i_peak_run_a", "t_accel_s")}
        fast_ms = today[name] = median_ms(lambda: simulate_start(**case))
        lsoda_ms = median_ms(lambda: plain_lsoda_start(**case), repeat=3)
        radau_ms = median_ms(lambda: simulate_start(**case, method="integrate"), repeat=3)
        print(f"4-notch {name} start (simulate_start, RODAS3 rtol 2e-5): {fast_ms:.2f} ms median (target 5 ms);"
              f" ratio to a plain LSODA rtol 1e-9 solve ({lsoda_ms:.0f} ms) {fast_ms / lsoda_ms:.3f} (target 0.03);"
              f" the general solver (Radau rtol 1e-7, method='integrate') {radau_ms:.0f} ms")
        print("  largest difference from the general solver at rtol 1e-10: "
              + ", ".join(f"{key} {100 * value:.1e} %" for key, value in errors.items()) + " (target 0.05 %)")
    motor = series_motor()
    hoist = dict(motor=motor, v_supply_v=230.0, sections_20c_ohm=grade_uniform(motor, 230.0, 420.0, 290.0, None, 2.0).r_section_ohm,
                 l_circuit_h=0.004, inertia_kgm2=6.5, load=520.0, i_cut_a=301.0, brush_drop_v=2.0, hot_c=300.0,
                 points=(10, 10, 10))
    started = timeit.default_timer()
    sweep = sweep_corners(**hoist)
    sweep_s = timeit.default_timer() - started
    lsoda_s = median_ms(lambda: plain_lsoda_start(**{k: v for k, v in hoist.items()
                                                      if k not in ("sections_20c_ohm", "hot_c", "points")},
                                                   sections_ohm=hoist["sections_20c_ohm"]), repeat=3)
    print(f"series hoist worst case over 1,000 corners (sweep_corners): {sweep_s:.2f} s (target 5 s), ratio to"
          f" 1,000 plain LSODA rtol 1e-9 starts ({lsoda_s:.1f} s) {sweep_s / lsoda_s:.3f}; {sweep.stalls} corners"
          f" stall, highest peak {sweep.i_peak_a[sweep.worst_peak]:.1f} A")


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
    rotor_start_section()
    fast_start_section()
    stop_section()
    ride_through_section()
    print(f"\nload average (1, 5, 15 min) at the end: {', '.join(f'{x:.2f}' for x in os.getloadavg())}")


if __name__ == "__main__":
    main()
