"""Spreadsheet functions for DC starters: grading, section checks, series-motor limits."""

from __future__ import annotations

import numpy as np

from notchwise.formulas.dc_motor import (
    CompoundMotor,
    SeriesMotor,
    ShuntMotor,
    series_torque_nm,
    k_phi_from_rating,
    magnetization_curve,
    minimum_load,
    residual_speed_rpm,
    steady_speed_rpm,
)
from notchwise.formulas.errors import require_non_negative, require_positive
from notchwise.formulas.grading import check_sections, grade_uniform

from .induction import ROTOR_KIND, wound_rotor_from_values
from .cells import cell_function, each, flag, number, optional_count, optional_number, option, spill, table, column

__all__ = [
    "NW_GRADE_SHUNT",
    "NW_GRADE_SERIES",
    "NW_GRADE_COMPOUND",
    "NW_CHECK_SECTIONS",
    "NW_SERIES_SPEED",
    "NW_SERIES_TORQUE",
    "NW_SERIES_MIN_LOAD",
    "NW_SERIES_RESIDUAL_SPEED",
    "NW_SHUNT_KPHI",
]

GRADING_HEADER = ["notch", "R in circuit [ohm]", "section cut out [ohm]", "peak current [A]", "switching current [A]"]
CHECK_HEADER = [*GRADING_HEADER, "verdict"]

_DOC = {
    "v_supply": "Supply voltage at the starter [V]",
    "r_motor": "Motor's own resistance in the starter circuit: armature, interpoles and any series field [ohm]",
    "i_peak": "Current at the start of every notch, the upper limit [A]",
    "i_switch": "Least current at which a notch may be cut out, the lower limit [A]",
    "notches": "Optional fixed number of notches [-]; blank: the fewest that keep i_switch",
    "brush_drop": "Optional total brush drop [V]; blank: 0 V (2 V for carbon brushes is common practice)",
    "headers": "Optional TRUE (default) for a first row of labels with units [-]",
    "mag_curve": "Magnetization curve: two columns, current [A] and EMF [V] at mag_speed; a text header row is skipped",
    "mag_speed": "Speed at which mag_curve was measured [rpm]",
    "r_circuit": "Total circuit resistance: motor plus any external resistance [ohm]",
    "current": "Armature current [A]; a range gives a column of results",
}


#: Help of the arguments every grading function shares.
_GRADING_DOCS = {name: _DOC[name] for name in ("v_supply", "i_peak", "i_switch", "notches", "brush_drop", "headers")}


def series_curve_from_cells(mag_curve, mag_speed=None, optional=False):
    """A series motor's magnetization curve from its range; also used by the start-in-time cells."""
    rows = table("mag_curve", mag_curve, ("current", "EMF"), ("A", "V"), min_rows=2, optional=optional)
    if rows is None:
        return None
    return magnetization_curve(rows[:, 0], rows[:, 1], _speed(mag_speed))


def compound_motor_from_cells(r_motor, mag_curve, shunt_at, series_turns, mag_speed=None):
    """A compound motor from its cells; also used by the start-in-time cells."""
    rows = table("mag_curve", mag_curve, ("ampere-turns", "EMF"), ("A", "V"), min_rows=2)
    curve = magnetization_curve(rows[:, 0], rows[:, 1], _speed(mag_speed), excitation_name="ampere-turns")
    return CompoundMotor(
        number("r_motor", r_motor, "ohm"),
        curve,
        require_non_negative("shunt_at", number("shunt_at", shunt_at, "A"), "A"),
        require_positive("series_turns", number("series_turns", series_turns, "turns"), "turns"),
    )


def _speed(mag_speed):
    """The speed of a magnetization curve from its cell, named as the cell names it; None when blank. [rpm]"""
    return None if mag_speed is None else require_positive("mag_speed", number("mag_speed", mag_speed, "rpm"), "rpm")


def _shunt(cells):
    return ShuntMotor(number("r_motor", cells["r_motor"], "ohm"), optional_number("k_phi", cells.get("k_phi"), None, "V/rpm"))


def _series(cells):
    # Without mag_speed (grading, section checks) a blank curve is legitimate: flux proportional to current.
    speed = cells.get("mag_speed")
    return SeriesMotor(number("r_motor", cells["r_motor"], "ohm"),
                       series_curve_from_cells(cells.get("mag_curve"), speed, optional=speed is None))


def _compound(cells):
    return compound_motor_from_cells(cells["r_motor"], cells.get("mag_curve"), cells.get("shunt_at"),
                                     cells.get("series_turns"), cells.get("mag_speed"))


