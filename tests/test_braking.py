"""Checks of braking and lowering against closed forms, an independent scipy model and round trips.

The motor data below are round numbers of our own, not from any published problem.
No drives textbook's worked example is used: none could be checked here by book,
edition and example number.
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from notchwise.formulas.braking import (
    brake_resistance_ohm,
    lowering_speed_rpm,
    overspeed_margin,
    simulate_stop,
)
from notchwise.formulas.dc_motor import NM_PER_V_A_PER_RPM as C1
from notchwise.formulas.dc_motor import CompoundMotor, SeriesMotor, ShuntMotor, magnetization_curve
from notchwise.formulas.errors import DesignError, InputError
from notchwise.formulas.start_load import load_torque

RAD = 2.0 * math.pi / 60.0
V = 440.0
SHUNT = ShuntMotor(0.1, 0.4)
#: Back-EMF constant in SI, K = kΦ·60/(2π) [V·s/rad = N·m/A].
K = SHUNT.k_phi_v_per_rpm / RAD
CURVE = magnetization_curve([0, 50, 100, 150, 200, 300, 400, 600], [4, 70, 125, 165, 192, 225, 245, 265], 600.0)
SERIES = SeriesMotor(0.07, CURVE)
J = 5.0
L_SMALL = 1e-6  # the zero-inductance limit: L/R is a millionth of the mechanical time constant


def tau_m(r_total):
    """Mechanical time constant of a constant-flux motor on a resistance, J R / K² [s]."""
    return J * r_total / K**2


# -- closed forms of the constant-flux motor on no load, L -> 0 ------------------------------------
# Dynamic braking: J dω/dt = -K i, i = K ω / R, so ω(t) = ω0 exp(-t/τm) with τm = J R / K²
# (first-order linear ODE; the laws of Fitzgerald, Kingsley, Umans, Electric Machinery, 6th ed., 2003,
# Eqs. 7.7-7.8 and sec. 7.9 with the inductance neglected).


def test_dynamic_braking_decays_exponentially():
    r_b, n0, n1 = 0.9, 1000.0, 100.0
    result = simulate_stop(SHUNT, V, r_b, "dynamic", L_SMALL, J, 0.0, n0, n1)
    tau = tau_m(SHUNT.r_ohm + r_b)
    assert result.t_stop_s == pytest.approx(tau * math.log(n0 / n1), rel=1e-5)
    # Revolutions: ∫n dt / 60 = τm (n0 - n1) / 60.
    assert result.revolutions == pytest.approx(tau * (n0 - n1) / 60.0, rel=1e-5)
    # Current at the start: E0 / R, the peak; at the end E1 / R.
    assert result.i_peak_a == pytest.approx(SHUNT.k_phi_v_per_rpm * n0 / (SHUNT.r_ohm + r_b), rel=1e-4)
    assert result.torque_end_nm == pytest.approx(K * K * n1 * RAD / (SHUNT.r_ohm + r_b), rel=1e-4)
    assert result.energy_supply_j == 0.0


def test_dynamic_braking_energy_is_shared_in_proportion_to_the_resistances():
    # With no load the kinetic energy ½J(ω0² − ω1²) goes into R∫i²dt, shared as Rb : Ra.
    r_b, n0, n1 = 0.9, 1000.0, 100.0
    result = simulate_stop(SHUNT, V, r_b, "dynamic", L_SMALL, J, 0.0, n0, n1)
    kinetic = 0.5 * J * ((n0 * RAD) ** 2 - (n1 * RAD) ** 2)
    r_total = SHUNT.r_ohm + r_b
    assert result.energy_brake_j == pytest.approx(kinetic * r_b / r_total, rel=1e-5)
    assert result.energy_motor_j == pytest.approx(kinetic * SHUNT.r_ohm / r_total, rel=1e-5)


def test_plugging_stop_time_and_supply_energy():
    # Plugging: J dω/dt = −K i, R i = V + K ω. Then d(ω + V/K)/dt = −(ω + V/K)/τm, so
    # ω + V/K = (ω0 + V/K) e^(−t/τm) and ω = 0 at t = τm ln((V + E0)/V), E0 = K ω0.
    # The charge is ∫i dt = J ω0 / K (from the shaft equation), so the supply gives V J ω0 / K.
    r_b, n0 = 0.9, 1000.0
    result = simulate_stop(SHUNT, V, r_b, "plugging", L_SMALL, J, 0.0, n0)
    e0, w0 = K * n0 * RAD, n0 * RAD
    assert result.t_stop_s == pytest.approx(tau_m(SHUNT.r_ohm + r_b) * math.log((V + e0) / V), rel=1e-5)
    assert result.energy_supply_j == pytest.approx(V * J * w0 / K, rel=1e-5)
    # Energy balance: R∫i² = ½Jω0² + supply energy.
    total = result.energy_brake_j + result.energy_motor_j
    assert total == pytest.approx(0.5 * J * w0**2 + V * J * w0 / K, rel=1e-5)
    assert result.torque_end_nm == pytest.approx(K * V / (SHUNT.r_ohm + r_b), rel=1e-4)


@pytest.mark.parametrize("motor, mode, r_b", [(SHUNT, "dynamic", 0.9), (SHUNT, "plugging", 1.2),
                                              (SERIES, "dynamic", 0.8), (SERIES, "plugging", 1.5)])
def test_energy_balance_with_inductance_and_load(motor, mode, r_b):
    # Conservation of energy over the stop (no brush drop): kinetic energy given up plus supply energy equals
    # the heat in the circuit, the work against the constant load and the energy left in the inductance.
    l_h, t_load, n0, n1 = 0.02, 150.0, 900.0, 50.0
    result = simulate_stop(motor, V, r_b, mode, l_h, J, t_load, n0, n1, rtol=1e-9)
    kinetic = 0.5 * J * ((n0 * RAD) ** 2 - (n1 * RAD) ** 2)
    load_work = t_load * 2.0 * math.pi * result.revolutions
    stored = 0.5 * l_h * result.i_end_a**2
    heat = result.energy_brake_j + result.energy_motor_j
    assert kinetic + result.energy_supply_j == pytest.approx(heat + load_work + stored, rel=1e-6)


# -- an independent second model: scipy's DOP853 on the same laws, written out here ------------------


def independent_stop(motor, mode, r_b, l_h, load_nm, n0, n1):
    """Time, peak current and resistor energy of a stop by DOP853 with dense sampling (no events on peaks)."""
    r = motor.r_ohm + r_b
    v_loop = V if mode == "plugging" else 0.0

    def rhs(t, y):
        i, n, _ = y
        flux = float(motor.k_phi(min(max(i, 0.0), motor.i_max_a)))
        di = (v_loop + flux * n - r * i) / l_h
        return [di, C1 * (-C1 * flux * i - load_nm) / J, i * i]

    def end(t, y):
        return y[1] - n1

    end.terminal, end.direction = True, -1
    solution = solve_ivp(rhs, (0.0, 60.0), [0.0, n0, 0.0], method="DOP853", rtol=1e-11, atol=1e-9, events=end,
                         dense_output=True)
    t_end = solution.t_events[0][0]
    samples = solution.sol(np.linspace(0.0, t_end, 20001))
    return t_end, samples[0].max(), r_b * solution.y_events[0][0][2]


@pytest.mark.parametrize("motor, mode, r_b", [(SERIES, "dynamic", 0.8), (SERIES, "plugging", 1.5),
                                              (SHUNT, "plugging", 1.2)])
def test_stop_agrees_with_an_independent_scipy_model(motor, mode, r_b):
    # scipy.integrate.solve_ivp (DOP853, an explicit 8th-order Runge-Kutta) as a second method.
    l_h, t_load, n0, n1 = 0.01, 200.0, 900.0, 20.0
    result = simulate_stop(motor, V, r_b, mode, l_h, J, t_load, n0, n1, rtol=1e-9)
    t_ref, peak_ref, energy_ref = independent_stop(motor, mode, r_b, l_h, t_load, n0, n1)
    assert result.t_stop_s == pytest.approx(t_ref, rel=1e-6)
    assert result.i_peak_a == pytest.approx(peak_ref, rel=1e-5)
    assert result.energy_brake_j == pytest.approx(energy_ref, rel=1e-6)


def test_an_overhauling_load_speeds_the_shaft_up_before_the_current_builds():
    # With inductance the braking torque lags; a driving load first raises the speed (physical expectation).
    result = simulate_stop(SHUNT, V, 0.5, "dynamic", 0.05, J, -200.0, 1000.0, 700.0)
    assert result.n_peak_rpm > 1000.0
    margin, verdict = overspeed_margin(result.n_peak_rpm, 1000.0)
    assert margin < 0.0 and verdict.startswith("OVERSPEED")


# -- the braking resistor: Eq. 7.8 of Fitzgerald et al. on the braking loop, round trip with the stop ---


@pytest.mark.parametrize("mode", ["dynamic", "plugging"])
def test_brake_resistor_limits_the_simulated_peak_to_i_max(mode):
    n0, i_max = 1000.0, 900.0
    e0 = SHUNT.k_phi_v_per_rpm * n0
    r_b = brake_resistance_ohm(mode, V, SHUNT.r_ohm, e0, i_max)
    # With L = 10 nH the current rises in microseconds, while the speed hardly falls.
    result = simulate_stop(SHUNT, V, r_b, mode, 1e-8, J, 0.0, n0, 100.0)
    assert result.i_peak_a == pytest.approx(i_max, rel=1e-5)


@settings(max_examples=200, deadline=None)
@given(st.floats(1.0, 1000.0), st.floats(1e-3, 1.0), st.floats(1.0, 1000.0), st.floats(1.0, 5000.0),
       st.sampled_from(["dynamic", "plugging"]))
def test_brake_resistor_law(v, r_a, e, i_max, mode):
    driving = e if mode == "dynamic" else v + e
    try:
        r_b = brake_resistance_ohm(mode, v, r_a, e, i_max)
    except DesignError as error:
        assert driving / r_a < i_max and "no braking resistor is needed" in str(error)
    else:
        assert r_b >= 0.0 and driving / (r_a + r_b) == pytest.approx(i_max, rel=1e-12)


def test_brake_resistor_values():
    # E/I − Ra and (V + E)/I − Ra (Dubey, Fundamentals of Electrical Drives, 2nd ed., 2001, ch. 5, from memory).
    assert brake_resistance_ohm("dynamic", 220.0, 0.05, 200.0, 400.0) == pytest.approx(0.45)
    assert brake_resistance_ohm("Plugging", 220.0, 0.05, 200.0, 400.0) == pytest.approx(1.0)


# -- lowering ------------------------------------------------------------------------------------------


@settings(max_examples=100, deadline=None)
@given(st.floats(1.0, 5000.0), st.floats(0.0, 5.0))
def test_shunt_lowering_speed_closed_form(torque, r_x):
    # T = K I and K ω = I R: ω = T R / K² (Fitzgerald et al., 6th ed., Eqs. 7.7-7.8).
    n = lowering_speed_rpm(SHUNT, r_x, torque)
    assert n * RAD == pytest.approx(torque * (SHUNT.r_ohm + r_x) / K**2, rel=1e-12)


@pytest.mark.parametrize("torque", [400.0, 900.0, 1500.0])
def test_series_lowering_speed_satisfies_both_laws(torque):
    # Round trip: at the speed found, the current that gives the torque is driven by the back-EMF (Eq. 7.8).
    r_x, vb = 0.6, 2.0
    n = lowering_speed_rpm(SERIES, r_x, torque, "dynamic", vb)
    i = np.linspace(0.0, CURVE.max_excitation, 200001)
    t = C1 * SERIES.k_phi(i) * i
    current = float(np.interp(torque, t, i))
    assert float(SERIES.k_phi(current)) * n == pytest.approx(vb + current * (SERIES.r_ohm + r_x), rel=1e-6)


def test_the_stop_of_an_overhauling_load_is_held_at_the_lowering_speed():
    # The stop refuses n_end below the speed at which the load is held, and names about that speed.
    n_low = lowering_speed_rpm(SHUNT, 0.5, 300.0)
    with pytest.raises(DesignError, match="cannot take the speed below about") as caught:
        simulate_stop(SHUNT, V, 0.5, "dynamic", 0.01, J, -300.0, 1000.0, 50.0)
    stated = float(str(caught.value).split("below about ")[1].split(" rpm")[0])
    assert stated == pytest.approx(n_low, abs=(1000.0 - 50.0) / 127.0)
    # Above it the stop runs, and settles towards it.
    result = simulate_stop(SHUNT, V, 0.5, "dynamic", 0.01, J, -300.0, 1000.0, n_low * 1.05)
    assert result.torque_end_nm > 300.0


def test_series_field_fails_to_build_up_at_a_light_load():
    with pytest.raises(DesignError, match="series field does not build up"):
        lowering_speed_rpm(SERIES, 0.6, 5.0)


# -- series self-excitation: the critical resistance ----------------------------------------------


def test_series_build_up_figures_follow_the_critical_resistance():
    # Critical resistance R_c(n) = n · max dkΦ/di (slope of the linear part of the curve; Fitzgerald et al.,
    # 6th ed., sec. 7.6, voltage build-up of self-excited generators, from memory).
    r_b = 0.8
    result = simulate_stop(SERIES, V, r_b, "dynamic", 0.004, J, 200.0, 900.0, 0.0)
    i = np.linspace(0.0, CURVE.max_excitation, 100001)
    slope = np.max(np.diff(SERIES.k_phi(i)) / np.diff(i))
    assert result.build_up.critical_speed_rpm == pytest.approx((SERIES.r_ohm + r_b) / slope, rel=1e-3)
    i_b = result.build_up.i_least_a
    assert float(SERIES.k_phi(i_b)) * result.build_up.critical_speed_rpm == pytest.approx(
        i_b * (SERIES.r_ohm + r_b), rel=1e-6)


def test_braking_current_too_low_to_build_up():
    with pytest.raises(DesignError, match="series field cannot build up"):
        simulate_stop(SERIES, V, 3.0, "dynamic", 0.004, J, 100.0, 600.0, 0.0)


def test_no_residual_flux_no_self_excited_braking():
    bare = SeriesMotor(0.07, magnetization_curve([0, 100, 200, 400], [0, 125, 192, 245], 600.0))
    with pytest.raises(DesignError, match="no residual EMF"):
        simulate_stop(bare, V, 0.8, "dynamic", 0.004, J, 100.0, 900.0, 0.0)
    assert simulate_stop(bare, V, 2.0, "plugging", 0.004, J, 100.0, 400.0).t_stop_s > 0.0


# -- bad inputs ----------------------------------------------------------------------------------------


def test_dynamic_braking_to_standstill_with_nothing_opposing_is_refused():
    with pytest.raises(DesignError, match="decays exponentially"):
        simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 1000.0)


@pytest.mark.parametrize(
    "call, words",
    [
        (lambda: simulate_stop(SHUNT, V, 0.9, "regenerative", 0.005, J, 0.0, 1000.0, 10.0),
         "mode regenerative does not apply to a stop of a shunt motor; its modes are: dynamic, plugging"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "coasting", 0.005, J, 0.0, 1000.0, 10.0), "mode ('coasting') must be one of"),
        (lambda: simulate_stop(CompoundMotor(0.05, CURVE, 100.0, 2.0), V, 0.9, "dynamic", 0.005, J, 0.0, 1000.0, 10.0),
         "does not apply to a stop of a compound motor"),
        (lambda: lowering_speed_rpm(SHUNT, 0.5, 100.0, "plugging"), "mode plugging does not apply to lowering"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 1000.0, 1200.0),
         "n_end (1200 rpm) must be below n_start (1000 rpm)"),
        (lambda: simulate_stop(SHUNT, V, -0.9, "dynamic", 0.005, J, 0.0, 1000.0, 10.0), "r_external (-0.9 ohm) must not be negative"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.0, J, 0.0, 1000.0, 10.0), "l_circuit (0 H) must be above zero"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, -J, 0.0, 1000.0, 10.0), "inertia (-5 kg·m²) must be above zero"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 0.0), "n_start (0 rpm) must be above zero"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 1e6), "n_start (1e+06 rpm) must be at most"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, -1e5, 1000.0, 10.0), "the load overhauls the dynamic braking"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 1e300, 1000.0), "no real drive stops so fast"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, [[0.0, 10.0], [0.0, 20.0]], 1000.0),
         "load_torque speeds must rise strictly"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, "heavy", 1000.0), "is not a number"),
        (lambda: simulate_stop(SERIES, V, 0.05, "plugging", 0.004, J, 100.0, 900.0), "beyond the end of the magnetization curve"),
        (lambda: lowering_speed_rpm(SHUNT, 0.5, -100.0), "lowering_torque (-100 N·m) must be above zero"),
        (lambda: lowering_speed_rpm(SERIES, 0.5, 1e6), "above the torque at the end of the magnetization curve"),
        (lambda: lowering_speed_rpm(SeriesMotor(0.07), 0.5, 100.0), "the series motor has no magnetization curve"),
        (lambda: brake_resistance_ohm("dynamic", V, 0.1, 0.0, 100.0), "e_motor (0 V) must be above zero"),
        (lambda: brake_resistance_ohm("dynamic", V, 0.1, 400.0, 1e4), "no braking resistor is needed"),
        (lambda: overspeed_margin(900.0, 0.0), "n_max (0 rpm) must be above zero"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 1000.0, 100.0, rtol=0.5),
         "rtol (0.5) must lie from 1e-12 to 1e-2"),
        (lambda: simulate_stop(SHUNT, V, 0.9, "dynamic", 0.005, J, 0.0, 1000.0, 100.0, rtol=0.0),
         "rtol (0) must be above zero"),
    ],
)
def test_bad_inputs_give_a_message(call, words):
    with pytest.raises((InputError, DesignError, TypeError)) as caught:
        call()
    assert words in str(caught.value)


def test_a_signed_load_keeps_its_sign():
    assert load_torque(-120.0, signed=True).at(500.0) == pytest.approx(-120.0)
    table = load_torque([[0.0, -50.0], [1000.0, 80.0]], signed=True)
    assert table.potential and not load_torque(50.0).potential
    assert table.at(500.0) == pytest.approx(15.0)


def test_the_integrators_fast_flux_is_the_curves_own():
    # The integrators (the stop's and the start's) evaluate the magnetization curve's cubic by Horner's rule on
    # the motor's notch_flux pieces; it must equal the curve's own interpolant (scipy's PchipInterpolator in
    # dc_motor, reached through the array path) and give its slope.
    from notchwise.formulas.notch_integrator import piecewise_cubic

    pieces = SERIES.notch_flux.current_pieces
    currents = np.linspace(0.0, CURVE.max_excitation, 997)
    fast = np.array([piecewise_cubic(*pieces, float(i)) for i in currents])
    assert np.allclose(fast[:, 0], SERIES.k_phi(currents), rtol=1e-13, atol=1e-15)
    h = 1e-5
    inner = currents[1:-1]
    difference = (SERIES.k_phi(inner + h) - SERIES.k_phi(inner - h)) / (2 * h)
    assert np.allclose(fast[1:-1, 1], difference, rtol=1e-5, atol=1e-9)


@settings(max_examples=40, deadline=None)
@given(st.sampled_from([SHUNT, SERIES]), st.sampled_from(["dynamic", "plugging"]), st.floats(0.0, 5.0),
       st.floats(1e-4, 0.1), st.floats(-800.0, 800.0), st.floats(50.0, 1500.0), st.floats(0.0, 1.0))
def test_every_stop_ends_or_says_why(motor, mode, r_b, l_h, t_load, n0, end_share):
    # Law for every valid input: a stop either ends at n_end, its figures finite and its energies not
    # negative, or it is refused with one of our messages (never another exception, never a hang).
    try:
        result = simulate_stop(motor, V, r_b, mode, l_h, J, t_load, n0, end_share * n0 * 0.99)
    except (InputError, DesignError) as error:
        assert str(error)
    else:
        figures = [result.t_stop_s, result.revolutions, result.i_peak_a, result.energy_brake_j, result.energy_supply_j]
        assert all(math.isfinite(x) and x >= 0.0 for x in figures)
        assert result.n_peak_rpm >= n0


# -- the wound-rotor motor: counter-torque and regenerative lowering, plugging -----------------------
# The circuit: per-phase T circuit, torque T = 3 |I2'|² (R'/s) / ω_s from the air-gap power
# (Fitzgerald, Kingsley, Umans, Electric Machinery, 6th ed., 2003, sec. 6.4, P_ag = 3 I2'² R2'/s;
# Eq. 6.36 for the Thevenin form; equation numbers from memory). The checks below solve the full
# T circuit written out here with complex numbers, independent of the core's Thevenin closed forms.

from notchwise.formulas.induction_motor import WoundRotorMotor  # noqa: E402
from scipy.integrate import quad  # noqa: E402
from scipy.optimize import brentq  # noqa: E402

ROTOR = WoundRotorMotor(0.05, 0.25, 10.0, 0.06, 0.3, 400.0, 50.0, 6, 300.0, 20.0)


def full_circuit_torque(motor, slip, r2):
    """Air-gap torque from the T circuit's rotor current: 3 |I2'|² R'/s / ω_s (sec. 6.4 of Fitzgerald et al.)."""
    v1 = motor.v_line_v / math.sqrt(3.0)
    z_rotor = r2 / slip + 1j * motor.x_rotor_ohm
    z_m = 1j * motor.x_magnetizing_ohm
    z = motor.r_stator_ohm + 1j * motor.x_stator_ohm + z_m * z_rotor / (z_m + z_rotor)
    i1 = v1 / z
    i2 = i1 * z_m / (z_m + z_rotor)
    return 3.0 * abs(i2) ** 2 * (r2 / slip) / motor.omega_sync_rad_s


