"""Spreadsheet functions for motor protection: relay curves, thermal element, CTs, ride-through, settings."""

from __future__ import annotations

import math

from notchwise.formulas.current_transformers import ct_primary_a, ct_ratio
from notchwise.formulas.protection import (
    CTI_S,
    HIGHSET_MARGIN,
    MULTIPLIER_STEP,
    SERVICE_FACTOR,
    STALL_MARGIN,
    START_MARGIN,
    coordinate_upstream,
    propose_settings,
    ride_through,
)
from notchwise.formulas.relays import (
    FLAT_FROM_MULTIPLE,
    curve_named,
    current_for_time_a,
    multiplier_for_time,
    operate_time_s,
    reset_time_s,
)
from notchwise.formulas.thermal import thermal_element, thermal_state, thermal_trip_time_s

from . import CAUTION
from .cells import at_once, cell_function, each, flag, number, optional_number, spill, table, width

__all__ = [
    "NW_RELAY_TIME",
    "NW_RELAY_MULTIPLIER",
    "NW_RELAY_CURRENT",
    "NW_RELAY_RESET_TIME",
    "NW_THERMAL_TIME",
    "NW_THERMAL_LEVEL",
    "NW_CT_PRIMARY",
    "NW_CT_RATIO",
    "NW_RIDE_THROUGH",
    "NW_PROPOSE_SETTINGS",
    "NW_COORDINATE",
]

RIDE_HEADER = ["element", "largest fraction of trip [-]", "at time [s]", "margin [-]", "verdict", "basis"]
FIGURE_HEADER = ["figure", "value", "unit", "basis"]
NO_OPERATION = "does not operate: at or below pickup"
NO_RESET = "does not reset: at or above pickup"
NO_THERMAL_TRIP = "does not trip: at or below k_factor x i_base"

_DOC = {
    "curve": "Curve: IEC SI, IEC VI, IEC EI, IEC LTI, IEC A, IEC B, IEC C, IEEE MI, IEEE VI or IEEE EI [-]",
    "current": "Current magnitude [A]; a range gives a column of results in one call",
    "pickup": "Pickup (setting) current of the element [A]",
    "multiplier": "Time multiplier: TMS for IEC curves, time dial for IEEE curves [-]",
    "target_time": "Wanted operating time [s]",
    "i_base": "Basic current of the thermal element, usually the motor's full-load current [A]",
    "k_factor": "k: the element carries k x i_base for ever without tripping [-]",
    "tau": "Heating time constant of the motor [s]",
    "i_prior": "Optional steady load before [A]; blank: 0 A, a cold start",
    "history": "Start: time [s] and current [A] columns, a row per sample, a text header skipped; a wound-rotor NW_START_HISTORY's five columns give its stator current",
    "highset": "Optional pickup of the high-set element [A]; blank: none",
    "highset_delay": "Optional definite-time delay of the high-set element [s]; blank: 0 s, instantaneous",
    "headers": "Optional TRUE (default) for a first row of labels with units [-]",
    "flat_from": "Optional multiple of pickup beyond which the curve is flat, definite time [-]; blank: 20 (IEC 60255-151)",
}


def _optional_thermal(i_base, k_factor, tau):
    if all(optional_number(n, v, None) is None for n, v in (("i_base", i_base), ("k_factor", k_factor), ("tau", tau))):
        return None
    return thermal_element(number("i_base", i_base, "A"), number("k_factor", k_factor), number("tau", tau, "s"))


#: NW_START_HISTORY's whole table of a wound-rotor start: the protected current is the stator's, its last column.
ROTOR_HISTORY = (("time", "rotor current", "speed", "torque", "stator current"), ("s", "A", "rpm", "N·m", "A"))


def _history(history):
    """Time and current: the first two columns, or of five (a wound-rotor start's history) the first and the last."""
    if width(history) == len(ROTOR_HISTORY[0]):
        rows = table("history", history, *ROTOR_HISTORY, min_rows=2)
        return rows[:, 0], rows[:, -1]
    rows = table("history", history, ("time", "current"), ("s", "A"), min_rows=2)
    return rows[:, 0], rows[:, 1]


def caution_row(width):
    """Last row of a table of settings or verdicts: the caution in its last column."""
    return ("caution", *[math.nan] * (width - 2), CAUTION)


def figure_table(figures, headers):
    """Figures (name, value, unit, basis) under the figure header, the caution last; also the stop in time's table."""
    rows = [*((f.name, f.value, f.unit, f.basis) for f in figures), caution_row(len(FIGURE_HEADER))]
    return spill(FIGURE_HEADER, rows, flag("headers", headers, True))


@cell_function(curve=_DOC["curve"], current=_DOC["current"], pickup=_DOC["pickup"], multiplier=_DOC["multiplier"],
               flat_from=_DOC["flat_from"])
