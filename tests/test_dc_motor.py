"""DC motor laws against closed forms, scipy, and the published machine equations."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.interpolate import PchipInterpolator
from scipy.optimize import root_scalar

from notchwise.formulas.dc_motor import (
    CompoundMotor,
    SeriesMotor,
    back_emf_v,
    developed_torque_nm,
    k_phi_from_rating,
    magnetization_curve,
    minimum_load,
    residual_speed_rpm,
    steady_speed_rpm,
    torque_nm,
)
from notchwise.formulas.errors import DesignError, InputError, InputTypeError
from tests.conftest import SATURATING_CURVE, SATURATING_E_V, SATURATING_I_A

# Table of our own making: EMF [V] at 1000 rpm against current [A], with residual flux.
I_TABLE = np.array(SATURATING_I_A)
E_TABLE = np.array(SATURATING_E_V)
CURVE = SATURATING_CURVE  # at 1000 rpm
HOIST = SeriesMotor(0.06, CURVE)


def test_torque_is_power_over_angular_speed():
    """Fitzgerald, Kingsley, Umans, Electric Machinery, 6th ed., 2003, Eq. 7.1 with P = E I = T omega."""
    k_phi, i_a, n_rpm = 0.2, 100.0, 1000.0
    power_w = back_emf_v(k_phi, n_rpm) * i_a
    assert torque_nm(k_phi, i_a) == pytest.approx(power_w / (2 * math.pi * n_rpm / 60.0), rel=1e-14)


def test_k_phi_from_rating_is_the_terminal_equation():
    """Fitzgerald et al., Electric Machinery, 6th ed., Eq. 7.8: V = E + I Ra + Vb."""
    assert k_phi_from_rating(220.0, 100.0, 1000.0, 0.1, 2.0) == pytest.approx((220.0 - 10.0 - 2.0) / 1000.0)
    with pytest.raises(DesignError, match="no back-EMF"):
        k_phi_from_rating(220.0, 3000.0, 1000.0, 0.1)


def test_curve_passes_through_its_points_like_scipy_pchip():
    """Fritsch & Carlson 1980 monotone cubic, as implemented by scipy.interpolate.PchipInterpolator."""
    reference = PchipInterpolator(I_TABLE, E_TABLE)
    grid = np.linspace(0.0, 600.0, 241)
    np.testing.assert_allclose(CURVE.emf_at(grid), reference(grid), rtol=1e-14)
    np.testing.assert_allclose(CURVE.emf_at(I_TABLE), E_TABLE, rtol=1e-14)


@settings(max_examples=100, deadline=None)
@given(steps=st.lists(st.tuples(st.floats(1.0, 200.0), st.floats(0.0, 100.0)), min_size=2, max_size=10))
def test_interpolated_curve_never_overshoots_a_monotone_table(steps):
    """Shape preservation of the Fritsch-Carlson interpolant (SIAM J. Numer. Anal. 17(2), 1980)."""
    x = np.cumsum([s[0] for s in steps])
    e = np.cumsum([s[1] for s in steps]) + 1.0
    curve = magnetization_curve(x, e)
    grid = np.linspace(0.0, x[-1], 400)
    values = curve.emf_at(grid)
    assert np.all(np.diff(values) >= -1e-9 * e[-1])
    assert values.max() <= e[-1] * (1 + 1e-12)


def test_origin_is_added_when_the_table_starts_above_zero():
    curve = magnetization_curve([50.0, 100.0], [100.0, 150.0], 900.0)
    assert curve.emf_at(0.0) == 0.0 and curve.excitation[0] == 0.0


def test_speed_at_a_table_point_is_the_terminal_equation():
    """At a measured point no interpolation enters: n = n_mag (V - I R) / E_mag(I), Eq. 7.8 of Fitzgerald et al."""
    for i_a, e_v in zip(I_TABLE[1:], E_TABLE[1:]):
        expected = 1000.0 * (230.0 - 2.0 - i_a * 0.06) / e_v
        assert steady_speed_rpm(HOIST, 230.0, i_a, 0.0, 2.0) == pytest.approx(expected, rel=1e-13)


@settings(max_examples=100, deadline=None)
@given(i_a=st.floats(1.0, 600.0))
def test_power_balance_torque_times_speed_equals_emf_times_current(i_a):
    """E I = T omega (Fitzgerald et al., Eq. 7.1), independent of the curve's shape."""
    n = steady_speed_rpm(HOIST, 230.0, i_a)
    torque = developed_torque_nm(HOIST, i_a)
    assert torque * 2 * math.pi * n / 60.0 == pytest.approx((230.0 - i_a * 0.06) * i_a, rel=1e-10)