def thevenin(motor):
    """Thevenin voltage, resistance and total reactance seen by the rotor (Eqs. 6.34-6.35, written anew here)."""
    z1, zm = complex(motor.r_stator_ohm, motor.x_stator_ohm), 1j * motor.x_magnetizing_ohm
    v_th = abs(motor.v_line_v / math.sqrt(3.0) * zm / (z1 + zm))
    z_th = z1 * zm / (z1 + zm)
    return v_th, z_th.real, z_th.imag + motor.x_rotor_ohm


@pytest.mark.parametrize("r_x, torque", [(1.0, 800.0), (1.5, 700.0), (3.0, 400.0)])
def test_counter_torque_lowering_closed_form_and_full_circuit(r_x, torque):
    r2 = ROTOR.rotor_circuit_ohm(r_x)
    v_th, r_th, x = thevenin(ROTOR)
    k = 3.0 * v_th**2 / ROTOR.omega_sync_rad_s
    # Closed form: T x² + (2 T R_th - k) x + T (R_th² + X²) = 0 in x = R'/s, the larger (stable) root.
    b = k - 2.0 * torque * r_th
    x_root = (b + math.sqrt(b * b - 4.0 * torque**2 * (r_th**2 + x**2))) / (2.0 * torque)
    s_closed = r2 / x_root
    assert s_closed > 1.0
    n = lowering_speed_rpm(ROTOR, r_x, torque, "counter-torque")
    assert n == pytest.approx(ROTOR.sync_speed_rpm * (s_closed - 1.0), rel=1e-9)
    # Second method: brentq on the full circuit's power balance, slip between 1 and breakdown slip.
    s_bd = r2 / math.hypot(r_th, x)
    s_full = brentq(lambda s: full_circuit_torque(ROTOR, s, r2) - torque, 1.0, s_bd, xtol=1e-14)
    assert n == pytest.approx(ROTOR.sync_speed_rpm * (s_full - 1.0), rel=1e-7)