def NW_RELAY_TIME(curve, current, pickup, multiplier, flat_from=None):
    """Operating time of an inverse-time overcurrent element (IEC 60255-151, IEEE C37.112) at a current [s]."""
    chosen = curve_named(curve)
    pickup_a, mult = number("pickup", pickup, "A"), number("multiplier", multiplier)
    flat = optional_number("flat_from", flat_from, FLAT_FROM_MULTIPLE)
    return at_once("current", current, "A", lambda i_a: operate_time_s(chosen, i_a, pickup_a, mult, flat), NO_OPERATION)


@cell_function(curve=_DOC["curve"], current=_DOC["current"], pickup=_DOC["pickup"], target_time=_DOC["target_time"],
               flat_from=_DOC["flat_from"])
def NW_RELAY_MULTIPLIER(curve, current, pickup, target_time, flat_from=None):
    """TMS or time dial at which an inverse-time element operates in target_time at a current [-]."""
    chosen = curve_named(curve)
    pickup_a, t_s = number("pickup", pickup, "A"), number("target_time", target_time, "s")
    flat = optional_number("flat_from", flat_from, FLAT_FROM_MULTIPLE)
    return each("current", current, "A", lambda i_a: multiplier_for_time(chosen, i_a, pickup_a, t_s, flat))


@cell_function(curve=_DOC["curve"], target_time=_DOC["target_time"], pickup=_DOC["pickup"], multiplier=_DOC["multiplier"],
               flat_from=_DOC["flat_from"])
def NW_RELAY_CURRENT(curve, target_time, pickup, multiplier, flat_from=None):
    """Current at which an inverse-time element with a given setting operates in target_time [A]."""
    return current_for_time_a(
        curve_named(curve), number("target_time", target_time, "s"), number("pickup", pickup, "A"),
        number("multiplier", multiplier), optional_number("flat_from", flat_from, FLAT_FROM_MULTIPLE),
    )


@cell_function(
    curve="Curve: IEEE MI, IEEE VI or IEEE EI; the IEC curves define no inverse reset [-]",
    current="Current magnitude below pickup [A]; a range gives a column of results in one call",
    pickup=_DOC["pickup"],
    multiplier="Time dial [-]",
)
def NW_RELAY_RESET_TIME(curve, current, pickup, multiplier):
    """Reset time of an IEEE C37.112 element from full progress, at a current below pickup [s]."""
    chosen = curve_named(curve)
    pickup_a, mult = number("pickup", pickup, "A"), number("multiplier", multiplier)
    return at_once("current", current, "A", lambda i_a: reset_time_s(chosen, i_a, pickup_a, mult), NO_RESET)


@cell_function(
    current=_DOC["current"], i_base=_DOC["i_base"], k_factor=_DOC["k_factor"], tau=_DOC["tau"], i_prior=_DOC["i_prior"]
)
def NW_THERMAL_TIME(current, i_base, k_factor, tau, i_prior=None):
    """Operating time of an IEC 60255-149 thermal overload element, cold or after a prior load [s]."""
    element = thermal_element(number("i_base", i_base, "A"), number("k_factor", k_factor), number("tau", tau, "s"))
    prior = optional_number("i_prior", i_prior, 0.0, "A")
    return at_once("current", current, "A", lambda i_a: thermal_trip_time_s(element, i_a, prior), NO_THERMAL_TRIP)


@cell_function(
    tables=("history",),
    history="Current history: two columns, time [s] and current [A]; a text header row is skipped",
    i_base=_DOC["i_base"],
    k_factor=_DOC["k_factor"],
    tau=_DOC["tau"],
    i_prior=_DOC["i_prior"],
)
def NW_THERMAL_LEVEL(history, i_base, k_factor, tau, i_prior=None):
    """Thermal level of an IEC 60255-149 element at the end of a current history, where 1 trips [-]."""
    element = thermal_element(number("i_base", i_base, "A"), number("k_factor", k_factor), number("tau", tau, "s"))
    state = thermal_state(element, *_history(history), optional_number("i_prior", i_prior, 0.0, "A"))
    return float(state.fraction[-1])


@cell_function(current="Current the CT must carry, e.g. full-load current on the AC supply side [A]; a range gives a column")
def NW_CT_PRIMARY(current):
    """Smallest IEC 61869-2 standard rated primary current at or above a current, for AC supply sides only [A]."""
    return at_once("current", current, "A", ct_primary_a)


@cell_function(
    current="Current the CT must carry, e.g. full-load current on the AC supply side [A]",
    secondary="Optional rated secondary current, 1 or 5 [A]; blank: 1 A",
)
def NW_CT_RATIO(current, secondary=None):
    """Turns ratio of the standard CT for a current: IEC 61869-2 primary over a 1 A or 5 A secondary [-]."""
    return float(ct_ratio(number("current", current, "A"), optional_number("secondary", secondary, 1.0, "A")))