def test_speed_is_vectorised_and_equals_scalar_calls():
    currents = np.array([20.0, 80.0, 250.0])
    np.testing.assert_allclose(
        steady_speed_rpm(HOIST, 230.0, currents), [steady_speed_rpm(HOIST, 230.0, i) for i in currents], rtol=0
    )


def test_minimum_load_agrees_with_scipy_bisection_on_the_speed_curve():
    result = minimum_load(HOIST, 230.0, 2500.0, 0.0, 2.0)
    bisect = root_scalar(lambda i: steady_speed_rpm(HOIST, 230.0, i, 0.0, 2.0) - 2500.0, bracket=[1e-6, 600.0], method="bisect", xtol=1e-12)
    assert result.i_a == pytest.approx(bisect.root, rel=1e-9)
    assert result.torque_nm == pytest.approx(developed_torque_nm(HOIST, bisect.root), rel=1e-8)
    assert steady_speed_rpm(HOIST, 230.0, result.i_a, 0.0, 2.0) == pytest.approx(2500.0, rel=1e-9)


def test_residual_speed_and_runaway():
    assert residual_speed_rpm(HOIST, 230.0, 2.0) == pytest.approx(228.0 * 1000.0 / 4.0)
    bare = SeriesMotor(0.06, magnetization_curve([0.0, 100.0, 300.0], [0.0, 190.0, 320.0], 1000.0))
    assert math.isinf(residual_speed_rpm(bare, 230.0))
    assert minimum_load(bare, 230.0, 2500.0).n_residual_rpm == math.inf


def test_no_minimum_load_when_the_residual_speed_is_safe():
    assert minimum_load(HOIST, 230.0, 1e6).i_a == 0.0


def test_compound_flux_follows_total_ampere_turns():
    curve = magnetization_curve([0.0, 2000.0, 6000.0], [0.0, 150.0, 260.0], 1000.0, "ampere-turns")
    motor = CompoundMotor(0.05, curve, 1500.0, 10.0)
    assert motor.k_phi(50.0) == pytest.approx(curve.emf_at(2000.0) / 1000.0)
    assert motor.i_max_a == pytest.approx((6000.0 - 1500.0) / 10.0)


@pytest.mark.parametrize(
    "x, e, words",
    [
        ([0.0], [1.0], "at least 2"),
        ([0.0, 100.0, 100.0], [0.0, 100.0, 150.0], "must rise strictly: point 3"),
        ([0.0, 100.0, 200.0], [0.0, 150.0, 140.0], "must not fall: point 3"),
        ([-5.0, 100.0], [0.0, 100.0], "must not be negative"),
        ([0.0, 100.0], [0.0, 0.0], "no flux"),
        ([0.0, 100.0], [0.0, "abc"], "is not a number"),
        ([0.0, 100.0, 200.0], [0.0, 100.0], "2 EMF values"),
    ],
)
def test_bad_magnetization_tables_are_named(x, e, words):
    with pytest.raises((InputError, InputTypeError), match=words):
        magnetization_curve(x, e, 1000.0)


def test_speed_limits_are_named():
    with pytest.raises(InputError, match="above the stall current"):
        steady_speed_rpm(HOIST, 230.0, 5000.0)
    with pytest.raises(InputError, match="must not be negative"):
        steady_speed_rpm(HOIST, 230.0, -1.0)
    with pytest.raises(InputError, match="beyond it: extend the curve"):
        steady_speed_rpm(SeriesMotor(0.01, CURVE), 230.0, 800.0)
    with pytest.raises(InputError, match="has no speed_rpm"):
        steady_speed_rpm(SeriesMotor(0.06, magnetization_curve(I_TABLE, E_TABLE)), 230.0, 100.0)
    with pytest.raises(InputError, match="brush_drop .* must be below v_supply"):
        steady_speed_rpm(HOIST, 2.0, 1.0, 0.0, 2.0)