@pytest.mark.parametrize("r_x, torque", [(0.0, 800.0), (0.2, 300.0), (0.5, 1200.0)])
def test_regenerative_lowering_closed_form_and_full_circuit(r_x, torque):
    r2 = ROTOR.rotor_circuit_ohm(r_x)
    v_th, r_th, x = thevenin(ROTOR)
    k = 3.0 * v_th**2 / ROTOR.omega_sync_rad_s
    # Closed form: -T [(R_th + x)² + X²] = k x for x = R'/s < 0, the root of larger magnitude.
    b = k + 2.0 * torque * r_th
    x_root = -(b + math.sqrt(b * b - 4.0 * torque**2 * (r_th**2 + x**2))) / (2.0 * torque)
    s_closed = r2 / x_root
    assert s_closed < 0.0
    n = lowering_speed_rpm(ROTOR, r_x, torque, "regenerative")
    assert n == pytest.approx(ROTOR.sync_speed_rpm * (1.0 - s_closed), rel=1e-9)
    s_bd = -r2 / math.hypot(r_th, x)  # generating breakdown slip
    s_full = brentq(lambda s: full_circuit_torque(ROTOR, s, r2) + torque, s_bd, -1e-12, xtol=1e-15)
    assert n == pytest.approx(ROTOR.sync_speed_rpm * (1.0 - s_full), rel=1e-7)