@cell_function(
    tables=("history",),
    history=_DOC["history"],
    curve=_DOC["curve"],
    pickup=_DOC["pickup"],
    multiplier=_DOC["multiplier"],
    highset=_DOC["highset"],
    highset_delay=_DOC["highset_delay"],
    i_base="Optional thermal element: basic current [A]; blank with k_factor and tau: no thermal element",
    k_factor="Optional thermal element: k, carried for ever as k x i_base [-]",
    tau="Optional thermal element: heating time constant [s]",
    i_prior=_DOC["i_prior"],
    headers=_DOC["headers"],
)
def NW_RIDE_THROUGH(
    history, curve, pickup, multiplier, highset=None, highset_delay=None, i_base=None, k_factor=None, tau=None,
    i_prior=None, headers=None,
):
    """Largest fraction of trip each protection element reaches along a start, its margin and a verdict: one row each."""
    t_s, i_a = _history(history)
    checks = ride_through(
        t_s,
        i_a,
        curve_named(curve),
        number("pickup", pickup, "A"),
        number("multiplier", multiplier),
        optional_number("highset", highset, None, "A"),
        optional_number("highset_delay", highset_delay, 0.0, "s"),
        _optional_thermal(i_base, k_factor, tau),
        optional_number("i_prior", i_prior, 0.0, "A"),
    )
    rows = [*((c.element, c.peak, c.peak_s, c.margin, c.verdict, c.basis) for c in checks), caution_row(len(RIDE_HEADER))]
    return spill(RIDE_HEADER, rows, flag("headers", headers, True))


@cell_function(
    tables=("history",),
    history=_DOC["history"],
    curve=_DOC["curve"],
    i_full_load="Motor's full-load (rated) current [A]",
    i_stall="Current of a stalled motor, held until cleared (starting resistance in) [A]",
    t_stall="Time the motor withstands i_stall, from its maker [s]",
    service_factor=f"Optional overload pickup over full-load current [-]; blank: {SERVICE_FACTOR}",
    start_margin=f"Optional: the start may reach 1/(1 + start_margin) of trip [-]; blank: {START_MARGIN}",
    stall_margin=f"Optional: the stall is cleared within t_stall/(1 + stall_margin) [-]; blank: {STALL_MARGIN}",
    highset_margin=f"Optional: high-set pickup over the largest start current, less one [-]; blank: {HIGHSET_MARGIN}",
    multiplier_step=f"Optional setting step of the multiplier [-]; blank: {MULTIPLIER_STEP}",
    headers=_DOC["headers"],
)
def NW_PROPOSE_SETTINGS(
    history, curve, i_full_load, i_stall, t_stall, service_factor=None, start_margin=None, stall_margin=None,
    highset_margin=None, multiplier_step=None, headers=None,
):
    """Proposed overload pickup, high-set pickup and multiplier for a motor and its start, each with its reasoning."""
    t_s, i_a = _history(history)
    figures = propose_settings(
        t_s,
        i_a,
        curve_named(curve),
        number("i_full_load", i_full_load, "A"),
        number("i_stall", i_stall, "A"),
        number("t_stall", t_stall, "s"),
        optional_number("service_factor", service_factor, SERVICE_FACTOR),
        optional_number("start_margin", start_margin, START_MARGIN),
        optional_number("stall_margin", stall_margin, STALL_MARGIN),
        optional_number("highset_margin", highset_margin, HIGHSET_MARGIN),
        optional_number("multiplier_step", multiplier_step, MULTIPLIER_STEP),
    )
    return figure_table(figures, headers)


@cell_function(
    curve_up="Upstream curve, named as for curve [-]",
    pickup_up="Upstream pickup current [A]",
    curve=_DOC["curve"],
    pickup="Pickup of the motor's inverse-time element [A]",
    multiplier="Multiplier of the motor's inverse-time element [-]",
    i_max="Largest current both devices see, e.g. the fault current at the motor [A]",
    cti=f"Optional coordination time interval [s]; blank: {CTI_S} s",
    highset=_DOC["highset"],
    highset_delay=_DOC["highset_delay"],
    headers=_DOC["headers"],
    multiplier_up="Optional upstream multiplier as set, to check: its least margin and where [-]; blank: propose only",
    flat_from=_DOC["flat_from"],
)
def NW_COORDINATE(
    curve_up, pickup_up, curve, pickup, multiplier, i_max, cti=None, highset=None, highset_delay=None, headers=None,
    multiplier_up=None, flat_from=None,
):
    """Least upstream multiplier keeping the coordination interval at every current from the larger pickup to i_max, where it binds, and a check of a given upstream setting."""
    figures = coordinate_upstream(
        curve_named(curve_up, "curve_up"),
        number("pickup_up", pickup_up, "A"),
        curve_named(curve),
        number("pickup", pickup, "A"),
        number("multiplier", multiplier),
        number("i_max", i_max, "A"),
        optional_number("cti", cti, CTI_S, "s"),
        optional_number("highset", highset, None, "A"),
        optional_number("highset_delay", highset_delay, 0.0, "s"),
        optional_number("multiplier_up", multiplier_up, None),
        optional_number("flat_from", flat_from, FLAT_FROM_MULTIPLE),
    )
    return figure_table(figures, headers)
