"""Checks of section energy, duty, heating and resistance at temperature."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from notchwise.formulas.errors import DesignError, InputError
from notchwise.formulas.resistors import (
    ALLOYS,
    TEMPERATURE_RISE_LIMITS_K,
    adiabatic_rise_k,
    cold_hot_start,
    resistance_at_c,
    rise_verdict,
    section_duty,
    section_energy_j,
)
from notchwise.formulas.start_sim import simulate_start, start_history
from tests.conftest import TEST_SECTIONS_OHM, TEST_SHUNT

MOTOR = TEST_SHUNT
SECTIONS = list(TEST_SECTIONS_OHM)


def _start():
    return simulate_start(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, i_cut_a=200.0, brush_drop_v=2.0)


def test_alloy_table_holds_the_figures_named_in_the_brief_with_sources():
    # Figures as recalled (ASM Handbook vols. 1 and 2, 10th ed., 1990): from memory, not verified.
    assert ALLOYS["AISI 304"].resistivity_ohm_m == pytest.approx(72e-8)
    assert ALLOYS["AISI 304"].specific_heat_j_per_kg_k == pytest.approx(500.0)
    assert ALLOYS["NiCr 80/20"].resistivity_ohm_m == pytest.approx(108e-8)
    assert ALLOYS["CuNi 44"].resistivity_ohm_m == pytest.approx(49e-8)
    assert all("from memory" in alloy.source for alloy in ALLOYS.values())
    # IEEE Std 32-1972 temperature-rise limits as recalled: from memory.
    assert TEMPERATURE_RISE_LIMITS_K == {"short time": 760.0, "extended": 610.0, "continuous": 385.0}


def test_section_energy_against_a_trapezoid_integral_of_the_history():
    # E_s = R_s * integral of i^2 while the section is in circuit: an independent quadrature of the history.
    result = _start()
    history = start_history(result, MOTOR, 100_000)
    cut_times = result.t_start_s + result.dwell_s
    expected = []
    for s, r in enumerate(SECTIONS):
        inside = history.t_s <= cut_times[s]
        expected.append(r * np.trapezoid(history.i_a[inside] ** 2, history.t_s[inside]))
    assert np.allclose(section_energy_j(result.r_section_ohm, result.i2t_a2s), expected, rtol=2e-3)
    assert np.sum(result.energy_notch_j) == pytest.approx(np.sum(expected), rel=2e-3)


def test_duty_rms_and_power_follow_from_energy_and_start_rate():
    # I_rms^2 R = P and P = E z / 3600 (definition of r.m.s. over the hour; IEEE Std 32-1972, from memory).
    result = _start()
    duty = section_duty(result.r_section_ohm, result.i2t_a2s, 30.0, result.t_accel_s)
    assert np.allclose(duty.power_w, duty.energy_j * 30.0 / 3600.0)
    assert np.allclose(duty.i_rms_a**2 * np.array(SECTIONS), duty.power_w)


def test_adiabatic_rise_against_m_c_dt():
    # m c dT = E (first law, closed body without losses): 50 kJ into 2 kg of c = 500 J/(kg K) gives 50 K.
    assert adiabatic_rise_k(50_000.0, 2.0, "AISI 304") == pytest.approx(50.0)
    assert np.allclose(adiabatic_rise_k([900.0, 1800.0], [2.0, 2.0], ALLOYS["NiCr 80/20"]), [1.0, 2.0])


def test_resistance_at_temperature_against_the_linear_alloy_law():
    # R = R20 (1 + alpha (theta - 20)) (ASM Handbook vol. 2, 10th ed., resistance alloys; from memory)
    alpha = ALLOYS["AISI 304"].alpha_per_k
    assert resistance_at_c(2.0, 420.0, "aisi 304") == pytest.approx(2.0 * (1.0 + alpha * 400.0))
    assert resistance_at_c(2.0, 20.0, "CuNi 44") == pytest.approx(2.0)


def test_a_hot_grid_lowers_the_first_peak():
    both = cold_hot_start(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, "AISI 304", 2.0, 20.0, 150.0, 180.0, None, 2.0)
    assert both.hot.i_peak_a[0] < both.cold.i_peak_a[0]
    assert np.all(both.r_hot_ohm > both.r_cold_ohm)
    # the default hot temperature is ambient plus the cold start's own adiabatic rise
    again = cold_hot_start(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, "AISI 304", 2.0, 20.0, None, 200.0, None, 2.0)
    expected = adiabatic_rise_k(section_energy_j(again.cold.r_section_ohm, again.cold.i2t_a2s), 2.0, "AISI 304")
    assert np.allclose(again.hot_c, 20.0 + expected)


def test_rise_verdict_names_the_limit():
    assert rise_verdict([100.0, 800.0]) == ("ok", "rise over the short time limit (760 K, IEEE Std 32, from memory)")


@pytest.mark.parametrize(
    "call, words",
    [
        (lambda: adiabatic_rise_k(10.0, 0.0, "AISI 304"), "mass (0 kg) must be above zero"),
        (lambda: adiabatic_rise_k(-1.0, 1.0, "AISI 304"), "energy (-1 J) must not be negative"),
        (lambda: adiabatic_rise_k(1.0, 1.0, "brass"), "alloy ('brass') must be one of"),
        (lambda: resistance_at_c(1.0, -100.0, "AISI 304"), "must be -60 °C or above"),
        (lambda: section_duty([1.0], [10.0], 400.0, 10.0), "do not fit in an hour"),
        (lambda: section_energy_j([1.0, 2.0], [3.0]), "r_section has 2 entries but i2t has 1"),
        (lambda: cold_hot_start(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, "AISI 304", [1.0, 2.0], i_cut_a=200.0),
         "mass has 2 entries"),
        (lambda: cold_hot_start(MOTOR, 440.0, SECTIONS, 0.01, 5.0, 300.0, "AISI 304", 2.0, 40.0, 30.0, 200.0),
         "must not be below ambient"),
    ],
)
def test_bad_inputs_give_messages(call, words):
    with pytest.raises((InputError, DesignError)) as error:
        call()
    assert words in str(error.value)


@settings(max_examples=50, deadline=None)
@given(energy=st.floats(0.0, 1e7), mass=st.floats(0.01, 100.0), alloy=st.sampled_from(sorted(ALLOYS)))
def test_rise_times_heat_capacity_returns_the_energy(energy, mass, alloy):
    rise = adiabatic_rise_k(energy, mass, alloy)
    assert rise * mass * ALLOYS[alloy].specific_heat_j_per_kg_k == pytest.approx(energy, rel=1e-12, abs=1e-9)


# -- a duty cycle of starts and braking stops ------------------------------------------------------------
# Checks: the r.m.s. definition I_rms² = (1/T)∫i²dt over the hour, the mean power E z / 3600, and the first
# law of a body without losses ΔT = E/(m c) (any heat-transfer text), each written out here.


def test_cycle_duty_against_the_definitions():
    from notchwise.formulas.resistors import ALLOYS, braking_grid_ohm, cycle_duty

    r = np.array([1.0, 0.5, 0.25])
    i2t_start = np.array([4.0e4, 3.0e4, 2.0e4])
    i2t_stop, z_a, z_b, mass = 5.0e4, 30.0, 20.0, 2.0
    duty = cycle_duty(r, i2t_start, i2t_stop, 2, z_a, z_b, 3.0, 4.0, mass, "AISI 304")
    assert braking_grid_ohm(r, 2) == pytest.approx(0.75)
    carried_start = np.cumsum(i2t_start)  # section s is in circuit on notches 1..s
    carried_stop = np.array([0.0, i2t_stop, i2t_stop])  # sections 2 and 3 form the braking resistor
    assert duty.energy_start_j == pytest.approx(r * carried_start)
    assert duty.energy_stop_j == pytest.approx(r * carried_stop)
    assert duty.i_rms_a == pytest.approx(np.sqrt((z_a * carried_start + z_b * carried_stop) / 3600.0))
    assert duty.power_w == pytest.approx(r * (z_a * carried_start + z_b * carried_stop) / 3600.0)
    c = ALLOYS["AISI 304"].specific_heat_j_per_kg_k
    assert duty.rise_k == pytest.approx(r * (carried_start + carried_stop) / (mass * c))


@pytest.mark.parametrize("change, words", [
    ({"brake_from": 4}, "brake_from (4) must be from 1 to 3"),
    ({"brake_from": 0}, "brake_from (0) must be from 1 to 3"),
    ({"stops_per_hour": 0.0}, "stops_per_hour (0 1/h) must be above zero"),
    ({"i2t_stop_a2s": -1.0}, "must not be negative"),
    ({"stops_per_hour": 2000.0}, "do not fit in an hour"),
    ({"mass_kg": -1.0}, "mass"),
    # A mass column whose length is neither 1 nor the number of sections (found by the hostile-input test).
    ({"mass_kg": [1.0, 2.0]}, "mass has 2 entries; give one for all sections or one per section (3)"),
])
def test_cycle_duty_bad_inputs(change, words):
    from notchwise.formulas.resistors import cycle_duty

    arguments = dict(r_section_ohm=[1.0, 0.5, 0.25], i2t_start_a2s=[4e4, 3e4, 2e4], i2t_stop_a2s=5e4, brake_from=1,
                     starts_per_hour=30.0, stops_per_hour=20.0, start_time_s=3.0, stop_time_s=4.0, mass_kg=2.0,
                     alloy="AISI 304")
    with pytest.raises((InputError, DesignError)) as caught:
        cycle_duty(**{**arguments, **change})
    assert words in str(caught.value)
