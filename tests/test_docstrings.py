"""Every public core function documents every parameter with its unit, and its examples run.

The rule (DEVELOPERS.md, STYLE.md): a numpydoc Parameters section names every parameter of the
signature, and each description ends with the unit in brackets, ``[-]`` for a dimensionless one.
"""

from __future__ import annotations

import doctest
import importlib
import inspect
import pkgutil
import re

import numpy as np
import pytest

import notchwise.formulas

MODULES = [importlib.import_module(f"notchwise.formulas.{info.name}")
           for info in pkgutil.iter_modules(notchwise.formulas.__path__)]
UNIT_AT_END = re.compile(r"\[[^\[\]]+\]\.?$")

#: Parameters that break the rule today, in modules that other work is restructuring (the machine
#: interface: dc_motor, grading, start_sim, worst_case; input validation: errors, relays, thermal,
#: protection, current_transformers, resistors). To be fixed in those docstrings after the
#: restructuring, and then removed from here: the test fails on an entry that no longer fails.
KNOWN_GAPS = {
    "dc_motor.circuit_resistance_ohm: motor (not documented)",
    "dc_motor.circuit_resistance_ohm: r_external_ohm (not documented)",
    "dc_motor.developed_torque_nm: motor (no [unit] at the end)",
    "dc_motor.effective_supply_v: brush_drop_v (not documented)",
    "dc_motor.effective_supply_v: v_supply_v (not documented)",
    "dc_motor.magnetization_curve: excitation (no [unit] at the end)",
    "dc_motor.magnetization_curve: excitation_name (no [unit] at the end)",
    "dc_motor.minimum_load: motor (no [unit] at the end)",
    "dc_motor.residual_speed_rpm: motor (no [unit] at the end)",
    "dc_motor.series_torque_nm: curve (no [unit] at the end)",
    "dc_motor.steady_speed_rpm: motor (no [unit] at the end)",
    "errors.as_float: name (not documented)",
    "errors.as_float: unit (not documented)",
    "errors.as_float: value (not documented)",
    "errors.as_float_array: min_length (not documented)",
    "errors.as_float_array: name (not documented)",
    "errors.as_float_array: unit (not documented)",
    "errors.as_float_array: values (not documented)",
    "errors.as_magnitudes: name (not documented)",
    "errors.as_magnitudes: unit (not documented)",
    "errors.as_magnitudes: values (not documented)",
    "errors.as_time_series: name (not documented)",
    "errors.as_time_series: t_s (not documented)",
    "errors.as_time_series: unit (not documented)",
    "errors.as_time_series: value_name (not documented)",
    "errors.as_time_series: values (not documented)",
    "errors.choose: name (not documented)",
    "errors.choose: options (not documented)",
    "errors.choose: value (not documented)",
    "errors.quantity: unit (not documented)",
    "errors.quantity: value (not documented)",
    "errors.require_below: limit (not documented)",
    "errors.require_below: limit_name (not documented)",
    "errors.require_below: name (not documented)",
    "errors.require_below: unit (not documented)",
    "errors.require_below: value (not documented)",
    "errors.require_count: high (not documented)",
    "errors.require_count: low (not documented)",
    "errors.require_count: name (not documented)",
    "errors.require_count: value (not documented)",
    "errors.require_kind: kind (not documented)",
    "errors.require_kind: name (not documented)",
    "errors.require_kind: value (not documented)",
    "errors.require_kind: what (not documented)",
    "errors.require_non_negative: name (not documented)",
    "errors.require_non_negative: unit (not documented)",
    "errors.require_non_negative: value (not documented)",
    "errors.require_positive: name (not documented)",
    "errors.require_positive: unit (not documented)",
    "errors.require_positive: value (not documented)",
    "errors.shown: value (not documented)",
    "grading.check_sections: motor (no [unit] at the end)",
    "grading.checked_sections: sections_ohm (not documented)",
    "grading.grade_uniform: motor (no [unit] at the end)",
    "grading.grade_uniform: notches (no [unit] at the end)",
    "grading.notch_resistances_ohm: r_motor_ohm (not documented)",
    "grading.notch_resistances_ohm: sections_ohm (not documented)",
    "grading.peak_after_cut_a: motor (no [unit] at the end)",
    "protection.coordinate_upstream: curve (no [unit] at the end)",
    "protection.coordinate_upstream: curve_up (no [unit] at the end)",
    "protection.propose_settings: curve (no [unit] at the end)",
    "protection.ride_through: curve (no [unit] at the end)",
    "protection.ride_through: i_a (no [unit] at the end)",
    "protection.ride_through: t_s (no [unit] at the end)",
    "protection.ride_through: thermal (no [unit] at the end)",
    "relays.current_for_time_a: curve (no [unit] at the end)",
    "relays.current_history: i_a (not documented)",
    "relays.current_history: t_s (not documented)",
    "relays.curve_named: argument (not documented)",
    "relays.curve_named: name (not documented)",
    "relays.definite_progress: delay_s (not documented)",
    "relays.definite_progress: i_a (not documented)",
    "relays.definite_progress: pickup_a (not documented)",
    "relays.definite_progress: t_s (not documented)",
    "relays.definite_time_s: delay_s (not documented)",
    "relays.definite_time_s: i_a (not documented)",
    "relays.definite_time_s: pickup_a (not documented)",
    "relays.instantaneous_progress: i_a (not documented)",
    "relays.instantaneous_progress: pickup_a (not documented)",
    "relays.instantaneous_progress: t_s (not documented)",
    "relays.multiplier_for_time: curve (no [unit] at the end)",
    "relays.operate_progress: curve (no [unit] at the end)",
    "relays.operate_progress: inverse_reset (no [unit] at the end)",
    "relays.operate_time_s: curve (no [unit] at the end)",
    "relays.reset_time_s: curve (no [unit] at the end)",
    "resistors.adiabatic_rise_k: alloy (no [unit] at the end)",
    "resistors.cold_hot_start: alloy (no [unit] at the end)",
    "resistors.cold_hot_start: brush_drop_v (no [unit] at the end)",
    "resistors.cold_hot_start: dwell_s (no [unit] at the end)",
    "resistors.cold_hot_start: i_cut_a (no [unit] at the end)",
    "resistors.cold_hot_start: inertia_kgm2 (no [unit] at the end)",
    "resistors.cold_hot_start: l_circuit_h (no [unit] at the end)",
    "resistors.cold_hot_start: load (no [unit] at the end)",
    "resistors.cold_hot_start: motor (no [unit] at the end)",
    "resistors.cold_hot_start: v_supply_v (no [unit] at the end)",
    "resistors.resistance_at_c: alloy (no [unit] at the end)",
    "resistors.rise_verdict: limit (not documented)",
    "resistors.rise_verdict: rise_k (not documented)",
    "start_closed_form.held_phase: i_break (not documented)",
    "start_closed_form.held_phase: i_cut (not documented)",
    "start_closed_form.held_phase: l_h (not documented)",
    "start_closed_form.held_phase: notch (not documented)",
    "start_closed_form.held_phase: r (not documented)",
    "start_closed_form.held_phase: t_left (not documented)",
    "start_closed_form.held_phase: v_eff (not documented)",
    "start_closed_form.linear_running_phase: final_speed (not documented)",
    "start_closed_form.linear_running_phase: i_cut (not documented)",
    "start_closed_form.linear_running_phase: lin (not documented)",
    "start_closed_form.linear_running_phase: notch (not documented)",
    "start_closed_form.linear_running_phase: t_left (not documented)",
    "start_dc.advance_dc_notch: circuit (no [unit] at the end)",
    "start_dc.advance_dc_notch: machine (no [unit] at the end)",
    "start_dc.advance_dc_notch: notch (no [unit] at the end)",
    "start_dc.breakaway_current_a: i_top_a (not documented)",
    "start_dc.breakaway_current_a: machine (not documented)",
    "start_dc.breakaway_current_a: t_rest_nm (not documented)",
    "start_integrated.integrated_running_phase: circuit (no [unit] at the end)",
    "start_integrated.integrated_running_phase: notch (no [unit] at the end)",
    "start_load.load_torque: torque (no [unit] at the end)",
    "start_sim.checked_points: points (not documented)",
    "start_sim.load_torque: torque (no [unit] at the end)",
    "start_sim.settling_current_a: load (no [unit] at the end)",
    "start_sim.settling_current_a: motor (no [unit] at the end)",
    "start_sim.simulate_start: load (no [unit] at the end)",
    "start_sim.simulate_start: motor (no [unit] at the end)",
    "start_sim.start_history: motor (no [unit] at the end)",
    "start_sim.start_history: result (no [unit] at the end)",
    "thermal.checked_element: element (not documented)",
    "thermal.checked_element: name (not documented)",
    "thermal.thermal_element: i_base_a (not documented)",
    "thermal.thermal_element: k_factor (not documented)",
    "thermal.thermal_element: tau_s (not documented)",
    "thermal.thermal_state: element (no [unit] at the end)",
    "thermal.thermal_trip_time_s: element (no [unit] at the end)",
    "worst_case.sweep_corners: alloy (no [unit] at the end)",
    "worst_case.sweep_corners: brush_drop_v (no [unit] at the end)",
    "worst_case.sweep_corners: dwell_s (no [unit] at the end)",
    "worst_case.sweep_corners: i_cut_a (no [unit] at the end)",
    "worst_case.sweep_corners: inertia_kgm2 (no [unit] at the end)",
    "worst_case.sweep_corners: l_circuit_h (no [unit] at the end)",
    "worst_case.sweep_corners: load (no [unit] at the end)",
    "worst_case.sweep_corners: motor (no [unit] at the end)",
}