@pytest.mark.parametrize("mode, r_values, torque", [("regenerative", (0.0, 0.3, 0.6), 600.0),
                                                     ("counter-torque", (1.5, 2.0, 3.0), 700.0)])
def test_more_rotor_resistance_lowers_faster(mode, r_values, torque):
    # x = R'/s is fixed by the torque, so the slip grows with R' (sec. 6.7 of Fitzgerald et al., from memory).
    speeds = [lowering_speed_rpm(ROTOR, r, torque, mode) for r in r_values]
    assert speeds == sorted(speeds) and speeds[0] < speeds[-1]


def test_generating_breakdown_torque_closed_form():
    v_th, r_th, x = thevenin(ROTOR)
    z = math.hypot(r_th, x)
    # |T| at x = -Z: k Z / ((R_th - Z)² + X²) = k / (2 (Z - R_th)).
    assert ROTOR.generating_breakdown_torque_nm == pytest.approx(3.0 * v_th**2 / ROTOR.omega_sync_rad_s / (2.0 * (z - r_th)), rel=1e-12)
    assert abs(full_circuit_torque(ROTOR, -ROTOR.rotor_circuit_ohm(0.0) / z, ROTOR.rotor_circuit_ohm(0.0))) == pytest.approx(
        ROTOR.generating_breakdown_torque_nm, rel=1e-9)


