"""Inverse-time, definite-time and instantaneous elements against the standards that define them.

Sources:
- IEC 60255-151:2009, Table 1 (types A to F: k, alpha, c).
- IEEE Std C37.112-1996, Table 1 (A, B, p, tr), operate, reset and integral equations.
- IEC 60255-3:1989, long-time inverse (k = 120, alpha = 1): from memory.
The operate times below are computed in the tests from those constants by the standards' own closed
forms, written out here independently of ``notchwise.formulas.relays``.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from notchwise.addin import udfs
from notchwise.formulas.errors import DesignError, InputError, InputTypeError
from notchwise.formulas.relays import (
    CURVE_NAMES,
    CURVES,
    curve_named,
    current_for_time_a,
    definite_progress,
    definite_time_s,
    instantaneous_progress,
    multiplier_for_time,
    operate_progress,
    operate_time_s,
    reset_time_s,
)


# --- constants -------------------------------------------------------------------------------

@pytest.mark.parametrize(
    "name, k, alpha, c, t_reset",
    [
        ("IEC SI", 0.14, 0.02, 0.0, None),  # IEC 60255-151:2009, Table 1, type A
        ("IEC VI", 13.5, 1.0, 0.0, None),  # IEC 60255-151:2009, Table 1, type B
        ("IEC EI", 80.0, 2.0, 0.0, None),  # IEC 60255-151:2009, Table 1, type C
        ("IEC LTI", 120.0, 1.0, 0.0, None),  # IEC 60255-3:1989, long-time inverse (from memory)
        ("IEEE MI", 0.0515, 0.02, 0.1140, 4.85),  # IEEE C37.112-1996, Table 1 (IEC 60255-151 type D)
        ("IEEE VI", 19.61, 2.0, 0.491, 21.6),  # IEEE C37.112-1996, Table 1 (IEC 60255-151 type E)
        ("IEEE EI", 28.2, 2.0, 0.1217, 29.1),  # IEEE C37.112-1996, Table 1 (IEC 60255-151 type F)
    ],
)
def test_curve_constants_are_those_of_the_standards(name, k, alpha, c, t_reset):
    curve = CURVES[name]
    assert (curve.k, curve.alpha, curve.c, curve.t_reset) == (k, alpha, c, t_reset)
    assert curve.source


@pytest.mark.parametrize("letter, name", [("IEC A", "IEC SI"), ("iec b", "IEC VI"), (" IEC  C ", "IEC EI"), ("ieee ei", "IEEE EI")])
def test_iec_letters_and_any_case_name_the_same_curve(letter, name):
    assert curve_named(letter) is CURVES[name]  # IEC 60255-151:2009, Table 1: types A, B, C


# --- worked figures --------------------------------------------------------------------------

MULTIPLES = (1.5, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0)
#: IEEE Std C37.112-1996, Table 1: A [s], B [s], p [-] of the three IEEE curves, typed from the standard.
C37_112_TABLE_1 = {"IEEE MI": (0.0515, 0.1140, 0.02), "IEEE VI": (19.61, 0.491, 2.0), "IEEE EI": (28.2, 0.1217, 2.0)}


@pytest.mark.parametrize("name", sorted(C37_112_TABLE_1))
@pytest.mark.parametrize("dial", (0.5, 1.0, 10.0))
def test_ieee_times_follow_the_operate_equation_of_the_standard(name, dial):
    a, b, p = C37_112_TABLE_1[name]
    closed_form = [dial * (a / (m**p - 1.0) + b) for m in MULTIPLES]  # IEEE C37.112-1996, operate equation
    times = operate_time_s(CURVES[name], 100.0 * np.array(MULTIPLES), 100.0, dial)
    np.testing.assert_allclose(times, closed_form, rtol=1e-12)


@pytest.mark.parametrize(
    "name, seconds",
    [
        ("IEC SI", 2.97),  # the familiar "3 s at ten times setting, TMS 1" of BS 142 / IEC 60255-3 (from memory)
        ("IEC VI", 1.5),  # 13.5 / 9, IEC 60255-151 Table 1 type B
        ("IEC EI", 80.0 / 99.0),  # IEC 60255-151 Table 1 type C
        ("IEC LTI", 120.0 / 9.0),  # IEC 60255-3 long-time inverse (from memory)
    ],
)
def test_iec_times_at_ten_times_pickup(name, seconds):
    assert operate_time_s(CURVES[name], 1000.0, 100.0, 1.0) == pytest.approx(seconds, abs=5e-3)


def test_ieee_reset_at_zero_current_is_dial_times_tr():
    for name in ("IEEE MI", "IEEE VI", "IEEE EI"):  # IEEE C37.112-1996 reset equation at M = 0
        curve = CURVES[name]
        assert reset_time_s(curve, 0.0, 100.0, 2.0) == pytest.approx(2.0 * curve.t_reset, rel=1e-15)
        assert reset_time_s(curve, 50.0, 100.0, 1.0) == pytest.approx(curve.t_reset / 0.75, rel=1e-15)
        assert math.isinf(reset_time_s(curve, 100.0, 100.0, 1.0))


def test_iec_curves_have_no_inverse_reset():
    with pytest.raises(InputError, match="no inverse reset"):
        reset_time_s(CURVES["IEC SI"], 50.0, 100.0, 1.0)


# --- laws ------------------------------------------------------------------------------------

curve_names = st.sampled_from(sorted(CURVES))
multiples = st.floats(1.05, 50.0)
dials = st.floats(0.02, 15.0)


@settings(max_examples=200, deadline=None)
@given(name=curve_names, m=multiples, dial=dials, pickup=st.floats(0.1, 1e4))
def test_multiplier_from_time_inverts_time_from_multiplier(name, m, dial, pickup):
    curve = CURVES[name]
    t = operate_time_s(curve, m * pickup, pickup, dial)
    assert multiplier_for_time(curve, m * pickup, pickup, t) == pytest.approx(dial, rel=1e-9)


@settings(max_examples=200, deadline=None)
@given(name=curve_names, m=st.floats(1.05, 19.9), dial=dials, pickup=st.floats(0.1, 1e4))
def test_current_from_time_inverts_time_from_current(name, m, dial, pickup):
    curve = CURVES[name]
    t = operate_time_s(curve, m * pickup, pickup, dial)
    assume(t > dial * curve.c * (1.0 + 1e-6))
    assert current_for_time_a(curve, t, pickup, dial) == pytest.approx(m * pickup, rel=1e-6)


@settings(max_examples=200, deadline=None)
@given(name=curve_names, m=st.lists(st.floats(1.01, 100.0), min_size=2, max_size=20), dial=dials)
def test_time_falls_as_current_rises(name, m, dial):
    currents = np.unique(np.round(m, 4)) * 100.0  # distinct by more than rounding
    times = operate_time_s(CURVES[name], currents, 100.0, dial)
    below_flat = currents[1:] <= 2000.0  # 20 times pickup: strictly falling below, flat beyond
    assert np.all(np.diff(times)[below_flat] < 0.0) and np.all(np.diff(times)[~below_flat] <= 0.0)


def test_scalar_equals_vector_and_no_operation_at_or_below_pickup():
    curve = CURVES["IEEE VI"]
    currents = np.array([0.0, 50.0, 100.0, 150.0, 700.0])
    times = operate_time_s(curve, currents, 100.0, 2.0)
    assert np.all(np.isinf(times[:3]))
    assert [operate_time_s(curve, i, 100.0, 2.0) for i in currents[3:]] == list(times[3:])


def test_definite_time_element():
    assert list(definite_time_s([99.0, 100.0, 101.0], 100.0, 0.25)) == [math.inf, math.inf, 0.25]


# --- bad inputs ------------------------------------------------------------------------------

def test_unknown_curve_lists_the_valid_names():
    with pytest.raises(InputError) as error:
        curve_named("IEC XI")
    assert all(name in str(error.value) for name in CURVE_NAMES)


@pytest.mark.parametrize("bad", [None, "", 3.0, True])
def test_curve_that_is_not_text(bad):
    with pytest.raises(InputTypeError, match="curve"):
        curve_named(bad)


@pytest.mark.parametrize(
    "call, words",
    [
        (lambda: operate_time_s(CURVES["IEC SI"], 200.0, 0.0, 1.0), "pickup (0 A) must be above zero"),
        (lambda: operate_time_s(CURVES["IEC SI"], 200.0, -5.0, 1.0), "pickup (-5 A) must be above zero"),
        (lambda: operate_time_s(CURVES["IEC SI"], 200.0, 100.0, 0.0), "multiplier (0) must be above zero"),
        (lambda: operate_time_s(CURVES["IEC SI"], -1.0, 100.0, 1.0), "current (-1 A) must not be negative"),
        (lambda: operate_time_s(CURVES["IEC SI"], "lots", 100.0, 1.0), "is not a number in A"),
        (lambda: operate_time_s(CURVES["IEC SI"], 200.0, None, 1.0), "pickup is empty"),
        (lambda: multiplier_for_time(CURVES["IEC SI"], 100.0, 100.0, 1.0), "at or below pickup (100 A)"),
        (lambda: multiplier_for_time(CURVES["IEC SI"], 200.0, 100.0, -1.0), "target_time (-1 s) must be above zero"),
        (lambda: current_for_time_a(CURVES["IEEE EI"], 0.1, 100.0, 1.0), "no current operates that fast"),
        (lambda: definite_time_s(200.0, 100.0, -0.1), "delay (-0.1 s) must not be negative"),
    ],
)
def test_bad_input_gives_a_message(call, words):
    with pytest.raises((InputError, InputTypeError, DesignError)) as error:
        call()
    assert words in str(error.value)


@settings(max_examples=200, deadline=None)
@given(name=curve_names, pickup=st.floats(-1e6, 0.0), dial=st.floats(-1e3, 0.0) | st.floats(0.01, 10.0))
def test_any_pickup_at_or_below_zero_is_refused(name, pickup, dial):
    with pytest.raises(InputError, match="must be above zero"):
        operate_time_s(CURVES[name], 500.0, pickup, dial)


@settings(max_examples=200, deadline=None)
@given(name=curve_names, ratio=st.floats(0.0, 1.0), dial=dials)
def test_any_current_at_or_below_pickup_has_no_multiplier(name, ratio, dial):
    with pytest.raises(InputError, match="does not operate"):
        multiplier_for_time(CURVES[name], ratio * 100.0, 100.0, 1.0)


# --- operate progress along a history (IEEE C37.112 integral equation) -----------------------

def test_constant_current_reaches_duration_over_operate_time():
    curve = CURVES["IEC SI"]
    t = np.linspace(0.0, 1.2, 121)
    progress = operate_progress(curve, t, np.full(t.size, 500.0), 100.0, 0.3)
    closed_form = 1.2 / operate_time_s(curve, 500.0, 100.0, 0.3)  # C37.112 integral at constant current
    assert progress.peak == pytest.approx(closed_form, rel=1e-12)
    assert progress.trip_s is None


def test_constant_current_trips_at_its_operate_time():
    curve = CURVES["IEEE VI"]
    t = np.linspace(0.0, 10.0, 1001)
    progress = operate_progress(curve, t, np.full(t.size, 400.0), 100.0, 1.0)
    assert progress.trip_s == pytest.approx(operate_time_s(curve, 400.0, 100.0, 1.0), rel=1e-12)


def test_two_steps_add_their_fractions():
    curve = CURVES["IEC EI"]
    t, i = [0.0, 0.5, 0.5, 1.3], [800.0, 800.0, 300.0, 300.0]
    expected = 0.5 / operate_time_s(curve, 800.0, 100.0, 1.0) + 0.8 / operate_time_s(curve, 300.0, 100.0, 1.0)
    assert operate_progress(curve, t, i, 100.0, 1.0).peak == pytest.approx(expected, rel=1e-12)


def test_ieee_progress_falls_at_the_reset_rate_and_not_below_zero():
    curve = CURVES["IEEE MI"]
    rise = operate_time_s(curve, 300.0, 100.0, 1.0)
    t = [0.0, 0.5 * rise, 0.5 * rise + 1.0, 100.0]
    progress = operate_progress(curve, t, [300.0, 50.0, 50.0, 50.0], 100.0, 1.0)
    fall = 1.0 / reset_time_s(curve, 50.0, 100.0, 1.0)  # C37.112 reset: dt / t_r per unit progress
    assert progress.fraction[1] == pytest.approx(0.5, rel=1e-12)
    assert progress.fraction[2] == pytest.approx(0.5 - fall, rel=1e-12)
    assert progress.fraction[3] == 0.0


def test_iec_progress_resets_at_once_below_pickup():
    curve = CURVES["IEC VI"]
    progress = operate_progress(curve, [0.0, 1.0, 1.1, 2.0], [500.0, 90.0, 500.0, 500.0], 100.0, 1.0)
    assert progress.fraction[2] == 0.0
    assert progress.fraction[3] == pytest.approx(0.9 / operate_time_s(curve, 500.0, 100.0, 1.0), rel=1e-12)


def test_definite_and_instantaneous_progress():
    t, i = [0.0, 0.2, 0.3, 0.6], [900.0, 400.0, 900.0, 900.0]
    definite = definite_progress(t, i, 500.0, 0.25)
    assert definite.fraction[1] == pytest.approx(0.8) and definite.fraction[2] == 0.0
    assert definite.trip_s == pytest.approx(0.55)
    instant = instantaneous_progress(t, i, 1000.0)
    assert instant.peak == pytest.approx(0.9) and instant.trip_s is None
    assert instantaneous_progress(t, i, 800.0).trip_s == 0.0


@pytest.mark.parametrize(
    "t, i, words",
    [
        ([0.0], [100.0], "at least 2"),
        ([0.0, 1.0, 0.5], [100.0, 100.0, 100.0], "times must not fall"),
        ([0.0, 1.0], [100.0, -5.0], "must not be negative"),
        ([0.0, 1.0], [100.0], "2 times but 1 current values"),
    ],
)
def test_bad_history_gives_a_message(t, i, words):
    with pytest.raises(InputError, match=words):
        operate_progress(CURVES["IEC SI"], t, i, 100.0, 1.0)


# --- the flat part beyond flat_from times pickup (IEC 60255-151: the dependent-time characteristic is
# defined up to a stated multiple of setting, from memory; 20 by default) -----------------------------


@pytest.mark.parametrize("name", sorted(CURVES))
@pytest.mark.parametrize("flat_from", [20.0, 30.0])
def test_the_curve_is_flat_beyond_flat_from(name, flat_from):
    curve = CURVES[name]
    at_flat = 0.7 * (curve.k / (flat_from**curve.alpha - 1.0) + curve.c)  # Table 1 of IEC 60255-151 / C37.112 at M_flat
    beyond = operate_time_s(curve, np.array([flat_from, 2 * flat_from, 1e6, 1e300]) * 50.0, 50.0, 0.7, flat_from)
    assert beyond == pytest.approx(np.full(4, at_flat), rel=1e-12)
    below = float(operate_time_s(curve, 0.9 * flat_from * 50.0, 50.0, 0.7, flat_from))
    assert below > at_flat


@pytest.mark.parametrize("name", sorted(CURVES))
def test_no_current_operates_faster_than_the_flat_part(name):
    curve = CURVES[name]
    at_flat = float(operate_time_s(curve, 2000.0, 100.0, 0.4))  # 20 times pickup
    assert current_for_time_a(curve, at_flat, 100.0, 0.4) == pytest.approx(2000.0, rel=1e-9)
    with pytest.raises(DesignError, match="flat: no current operates that fast"):
        current_for_time_a(curve, 0.99 * at_flat, 100.0, 0.4)


def test_a_current_far_beyond_pickup_operates_in_the_flat_time():
    progress = operate_progress(CURVES["IEC EI"], [0.0, 1.0], [1e300, 1e300], 100.0, 1.0)
    flat_s = 80.0 / (20.0**2 - 1.0)  # IEC EI at 20 times pickup, Table 1 of IEC 60255-151
    assert progress.peak == pytest.approx(1.0 / flat_s, rel=1e-12)


@pytest.mark.parametrize("flat_from", [1.0, 0.5, -3.0, 1e4, float("nan"), "x"])
def test_a_bad_flat_from_gives_a_message(flat_from):
    with pytest.raises((InputError, InputTypeError), match="flat_from"):
        operate_time_s(CURVES["IEC SI"], 500.0, 100.0, 0.1, flat_from)


def test_the_cell_answers_a_sentence_for_a_time_shorter_than_the_relay_gives():
    answer = udfs.NW_RELAY_CURRENT("IEC VI", 0.01, 100.0, 0.5)
    assert isinstance(answer, str) and answer.startswith("Error:") and "no current operates that fast" in answer
    assert udfs.NW_RELAY_CURRENT("IEC VI", 0.01, 100.0, 0.5, 1000.0) == pytest.approx(
        100.0 * (13.5 / (0.01 / 0.5) + 1.0), rel=1e-9)  # no flat part below 1000 x: I = Is (k/(t/m) + 1), Table 1


# --- the spreadsheet functions ---------------------------------------------------------------

def test_cell_column_of_currents_gives_a_column_with_words_below_pickup():
    result = udfs.NW_RELAY_TIME("iec vi", [[50.0], [100.0], [250.0]], 100.0, 1.0)
    assert result[0][0] == result[1][0] == "does not operate: at or below pickup"
    assert result[2][0] == pytest.approx(13.5 / 1.5)  # IEC 60255-151 Table 1 type B at M = 2.5


def test_cell_single_current_below_pickup_is_words_not_a_number():
    assert udfs.NW_RELAY_TIME("IEC SI", 80.0, 100.0, 1.0) == "does not operate: at or below pickup"
    assert udfs.NW_RELAY_MULTIPLIER("IEC SI", 80.0, 100.0, 1.0).startswith("Error: current (80 A) is at or below pickup")


def test_cell_unknown_curve_and_bad_entry_give_messages():
    assert udfs.NW_RELAY_TIME("IEC Q", 500.0, 100.0, 1.0).startswith("Error: curve ('IEC Q') must be one of: IEC SI")
    assert udfs.NW_RELAY_TIME("IEC SI", [[500.0], ["x"]], 100.0, 1.0) == "Error: current entry 2 ('x') is not a number in A"
    assert udfs.NW_RELAY_TIME("IEC SI", 500.0, 0.0, 1.0) == "Error: pickup (0 A) must be above zero"