def _public_functions():
    for module in MODULES:
        for name in getattr(module, "__all__", ()):
            item = getattr(module, name)
            if inspect.isfunction(item):
                yield f"{module.__name__.rsplit('.', 1)[1]}.{name}", item


def parameter_descriptions(doc: str) -> dict:
    """Parameter name -> description text of a numpydoc Parameters section."""
    lines = inspect.cleandoc(doc or "").splitlines()
    try:
        start = next(k for k in range(len(lines) - 1)
                     if lines[k].strip() == "Parameters" and set(lines[k + 1].strip()) == {"-"})
    except StopIteration:
        return {}
    found, names = {}, []
    for k in range(start + 2, len(lines)):
        line = lines[k]
        if k + 1 < len(lines) and line.strip() and set(lines[k + 1].strip()) == {"-"}:
            break  # the next section
        if line and not line[0].isspace():
            names = [n.strip() for n in line.split(":")[0].split(",")]
            for n in names:
                found[n.lstrip("*")] = ""
        elif line.strip():
            for n in names:
                found[n.lstrip("*")] = (found[n.lstrip("*")] + " " + line.strip()).strip()
    return found


def unit_gaps(function) -> set:
    """``parameter (what is wrong)`` for every parameter not documented with a unit at the end."""
    documented = parameter_descriptions(function.__doc__)
    gaps = set()
    for name in inspect.signature(function).parameters:
        if name not in documented:
            gaps.add(f"{name} (not documented)")
        elif not UNIT_AT_END.search(documented[name]):
            gaps.add(f"{name} (no [unit] at the end)")
    return gaps