#: Every machine kind the cells accept, and how each is built from its cells (r_motor, mag_curve, k_phi,
#: mag_speed, shunt_at, series_turns as given; a wound rotor's block as NW_GRADE_ROTOR reads it). A new machine is one line here.
MACHINES = {"shunt": _shunt, "series": _series, "compound": _compound, ROTOR_KIND: wound_rotor_from_values}
MOTOR_KINDS = tuple(MACHINES)
#: The kinds graded and checked by current through speed continuity (the wound rotor has NW_CHECK_ROTOR).
CURRENT_GRADED_KINDS = ("shunt", "series", "compound")


def machine_from_cells(kind_name, kind, cells, kinds=MOTOR_KINDS):
    """The machine of ``kind`` (refused with the list of valid ``kinds``) from a dict of its cells."""
    return MACHINES[option(kind_name, kind, kinds)](cells)


def _graded_table(motor, v_supply, i_peak, i_switch, notches, brush_drop, headers):
    """The common cells of every grading function, graded and spilled."""
    grading = grade_uniform(
        motor,
        number("v_supply", v_supply, "V"),
        number("i_peak", i_peak, "A"),
        number("i_switch", i_switch, "A"),
        optional_count("notches", notches),
        optional_number("brush_drop", brush_drop, 0.0, "V"),
    )
    rows = zip(
        range(1, grading.notches + 1),
        grading.r_total_ohm,
        grading.r_section_ohm,
        grading.i_peak_a,
        grading.i_switch_a,
    )
    return spill(GRADING_HEADER, rows, flag("headers", headers, True))


@cell_function(**_GRADING_DOCS, r_motor=_DOC["r_motor"])
def NW_GRADE_SHUNT(v_supply, r_motor, i_peak, i_switch, notches=None, brush_drop=None, headers=None):
    """Graded starter sections of a DC shunt or separately excited motor: one row per notch, geometric current-limit law."""
    motor = ShuntMotor(require_positive("r_motor", r_motor, "ohm"))  # grading needs no k_phi
    return _graded_table(motor, v_supply, i_peak, i_switch, notches, brush_drop, headers)


@cell_function(
    tables=("mag_curve",),
    **_GRADING_DOCS,
    r_motor=_DOC["r_motor"],
    mag_curve="Optional magnetization curve: current [A] and EMF [V] columns; blank: flux proportional to current",
)
def NW_GRADE_SERIES(v_supply, r_motor, i_peak, i_switch, mag_curve=None, notches=None, brush_drop=None, headers=None):
    """Graded starter sections of a DC series motor, flux following current on its magnetization curve: one row per notch."""
    motor = _series({"r_motor": r_motor, "mag_curve": mag_curve})
    return _graded_table(motor, v_supply, i_peak, i_switch, notches, brush_drop, headers)


@cell_function(
    tables=("mag_curve",),
    **_GRADING_DOCS,
    r_motor=_DOC["r_motor"],
    mag_curve="Magnetization curve: field ampere-turns per pole [A] and EMF [V] columns; a text header row is skipped",
    shunt_at="Shunt-field ampere-turns per pole, constant [A]",
    series_turns="Series-field turns per pole [turns]",
)
def NW_GRADE_COMPOUND(
    v_supply, r_motor, i_peak, i_switch, mag_curve, shunt_at, series_turns, notches=None, brush_drop=None, headers=None
):
    """Graded starter sections of a cumulative compound DC motor, flux from shunt plus series ampere-turns: one row per notch."""
    motor = compound_motor_from_cells(r_motor, mag_curve, shunt_at, series_turns)
    return _graded_table(motor, v_supply, i_peak, i_switch, notches, brush_drop, headers)


@cell_function(
    tables=("sections", "mag_curve"),
    kind="Motor kind: shunt, series or compound [-]",
    v_supply=_DOC["v_supply"],
    r_motor=_DOC["r_motor"],
    sections="Section resistances in the order they are cut out: a column or row [ohm]",
    i_switch="Current at which each notch is cut out [A]",
    i_limit="Highest peak current the design allows [A]",
    i_commutation="Highest current the motor commutates without damage [A]",
    mag_curve="Series: current [A] and EMF [V] (blank: flux proportional to current); compound: ampere-turns [A] and EMF [V]",
    shunt_at="Compound only: shunt-field ampere-turns per pole [A]",
    series_turns="Compound only: series-field turns per pole [turns]",
    brush_drop=_DOC["brush_drop"],
    headers=_DOC["headers"],
)
def NW_CHECK_SECTIONS(
    kind,
    v_supply,
    r_motor,
    sections,
    i_switch,
    i_limit,
    i_commutation,
    mag_curve=None,
    shunt_at=None,
    series_turns=None,
    brush_drop=None,
    headers=None,
):
    """Peak current per notch of a given set of starter sections, with a verdict against peak and commutation limits."""
    motor = machine_from_cells(
        "kind", kind, {"r_motor": r_motor, "mag_curve": mag_curve, "shunt_at": shunt_at, "series_turns": series_turns},
        CURRENT_GRADED_KINDS,
    )
    result = check_sections(
        motor,
        number("v_supply", v_supply, "V"),
        column("sections", sections, "ohm"),
        number("i_switch", i_switch, "A"),
        number("i_limit", i_limit, "A"),
        number("i_commutation", i_commutation, "A"),
        optional_number("brush_drop", brush_drop, 0.0, "V"),
    )
    steps = [*range(1, result.r_total_ohm.size), "run"]
    rows = zip(steps, result.r_total_ohm, result.r_section_ohm, result.i_peak_a, result.i_switch_a, result.verdict)
    return spill(CHECK_HEADER, rows, flag("headers", headers, True))


