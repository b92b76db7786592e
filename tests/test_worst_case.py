"""Checks of the worst-case sweep against corner-by-corner simulation and the stall criterion."""

from __future__ import annotations

import numpy as np
import pytest

from notchwise.formulas.errors import DesignError, InputError
from notchwise.formulas.resistors import ALLOYS
from notchwise.formulas.start_sim import simulate_start
from notchwise.formulas.worst_case import sweep_corners
from tests.conftest import TEST_SECTIONS_OHM, TEST_SHUNT

MOTOR = TEST_SHUNT
SECTIONS = np.array(TEST_SECTIONS_OHM)
RISING_LOAD = [[0.0, 250.0], [600.0, 450.0], [1200.0, 700.0]]  # a load stiffening with speed


def test_every_corner_equals_a_start_with_resistances_from_the_alloy_law():
    # R = R20 (1 + tolerance) (1 + alpha (theta - 20)): ASM Handbook vol. 2, 10th ed., linear law; from memory
    sweep = sweep_corners(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, -0.1, 0.1, 0.05, "AISI 304", 20.0, 200.0,
                          (3, 2, 2), i_cut_a=170.0, brush_drop_v=2.0)
    alpha = ALLOYS["AISI 304"].alpha_per_k
    peaks = []
    for c in range(sweep.v_supply_v.size):
        r = SECTIONS * (1.0 + sweep.tolerance[c]) * (1.0 + alpha * (sweep.temperature_c[c] - 20.0))
        one = simulate_start(MOTOR, sweep.v_supply_v[c], r, 0.01, 5.0, 300.0, i_cut_a=170.0, brush_drop_v=2.0)
        peaks.append(max(one.i_peak_a.max(), one.i_peak_run_a))
    assert np.allclose(sweep.i_peak_a, peaks, rtol=1e-12)
    assert sweep.worst_peak == int(np.argmax(peaks))


def test_vectorised_stall_criterion_agrees_with_the_simulation_corner_by_corner():
    sweep = sweep_corners(MOTOR, 440.0, SECTIONS, 0.01, 5.0, RISING_LOAD, -0.3, 0.1, 0.1, "AISI 304", 20.0, 300.0,
                          (4, 3, 2), i_cut_a=170.0, brush_drop_v=2.0)
    assert 0 < sweep.stalls < sweep.v_supply_v.size, "the case must have both stalling and running corners"
    alpha = ALLOYS["AISI 304"].alpha_per_k
    for c in range(sweep.v_supply_v.size):
        r = SECTIONS * (1.0 + sweep.tolerance[c]) * (1.0 + alpha * (sweep.temperature_c[c] - 20.0))
        try:
            simulate_start(MOTOR, sweep.v_supply_v[c], r, 0.01, 5.0, RISING_LOAD, i_cut_a=170.0, brush_drop_v=2.0)
            stalled = False
        except DesignError:
            stalled = True
        assert stalled == (sweep.margin[c] <= 0.0)
        assert stalled == np.isnan(sweep.i_peak_a[c])


def test_definite_time_margin_from_the_simulated_cut():
    sweep = sweep_corners(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, points=(2, 1, 1), dwell_s=[0.5, 0.4, 0.3],
                          brush_drop_v=2.0)  # one point on the other axes: nominal resistance at 20 °C
    one = simulate_start(MOTOR, 396.0, SECTIONS, 0.01, 5.0, 300.0, dwell_s=[0.5, 0.4, 0.3], brush_drop_v=2.0)
    t_motor = 60.0 / (2.0 * np.pi) * 0.4 * one.i_cut_a
    assert sweep.margin[0] == pytest.approx(np.min((t_motor - 300.0) / t_motor), rel=1e-12)


@pytest.mark.parametrize(
    "change, words",
    [
        ({"v_low": 0.2, "v_high": 0.1}, "must run from low to high"),
        ({"tolerance": 0.7}, "tolerance (0.7) must be at most 0.5"),
        ({"hot_c": 0.0}, "must not be below ambient"),
        ({"points": (100, 100, 100)}, "at most 20000"),
        ({"points": (0, 1, 1)}, "points supply (0) must be from 1 to 100"),
        ({"alloy": "lead"}, "alloy ('lead') must be one of"),
    ],
)
def test_bad_inputs_give_messages(change, words):
    arguments = dict(motor=MOTOR, v_supply_v=440.0, sections_20c_ohm=SECTIONS, l_circuit_h=0.01, inertia_kgm2=5.0,
                     load=300.0, i_cut_a=200.0, brush_drop_v=2.0)
    arguments.update(change)
    with pytest.raises((InputError, DesignError)) as error:
        sweep_corners(**arguments)
    assert words in str(error.value)


def test_a_runaway_corner_is_kept_as_a_runaway_and_gives_no_margin():
    # A series curve through the origin (no residual flux) against no load: every corner runs away
    # (Fitzgerald, Kingsley, Umans, Electric Machinery, 6th ed., 2003, sec. 7.6: never run a series motor unloaded).
    from notchwise.addin.dynamics import worst_case_rows
    from notchwise.formulas.dc_motor import SeriesMotor, magnetization_curve

    bare = SeriesMotor(0.07, magnetization_curve([0, 50, 100, 200, 400, 600], [0, 70, 125, 192, 245, 265], 600.0))
    sweep = sweep_corners(bare, 440.0, SECTIONS, 0.01, 5.0, 0.0, points=(2, 1, 1), i_cut_a=200.0)
    assert set(sweep.status) == {"runs away"} and sweep.stalls == 0
    assert sweep.worst_margin == -1 and sweep.worst_peak == -1
    assert np.all(np.isnan(sweep.margin))
    with pytest.raises(DesignError, match="runs away"):
        simulate_start(bare, 440.0, SECTIONS, 0.01, 5.0, 0.0, i_cut_a=200.0)
    rows = worst_case_rows(sweep)
    assert rows[0][0] == "RUNAWAY [-]" and "runs away" in rows[0][1]
    assert ["smallest cut-out margin [-]", "no corner ran: no margin"] == rows[2][:2]
    assert ["corners that run away [-]", 2] == [r[:2] for r in rows if r[0].startswith("corners that run away")][0]


def test_every_corner_carries_its_status_and_reason():
    sweep = sweep_corners(MOTOR, 440.0, SECTIONS, 0.01, 5.0, RISING_LOAD, -0.3, 0.1, 0.1, "AISI 304", 20.0, 300.0,
                          (4, 3, 2), i_cut_a=170.0, brush_drop_v=2.0)
    for status, reason, peak in zip(sweep.status, sweep.reason, sweep.i_peak_a):
        assert (status == "ran") == np.isfinite(peak) == (reason == "")
    assert sweep.status[sweep.worst_margin] == "ran" and sweep.margin[sweep.worst_margin] > 0.0