def test_rotor_lowering_with_no_steady_speed_says_why():
    with pytest.raises(DesignError, match="too light to overhaul"):
        lowering_speed_rpm(ROTOR, 0.2, 300.0, "counter-torque")
    with pytest.raises(DesignError, match="above the breakdown torque"):
        lowering_speed_rpm(ROTOR, 1.0, 1500.0, "counter-torque")
    with pytest.raises(DesignError, match="generating breakdown"):
        lowering_speed_rpm(ROTOR, 0.0, 1500.0, "regenerative")
    with pytest.raises(DesignError, match="twice synchronous"):
        lowering_speed_rpm(ROTOR, 1.0, 800.0, "regenerative")


@pytest.mark.parametrize("call, words", [
    (lambda: lowering_speed_rpm(ROTOR, 0.5, 500.0, "dynamic"), "DC injection"),
    (lambda: simulate_stop(ROTOR, None, 0.5, "dynamic", None, J, 0.0, 900.0), "DC injection"),
    (lambda: lowering_speed_rpm(SHUNT, 0.5, 500.0, "regenerative"), "does not apply"),
    (lambda: lowering_speed_rpm(ROTOR, -0.5, 500.0, "counter-torque"), "r_external"),
    (lambda: lowering_speed_rpm(ROTOR, 0.5, -5.0, "counter-torque"), "lowering_torque"),
    (lambda: lowering_speed_rpm(ROTOR, math.nan, 500.0, "regenerative"), "r_external"),
    (lambda: lowering_speed_rpm(ROTOR, 0.5, 500.0, "sideways"), "mode"),
    (lambda: simulate_stop(ROTOR, None, 0.5, "plugging", None, J, 0.0, 2500.0), "twice synchronous"),
    (lambda: simulate_stop(ROTOR, None, 0.5, "plugging", None, J, 0.0, 500.0, 600.0), "n_end"),
    (lambda: simulate_stop(ROTOR, None, 0.5, "plugging", None, -1.0, 0.0, 500.0), "inertia"),
    (lambda: simulate_stop(ROTOR, None, 0.5, "plugging", None, J, -5000.0, 900.0), "overhauls"),
])
def test_wound_rotor_bad_inputs(call, words):
    with pytest.raises((InputError, DesignError), match=words):
        call()