@cell_function(
    tables=("mag_curve",),
    v_supply=_DOC["v_supply"],
    r_circuit=_DOC["r_circuit"],
    current=_DOC["current"],
    mag_curve=_DOC["mag_curve"],
    mag_speed=_DOC["mag_speed"],
    brush_drop=_DOC["brush_drop"],
)
def NW_SERIES_SPEED(v_supply, r_circuit, current, mag_curve, mag_speed, brush_drop=None):
    """Speed of a DC series motor carrying a given current, from its magnetization curve [rpm]."""
    motor = SeriesMotor(number("r_circuit", r_circuit, "ohm"), series_curve_from_cells(mag_curve, mag_speed))
    v = number("v_supply", v_supply, "V")
    drop = optional_number("brush_drop", brush_drop, 0.0, "V")
    return each("current", current, "A", lambda i_a: float(steady_speed_rpm(motor, v, i_a, 0.0, drop)))


@cell_function(
    tables=("mag_curve",),
    current=_DOC["current"],
    mag_curve=_DOC["mag_curve"],
    mag_speed=_DOC["mag_speed"],
)
def NW_SERIES_TORQUE(current, mag_curve, mag_speed):
    """Developed torque of a DC series motor at a given current, from its magnetization curve [N·m]."""
    curve = series_curve_from_cells(mag_curve, mag_speed)
    return each("current", current, "A", lambda i_a: float(series_torque_nm(curve, i_a)))


@cell_function(
    tables=("mag_curve",),
    v_supply=_DOC["v_supply"],
    r_circuit=_DOC["r_circuit"],
    n_max="Highest safe speed of armature, gearing and load [rpm]",
    mag_curve=_DOC["mag_curve"],
    mag_speed=_DOC["mag_speed"],
    brush_drop=_DOC["brush_drop"],
)
def NW_SERIES_MIN_LOAD(v_supply, r_circuit, n_max, mag_curve, mag_speed, brush_drop=None):
    """Least armature current [A] and developed torque [N·m] that hold a series motor at or below n_max: one row."""
    result = minimum_load(
        SeriesMotor(number("r_circuit", r_circuit, "ohm"), series_curve_from_cells(mag_curve, mag_speed)),
        number("v_supply", v_supply, "V"),
        number("n_max", n_max, "rpm"),
        0.0,
        optional_number("brush_drop", brush_drop, 0.0, "V"),
    )
    return [[result.i_a, result.torque_nm]]


@cell_function(
    tables=("mag_curve",),
    v_supply=_DOC["v_supply"],
    r_circuit=_DOC["r_circuit"],
    mag_curve=_DOC["mag_curve"],
    mag_speed=_DOC["mag_speed"],
    brush_drop=_DOC["brush_drop"],
)
def NW_SERIES_RESIDUAL_SPEED(v_supply, r_circuit, mag_curve, mag_speed, brush_drop=None):
    """Speed a series motor would reach unloaded on its residual flux alone, a runaway warning figure [rpm]."""
    speed = residual_speed_rpm(
        SeriesMotor(number("r_circuit", r_circuit, "ohm"), series_curve_from_cells(mag_curve, mag_speed)),
        number("v_supply", v_supply, "V"),
        optional_number("brush_drop", brush_drop, 0.0, "V"),
    )
    if np.isinf(speed):
        return "unlimited: the curve has no residual flux at 0 A, so the unloaded motor runs away"
    return speed


@cell_function(
    v_rated="Rated armature voltage [V]",
    i_rated="Rated armature current [A]",
    n_rated="Rated speed [rpm]",
    r_motor=_DOC["r_motor"],
    brush_drop=_DOC["brush_drop"],
)
def NW_SHUNT_KPHI(v_rated, i_rated, n_rated, r_motor, brush_drop=None):
    """Back-EMF constant of a shunt or separately excited motor from its rating plate [V/rpm]."""
    return k_phi_from_rating(
        number("v_rated", v_rated, "V"),
        number("i_rated", i_rated, "A"),
        number("n_rated", n_rated, "rpm"),
        number("r_motor", r_motor, "ohm"),
        optional_number("brush_drop", brush_drop, 0.0, "V"),
    )
