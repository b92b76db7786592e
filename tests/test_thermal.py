"""Thermal overload element of IEC 60255-149 against its closed form and an ODE solver.

Sources:
- IEC 60255-149:2013, thermal model tau dtheta/dt = (I / k IB)^2 - theta and its operate-time
  equation t = tau ln((I^2 - Ip^2) / (I^2 - (k IB)^2)), cold (Ip = 0) and hot. No worked figure
  of the standard was at hand: the checks are the closed form and a second method,
  scipy.integrate.solve_ivp on the model equation.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from notchwise.addin import udfs
from notchwise.formulas.errors import InputError, InputTypeError
from notchwise.formulas.thermal import thermal_element, thermal_state, thermal_trip_time_s

ELEMENT = thermal_element(100.0, 1.05, 600.0)


def ode_trip_time_s(element, i_a, i_prior_a):
    """Second method: integrate the model from the prior level until the level reaches 1."""

    def heating(_, theta):
        return [((i_a / element.i_trip_a) ** 2 - theta[0]) / element.tau_s]

    def reaches_one(_, theta):
        return theta[0] - 1.0

    reaches_one.terminal = True
    start = (i_prior_a / element.i_trip_a) ** 2
    solution = solve_ivp(heating, (0.0, 50.0 * element.tau_s), [start], events=reaches_one, rtol=1e-11, atol=1e-13)
    return float(solution.t_events[0][0])


@pytest.mark.parametrize("i_a, i_prior_a", [(120.0, 0.0), (200.0, 0.0), (600.0, 0.0), (120.0, 90.0), (300.0, 100.0)])
def test_cold_and_hot_times_agree_with_an_ode_solution(i_a, i_prior_a):
    assert thermal_trip_time_s(ELEMENT, i_a, i_prior_a) == pytest.approx(ode_trip_time_s(ELEMENT, i_a, i_prior_a), rel=1e-7)


def test_cold_and_hot_times_agree_with_the_closed_form():
    i, ip, it = 250.0, 80.0, 105.0  # IEC 60255-149 operate equation, cold and hot
    assert thermal_trip_time_s(ELEMENT, i) == pytest.approx(600.0 * math.log(i**2 / (i**2 - it**2)), rel=1e-13)
    assert thermal_trip_time_s(ELEMENT, i, ip) == pytest.approx(600.0 * math.log((i**2 - ip**2) / (i**2 - it**2)), rel=1e-13)


@settings(max_examples=200, deadline=None)
@given(m=st.floats(1.001, 100.0), prior=st.floats(0.0, 0.999))
def test_hot_is_faster_than_cold_and_time_falls_with_current(m, prior):
    i = m * ELEMENT.i_trip_a
    hot = thermal_trip_time_s(ELEMENT, i, prior * ELEMENT.i_trip_a)
    assert 0.0 < hot <= thermal_trip_time_s(ELEMENT, i)
    assert thermal_trip_time_s(ELEMENT, 1.01 * i) < thermal_trip_time_s(ELEMENT, i)


def test_no_trip_at_or_below_k_times_base():
    assert np.all(np.isinf(thermal_trip_time_s(ELEMENT, [0.0, 100.0, 105.0])))


def test_state_under_constant_current_follows_the_exponential():
    t = np.linspace(0.0, 300.0, 301)
    state = thermal_state(ELEMENT, t, np.full(t.size, 150.0), 50.0)
    settle, start = (150.0 / 105.0) ** 2, (50.0 / 105.0) ** 2
    np.testing.assert_allclose(state.fraction, settle + (start - settle) * np.exp(-t / 600.0), rtol=1e-12)


def test_state_trip_time_is_the_operate_time():
    t = np.linspace(0.0, 2000.0, 2001)
    state = thermal_state(ELEMENT, t, np.full(t.size, 160.0), 70.0)
    assert state.trip_s == pytest.approx(thermal_trip_time_s(ELEMENT, 160.0, 70.0), rel=1e-10)


def test_state_along_a_varying_history_agrees_with_an_ode_solution():
    t = np.array([0.0, 5.0, 5.0, 30.0, 30.0, 400.0, 5000.0])
    i = np.array([400.0, 400.0, 250.0, 250.0, 80.0, 80.0, 80.0])
    state = thermal_state(ELEMENT, t, i)
    for k in range(1, t.size):  # each interval holds the current of its first sample
        span = (t[k - 1], t[k]) if t[k] > t[k - 1] else None
        if span:
            level = state.fraction[k - 1]
            solution = solve_ivp(lambda _, th, c=i[k - 1]: [((c / 105.0) ** 2 - th[0]) / 600.0], span, [level], rtol=1e-11, atol=1e-13)
            assert state.fraction[k] == pytest.approx(solution.y[0, -1], rel=1e-8)


def test_a_history_of_many_time_constants_stays_finite():
    t = np.array([0.0, 1e6, 2e6, 2e6 + 10.0])
    state = thermal_state(ELEMENT, t, [100.0, 0.0, 200.0, 200.0])
    assert np.all(np.isfinite(state.fraction)) and state.fraction[2] == pytest.approx(0.0, abs=1e-100)


@pytest.mark.parametrize(
    "call, words",
    [
        (lambda: thermal_trip_time_s(ELEMENT, 200.0, 105.0), "i_prior (105 A) must be below k_factor x i_base (105 A)"),
        (lambda: thermal_trip_time_s(ELEMENT, 200.0, -1.0), "i_prior (-1 A) must not be negative"),
        (lambda: thermal_trip_time_s(ELEMENT, "x"), "is not a number"),
        (lambda: thermal_element(100.0, 1.05, 0.0), "tau (0 s) must be above zero"),
        (lambda: thermal_element(100.0, -1.0, 60.0), "k_factor (-1) must be above zero"),
        (lambda: thermal_element(None, 1.0, 60.0), "i_base is empty"),
    ],
)
def test_bad_input_gives_a_message(call, words):
    with pytest.raises((InputError, InputTypeError)) as error:
        call()
    assert words in str(error.value)


@settings(max_examples=100, deadline=None)
@given(ratio=st.floats(0.0, 1.0))
def test_cell_current_at_or_below_k_base_says_so_in_words(ratio):
    assert udfs.NW_THERMAL_TIME(ratio * 105.0, 100.0, 1.05, 600.0) == "does not trip: at or below k_factor x i_base"


def test_cell_column_of_currents_gives_a_column():
    result = udfs.NW_THERMAL_TIME([[50.0], [210.0]], 100.0, 1.05, 600.0, None)
    assert result[0][0].startswith("does not trip")
    assert result[1][0] == pytest.approx(600.0 * math.log(4.0 / 3.0))  # cold operate equation at I = 2 k IB


def test_cell_level_at_the_end_of_a_history_is_the_closed_form():
    history = [["time s", "current A"], [0.0, 150.0], [300.0, 150.0]]
    settle, start = (150.0 / 105.0) ** 2, (50.0 / 105.0) ** 2  # IEC 60255-149 model at constant current, hot start
    level = udfs.NW_THERMAL_LEVEL(history, 100.0, 1.05, 600.0, 50.0)
    assert level == pytest.approx(settle + (start - settle) * math.exp(-0.5), rel=1e-12)
