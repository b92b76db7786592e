"""Wrong kinds of argument to the public core functions give the project's own errors, quoting the value.

Each public function of the protection and resistor modules is called with a
valid set of arguments in which ONE argument is replaced by text, a blank
(None), a ragged list of rows, a mapping or a 2-D array where a curve, an
element, a number or a list of numbers is wanted. Only ``InputError``,
``InputTypeError`` or ``DesignError`` may come out, and the message quotes
the value (shortened) or says the argument is empty.
"""

from __future__ import annotations

import inspect

import pytest

from notchwise.formulas import current_transformers, protection, relays, resistors, thermal
from notchwise.formulas.dc_motor import ShuntMotor
from notchwise.formulas.errors import DesignError, InputError, InputTypeError, shown

SI, VI, MI = relays.curve_named("IEC SI"), relays.curve_named("IEC VI"), relays.curve_named("IEEE MI")
ELEMENT = thermal.thermal_element(100.0, 1.3, 900.0)
T_S, I_A = [0.0, 1.5, 1.5, 3.0, 6.0], [420.0, 300.0, 420.0, 300.0, 120.0]

#: A valid call of every public core function of the modules under test.
VALID = {
    relays.curve_named: ("IEC SI",),
    relays.checked_flat_from: (20.0,),
    relays.current_history: (T_S, I_A),
    relays.operate_time_s: (SI, [200.0, 500.0], 100.0, 0.2),
    relays.multiplier_for_time: (VI, 600.0, 100.0, 1.5),
    relays.current_for_time_a: (SI, 2.0, 100.0, 0.5),
    relays.reset_time_s: (MI, [0.0, 50.0], 100.0, 2.0),
    relays.definite_time_s: ([200.0, 50.0], 100.0, 0.1),
    relays.operate_progress: (SI, T_S, I_A, 100.0, 0.2, None),
    relays.definite_progress: (T_S, I_A, 100.0, 0.1),
    relays.instantaneous_progress: (T_S, I_A, 500.0),
    thermal.thermal_element: (100.0, 1.05, 900.0),
    thermal.checked_element: (ELEMENT, "thermal"),
    thermal.thermal_trip_time_s: (ELEMENT, [150.0, 300.0], 60.0),
    thermal.thermal_state: (ELEMENT, T_S, I_A, 60.0),
    protection.ride_through: (T_S, I_A, VI, 140.0, 1.2, 650.0, 0.0, ELEMENT, 120.0),
    protection.propose_settings: (T_S, I_A, VI, 120.0, 420.0, 30.0, 1.15, 0.3, 0.2, 0.3, 0.01),
    protection.coordinate_upstream: (SI, 300.0, VI, 138.0, 1.2, 4000.0, 0.3, 650.0, 0.05),
    current_transformers.ct_primary_a: ([8.0, 130.0],),
    current_transformers.ct_ratio: (130.0, 5.0),
    resistors.section_energy_j: ([0.5, 0.25], [1e4, 2e4]),
    resistors.section_duty: ([0.5, 0.25], [1e4, 2e4], 30.0, 6.0),
    resistors.adiabatic_rise_k: (5e4, 2.0, "AISI 304"),
    resistors.braking_grid_ohm: ([0.5, 0.25], 1),
    resistors.cycle_duty: ([0.5, 0.25], [1e4, 2e4], 3e4, 1, 30.0, 20.0, 6.0, 4.0, 2.0, "AISI 304"),
    resistors.resistance_at_c: (2.0, 420.0, "AISI 304"),
    resistors.rise_verdict: ([100.0, 800.0], "short time"),
    resistors.cold_hot_start: (
        ShuntMotor(0.1, 0.4), 440.0, [1.0, 0.5, 0.25], 0.01, 5.0, 300.0, "AISI 304", 2.0, 20.0, 150.0, 200.0, None, 2.0,
    ),
}
#: Arguments that may be None (blank): optional ones.
OPTIONAL = {"inverse_reset", "highset_a", "thermal", "hot_c", "i_cut_a", "dwell_s"}
WRONG = ["abc", None, [[1.0, 2.0], [3.0]], {"a": 1.0}, "x" * 5000]
PROJECT_ERRORS = (InputError, InputTypeError, DesignError)
#: Labels for messages, not values: not checked.
LABELS = {("checked_element", "name")}
#: Arguments passed on to the start in time (``formulas/start_sim.py`` and the motor classes), whose checks
#: the machine-interface work is rewriting: known to let a raw error through or to omit the value.
#: (function, argument) -> (what happens, the kinds of wrong value it happens for).
DELEGATED: dict = {}


def _cases():
    for func, args in VALID.items():
        names = list(inspect.signature(func).parameters)
        for position in range(len(args)):
            for wrong in WRONG:
                key = (func.__name__, names[position])
                if (wrong is None and names[position] in OPTIONAL) or key in LABELS:
                    continue
                reason, kinds = DELEGATED.get(key, ("", ()))
                marks = [pytest.mark.xfail(strict=False, reason=reason)] if isinstance(wrong, kinds) else []
                yield pytest.param(
                    func, position, wrong, id=f"{func.__name__}-{names[position]}-{shown(wrong)[:12]}", marks=marks
                )


def test_every_public_core_function_has_a_valid_call():
    for module in (relays, thermal, protection, current_transformers, resistors):
        for name in module.__all__:
            member = getattr(module, name)
            if inspect.isfunction(member):
                assert member in VALID, f"{module.__name__}.{name} needs a valid call in VALID"
                member(*VALID[member])


def _quoted(wrong) -> tuple[str, ...]:
    """Text a message about ``wrong`` must hold: the value shortened, or one of its entries."""
    if wrong is None:
        return ("is empty", "None")
    if isinstance(wrong, list):
        return (shown(wrong), "[1.0, 2.0]", "[3.0]", "rows", "entries", "2-D", "shape")
    return (shown(wrong),)


@pytest.mark.parametrize("func, position, wrong", list(_cases()))
def test_a_wrong_kind_of_argument_gives_a_project_error_quoting_it(func, position, wrong):
    args = list(VALID[func])
    args[position] = wrong
    with pytest.raises(PROJECT_ERRORS) as caught:
        func(*args)
    message = str(caught.value)
    assert any(text in message for text in _quoted(wrong)), message
    assert len(message) < 300 and "\n" not in message, message