def test_rotor_plugging_against_solve_ivp_and_the_energy_law():
    r_x, n0 = 0.5, 950.0
    r2 = ROTOR.rotor_circuit_ohm(r_x)
    result = simulate_stop(ROTOR, None, r_x, "plugging", None, J, 0.0, n0)
    n_s, w_s = ROTOR.sync_speed_rpm, ROTOR.omega_sync_rad_s

    def rhs(t, y):  # J dω/dt = -T(s), s = 1 + n/n_s, the torque from the full circuit
        return [-full_circuit_torque(ROTOR, 1.0 + y[0] / n_s, r2) / (J * RAD), y[0] / 60.0]

    stop = lambda t, y: y[0]  # noqa: E731
    stop.terminal = True
    solution = solve_ivp(rhs, (0.0, 100.0), [n0, 0.0], events=stop, rtol=1e-10, atol=1e-9)
    assert result.t_stop_s == pytest.approx(solution.t_events[0][0], rel=1e-6)
    assert result.revolutions == pytest.approx(solution.y_events[0][0][1], rel=1e-6)
    # With no load the rotor copper energy of plugging is ½ J ω_s² (s0² - s1²), whatever the torque curve
    # (G. K. Dubey, Fundamentals of Electrical Drives, 2nd ed., 2001, energy relations in braking, from memory;
    # it follows from rotor loss = s P_ag and J dω/dt = -P_ag/ω_s). From s0 = 1 + n0/n_s to s1 = 1.
    s0 = 1.0 + n0 / n_s
    rotor_energy = 0.5 * J * w_s**2 * (s0**2 - 1.0)
    assert result.energy_brake_j + result.energy_motor_j == pytest.approx(rotor_energy, rel=1e-6)
    assert result.energy_brake_j / (result.energy_brake_j + result.energy_motor_j) == pytest.approx(
        (r2 - ROTOR.r_rotor_ohm) / r2, rel=1e-12)
    # The rotor current peaks as braking begins: it is the T circuit's at s0.
    assert result.i_peak_a == pytest.approx(float(ROTOR.currents(s0, r2).rotor_a), rel=1e-12)