def all_gaps() -> set:
    return {f"{where}: {gap}" for where, function in _public_functions() for gap in unit_gaps(function)}


def test_the_parser_reads_numpydoc_parameters():
    def sample(a, b, c):
        """Summary.

        Parameters
        ----------
        a, b : float
            Two lengths,
            on two lines. [m]
        c : int
            A count.

        Returns
        -------
        float
            Area. [m²]
        """

    assert parameter_descriptions(sample.__doc__) == {"a": "Two lengths, on two lines. [m]",
                                                      "b": "Two lengths, on two lines. [m]", "c": "A count."}
    assert unit_gaps(sample) == {"c (no [unit] at the end)"}


def test_every_public_core_function_is_found():
    names = {where for where, _ in _public_functions()}
    assert len(names) > 20 and "relays.operate_time_s" in names and "dc_motor.steady_speed_rpm" in names


def test_every_parameter_of_every_public_core_function_has_its_unit():
    gaps = all_gaps()
    assert sorted(gaps - KNOWN_GAPS) == []


def test_known_gaps_are_still_gaps():
    assert sorted(KNOWN_GAPS - all_gaps()) == [], "fixed: remove these entries from KNOWN_GAPS"


# -- Examples (doctests) of the core -----------------------------------------------------------------

@pytest.mark.parametrize("module", MODULES, ids=lambda m: m.__name__.rsplit(".", 1)[1])
def test_the_examples_of_the_core_run(module):
    with np.printoptions(precision=6, suppress=True, legacy=False):
        result = doctest.testmod(module, optionflags=doctest.NORMALIZE_WHITESPACE | doctest.ELLIPSIS, verbose=False)
    assert result.failed == 0
