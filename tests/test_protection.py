"""Ride-through checks, setting proposals and upstream coordination.

Sources: the closed forms of the elements (IEC 60255-151:2009 Table 1, IEEE C37.112-1996 operate
and integral equations, IEC 60255-149 thermal model); the rule that progress along a fixed history
scales as 1/multiplier follows from the same equations (operate and reset times are both
proportional to the multiplier). The margins' defaults are common practice, no source; the
service factor default follows NFPA 70 (NEC) 430.32(A)(1) (from memory); the CTI default follows
IEEE Std 242-2001 ch. 15 (from memory).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from notchwise.addin import udfs
from notchwise.formulas.errors import DesignError, InputError, InputTypeError
from notchwise.formulas.protection import START_MARGIN, STALL_MARGIN, coordinate_upstream, propose_settings, ride_through
from notchwise.formulas.relays import CURVES, operate_progress, operate_time_s
from notchwise.formulas.thermal import thermal_element, thermal_trip_time_s

VI = CURVES["IEC VI"]
THERMAL = thermal_element(100.0, 1.05, 900.0)


def constant(i_a, duration_s, samples=201):
    t = np.linspace(0.0, duration_s, samples)
    return t, np.full(samples, i_a)


@settings(max_examples=100, deadline=None)
@given(m=st.floats(1.1, 20.0), dial=st.floats(0.05, 2.0), share=st.floats(0.05, 0.95), name=st.sampled_from(sorted(CURVES)))
def test_constant_current_reaches_the_fraction_the_closed_form_predicts(m, dial, share, name):
    curve = CURVES[name]
    duration = share * float(operate_time_s(curve, 100.0 * m, 100.0, dial))
    checks = ride_through(*constant(100.0 * m, duration), curve, 100.0, dial)
    assert checks[0].peak == pytest.approx(share, rel=1e-9)  # duration / t(I), IEEE C37.112 integral equation
    assert checks[0].margin == pytest.approx(1.0 - share, rel=1e-9, abs=1e-12)
    assert checks[0].trip_s is None and checks[0].verdict.startswith("rides through")


def test_thermal_level_along_a_constant_start_is_the_closed_form():
    checks = ride_through(*constant(300.0, 20.0), VI, 120.0, 1.0, thermal=THERMAL, i_prior_a=60.0)
    settle, start = (300.0 / 105.0) ** 2, (60.0 / 105.0) ** 2
    assert checks[-1].peak == pytest.approx(settle + (start - settle) * math.exp(-20.0 / 900.0), rel=1e-12)
    assert "hot start" in checks[-1].basis


def test_a_start_that_would_trip_is_reported_as_tripping():
    t_op = float(operate_time_s(VI, 400.0, 100.0, 0.2))
    checks = ride_through(*constant(400.0, 3.0 * t_op), VI, 100.0, 0.2, highset_a=350.0)
    assert checks[0].verdict == f"TRIPS at {t_op:.4g} s" and checks[0].margin < 0.0
    assert checks[0].trip_s == pytest.approx(t_op, rel=1e-12)
    assert checks[1].verdict.startswith("TRIPS at 0 s")  # instantaneous high-set below the start current


def test_thermal_element_that_trips_during_a_long_stall():
    t_trip = float(thermal_trip_time_s(THERMAL, 400.0))
    checks = ride_through(*constant(400.0, 2.0 * t_trip, 2001), VI, 100.0, 50.0, thermal=THERMAL)
    assert checks[-1].trip_s == pytest.approx(t_trip, rel=1e-10)


def test_definite_time_high_set_rides_a_short_peak():
    t, i = [0.0, 0.08, 0.08, 5.0], [900.0, 900.0, 300.0, 300.0]
    checks = ride_through(t, i, VI, 100.0, 1.0, highset_a=800.0, highset_delay_s=0.1)
    assert checks[1].peak == pytest.approx(0.8) and checks[1].trip_s is None


# --- proposals -------------------------------------------------------------------------------

def test_proposal_for_a_constant_start_matches_the_closed_form():
    t, i = constant(400.0, 5.0)
    figures = {f.name: f for f in propose_settings(t, i, VI, 100.0, 400.0, 60.0)}
    pickup = 100.0 * 1.15
    assert figures["overload pickup"].value == pytest.approx(pickup)
    assert figures["high-set pickup"].value == pytest.approx(400.0 * 1.3)
    at_one = float(operate_time_s(VI, 400.0, pickup, 1.0))  # 13.5 / (400/115 - 1)
    least = 5.0 / at_one * (1.0 + START_MARGIN)
    assert figures["multiplier"].value == pytest.approx(math.ceil(least / 0.01) * 0.01)
    assert figures["stall cleared in"].value == pytest.approx(figures["multiplier"].value * at_one)
    assert figures["largest multiplier for the stall"].value == pytest.approx(60.0 / ((1.0 + STALL_MARGIN) * at_one))
    assert all(f.basis for f in figures.values())


@settings(max_examples=60, deadline=None)
@given(
    peak=st.floats(200.0, 600.0),
    dip=st.floats(0.5, 0.9),
    notches=st.integers(1, 6),
    name=st.sampled_from(sorted(CURVES)),
)
def test_proposed_multiplier_rides_through_with_margin_and_is_the_least_that_does(peak, dip, notches, name):
    curve = CURVES[name]
    t = np.repeat(np.arange(notches + 1) * 1.5, 2)[1:-1]
    i = np.tile([peak, dip * peak], notches)
    try:
        figures = {f.name: f.value for f in propose_settings(t, i, curve, 100.0, peak, 300.0)}
    except DesignError:
        return
    m = figures["multiplier"]
    reached = ride_through(t, i, curve, figures["overload pickup"], m)[0].peak  # a second path through the elements
    assert reached <= 1.0 / (1.0 + START_MARGIN) + 1e-12
    if m > 0.01 + 1e-12:
        assert operate_progress(curve, t, i, figures["overload pickup"], m - 0.01).peak > 1.0 / (1.0 + START_MARGIN)
    assert figures["stall cleared in"] <= 300.0 / (1.0 + STALL_MARGIN) + 1e-9


def test_no_multiplier_serves_a_long_start_and_a_weak_motor():
    with pytest.raises(DesignError, match="no multiplier of IEC VI both rides through"):
        propose_settings(*constant(400.0, 30.0), VI, 100.0, 400.0, 5.0)


def test_stall_current_at_or_below_pickup_cannot_be_cleared():
    with pytest.raises(DesignError, match="never clear a stall"):
        propose_settings(*constant(400.0, 3.0), VI, 100.0, 110.0, 30.0)


# --- coordination ----------------------------------------------------------------------------

def test_upstream_multiplier_gives_the_downstream_time_plus_cti():
    figures = coordinate_upstream(CURVES["IEC SI"], 400.0, VI, 115.0, 0.5, 3000.0, cti_s=0.3)
    t_down = float(operate_time_s(VI, 3000.0, 115.0, 0.5))
    assert figures[0].value == pytest.approx(t_down)
    m_up = figures[2].value
    assert operate_time_s(CURVES["IEC SI"], 3000.0, 400.0, m_up) == pytest.approx(t_down + 0.3, rel=1e-12)


def test_high_set_sets_the_downstream_time_when_faster():
    figures = coordinate_upstream(CURVES["IEC SI"], 400.0, VI, 115.0, 0.5, 3000.0, 0.25, 900.0, 0.05)
    assert figures[0].value == 0.05 and figures[1].value == pytest.approx(0.3)


def test_coordination_where_nothing_operates():
    with pytest.raises(DesignError, match="the upstream relay does not operate, there is nothing to grade"):
        coordinate_upstream(CURVES["IEC SI"], 150.0, VI, 115.0, 0.5, 100.0)


def test_an_upstream_pickup_below_the_motor_pickup_cannot_grade():
    with pytest.raises(DesignError, match="upstream relay operates alone"):
        coordinate_upstream(CURVES["IEC SI"], 50.0, VI, 115.0, 0.5, 1000.0)


# --- bad inputs ------------------------------------------------------------------------------

@pytest.mark.parametrize(
    "call, words",
    [
        (lambda: ride_through([0.0, 1.0], [200.0, 200.0], VI, 0.0, 1.0), "pickup (0 A) must be above zero"),
        (lambda: ride_through([0.0, 1.0], [200.0, 200.0], VI, 100.0, -1.0), "multiplier (-1) must be above zero"),
        (lambda: ride_through([0.0, 1.0], [200.0, -2.0], VI, 100.0, 1.0), "history current (-2 A) must not be negative"),
        (lambda: ride_through([1.0, 0.0], [200.0, 200.0], VI, 100.0, 1.0), "times must not fall"),
        (lambda: ride_through([0.0, 1.0], [200.0, 200.0], VI, 100.0, 1.0, 500.0, -1.0), "highset_delay (-1 s)"),
        (lambda: ride_through([0.0, 1.0], [200.0, 200.0], VI, 100.0, 1.0, thermal=THERMAL, i_prior_a=200.0), "already tripped"),
        (lambda: propose_settings([0.0, 1.0], [200.0, 200.0], VI, 0.0, 300.0, 10.0), "i_full_load (0 A)"),
        (lambda: propose_settings([0.0, 1.0], [200.0, 200.0], VI, 100.0, 300.0, 10.0, start_margin=-0.1), "start_margin (-0.1)"),
        (lambda: propose_settings([0.0, 1.0], [200.0, 200.0], VI, 100.0, 300.0, 10.0, multiplier_step=0.0), "multiplier_step (0)"),
        (lambda: propose_settings([0.0, 1.0], [200.0, 200.0], VI, 100.0, 300.0, 10.0, multiplier_step=1e-300), "must be from 0.0001 to 1"),
        (lambda: propose_settings([0.0, 5e3], [200.0, 200.0], VI, 1e-300, 300.0, 10.0, multiplier_step=1e-4), "no multiplier of IEC VI"),
        (lambda: ride_through([0.0, 1.0], [200.0, 200.0], VI, 100.0, 1.0, thermal=thermal_element(1e-10, 1.0, 60.0)), "check i_base"),
        (lambda: coordinate_upstream(VI, 100.0, VI, 100.0, 1.0, 500.0, cti_s=0.0), "cti (0 s) must be above zero"),
        (lambda: coordinate_upstream(VI, 100.0, VI, 100.0, 1.0, "x"), "i_max ('x') is not a number"),
    ],
)
def test_bad_input_gives_a_message(call, words):
    with pytest.raises((InputError, InputTypeError, DesignError)) as error:
        call()
    assert words in str(error.value)


START = [["time s", "current A"], [0.0, 420.0], [2.0, 300.0], [2.0, 420.0], [4.0, 300.0], [4.0, 120.0], [8.0, 120.0]]


def test_cell_ride_through_table_shows_basis_and_verdict():
    rows = udfs.NW_RIDE_THROUGH(START, "IEC VI", 140.0, 1.0, 600.0, None, 120.0, 1.05, 900.0, None, None)
    assert rows[0] == ["element", "largest fraction of trip [-]", "at time [s]", "margin [-]", "verdict", "basis"]
    assert len(rows) == 5 and all(row[5] for row in rows[1:])
    assert rows[-1][0] == "caution" and "competent person" in rows[-1][5]


def test_cell_proposal_ends_with_the_caution():
    rows = udfs.NW_PROPOSE_SETTINGS(START, "IEC VI", 120.0, 420.0, 30.0)
    assert rows[0] == ["figure", "value", "unit", "basis"]
    assert rows[-1][0] == "caution" and "competent person" in rows[-1][3]


@pytest.mark.parametrize(
    "history, words",
    [
        ([[0.0, 420.0]], "history has 1 rows of numbers; at least 2 are needed"),
        ([[0.0, 420.0], [1.0, "x"]], "history row 2 current ('x') is not a number in A"),
        ([[0.0, 420.0], [None, 300.0]], "history row 2 time is empty"),
        ([[0.0], [1.0]], "history needs 2 columns"),
    ],
)
def test_cell_bad_history_gives_a_message(history, words):
    result = udfs.NW_RIDE_THROUGH(history, "IEC VI", 140.0, 1.0)
    assert result.startswith("Error: ") and words in result, result



def _long_start(columns: int) -> list:
    """A 10,000-sample start under its header: time, then ``columns - 1`` currents (a wound rotor's five columns)."""
    header = ["time [s]", "rotor current [A]", "speed [rpm]", "torque [N·m]", "stator current [A]"][:columns]
    return [header, *([0.001 * k, *[420.0 - 0.01 * k] * (columns - 1)] for k in range(10_000))]


@pytest.mark.parametrize("columns, words", [(2, "history row 7000 current ('x') is not a number in A"),
                                            (5, "history row 7000 stator current ('x') is not a number in A")])
def test_cell_a_bad_sample_deep_in_a_long_start_is_named(columns, words):
    history = _long_start(columns)
    fine = udfs.NW_RIDE_THROUGH(history, "IEC VI", 140.0, 1.0)
    assert isinstance(fine, list) and fine[-1][0] == "caution", fine
    history[7000][-1] = "x"
    assert udfs.NW_RIDE_THROUGH(history, "IEC VI", 140.0, 1.0) == "Error: " + words
    history[7000][-1] = True
    assert "history row 7000" in udfs.NW_RIDE_THROUGH(history, "IEC VI", 140.0, 1.0)


# --- coordination across the whole shared range ------------------------------------------------


def _iec_time_s(k, alpha, multiplier, multiple, flat=20.0):
    """IEC 60255-151:2009 Table 1 form, held flat beyond ``flat`` times pickup, written out here."""
    m = np.minimum(multiple, flat)
    return multiplier * k / (m**alpha - 1.0)


def test_the_proposed_upstream_multiplier_keeps_the_interval_at_every_shared_current():
    # An IEC SI feeder over an IEC LTI motor relay: the interval binds far below i_max.
    figures = {f.name: f.value for f in coordinate_upstream(CURVES["IEC SI"], 120.0, CURVES["IEC LTI"], 100.0, 0.5, 8000.0)}
    m_up, i_tight = figures["upstream multiplier at least"], figures["interval is tightest at"]
    currents = np.geomspace(120.0 * (1 + 1e-9), 8000.0, 200_001)  # an independent dense grid
    margin = _iec_time_s(0.14, 0.02, m_up, currents / 120.0) - _iec_time_s(120.0, 1.0, 0.5, currents / 100.0) - 0.3
    assert margin.min() >= -1e-6 * 0.3
    assert margin.min() == pytest.approx(0.0, abs=1e-3)
    assert i_tight == pytest.approx(currents[np.argmin(margin)], rel=1e-3)
    assert i_tight < 1000.0  # well below i_max, where the old check at i_max alone would have looked
    # The multiplier that grades at i_max alone lets the feeder trip first lower down:
    m_at_i_max = (_iec_time_s(120.0, 1.0, 0.5, 80.0) + 0.3) / _iec_time_s(0.14, 0.02, 1.0, 8000.0 / 120.0)
    assert m_at_i_max < m_up


def test_a_given_upstream_setting_is_checked_for_its_least_margin():
    figures = {f.name: f for f in coordinate_upstream(CURVES["IEC SI"], 120.0, CURVES["IEC LTI"], 100.0, 0.5, 8000.0,
                                                      multiplier_up=1.0)}
    least = figures["least margin beyond cti, as set"]
    assert least.value < 0.0 and "DOES NOT GRADE" in least.basis
    currents = np.geomspace(120.0 * (1 + 1e-9), 8000.0, 200_001)
    margin = _iec_time_s(0.14, 0.02, 1.0, currents / 120.0) - _iec_time_s(120.0, 1.0, 0.5, currents / 100.0) - 0.3
    assert least.value == pytest.approx(margin.min(), rel=1e-4)
    assert figures["least margin occurs at"].value == pytest.approx(currents[np.argmin(margin)], rel=1e-3)
    proposed = figures["upstream multiplier at least"].value
    graded = {f.name: f for f in coordinate_upstream(CURVES["IEC SI"], 120.0, CURVES["IEC LTI"], 100.0, 0.5, 8000.0,
                                                     multiplier_up=proposed * 1.001)}
    assert graded["least margin beyond cti, as set"].basis.startswith("grades")


@pytest.mark.parametrize("peak, words", [(0.0, "never picked up"), (0.004, "0.4 % of trip reached"),
                                         (0.37, "37 % of trip reached")])
def test_a_ride_through_verdict_never_rounds_a_reached_element_away(peak, words):
    # Issue 11: a verdict must not read "100 % short of trip" when something was reached.
    from notchwise.formulas.protection import ElementCheck

    verdict = ElementCheck("inverse time IEC SI", peak, 1.0, None, "").verdict
    assert verdict == f"rides through, {words}"
