"""Spreadsheet functions for braking and lowering: braking resistor, stop in time, lowering speed and its check.

``motor`` is the name/value block of the start in time (see :mod:`notchwise.addin.dynamics`).
"""

from __future__ import annotations

import math

from notchwise.formulas.braking import MODES, brake_resistance_ohm, lowering_speed_rpm, overspeed_margin, simulate_stop
from notchwise.formulas.protection import Figure
from notchwise.formulas.resistors import ALLOYS, braking_grid_ohm, cycle_duty, resistance_at_c
from notchwise.formulas.start_sim import simulate_start

from .cells import (
    ERROR_PREFIX, cell_function, column, flag, guard, each, name_values, number, number_or_column, number_or_table, option,
    optional_count, optional_number, spill,
)
from .dynamics import MOTOR_NAMES, START_HELP, motor_from_cells, start_arguments
from .induction import ROTOR_KIND, ROTOR_NAMES, wound_rotor_from_cells
from .protection import caution_row, figure_table

__all__ = ["NW_BRAKE_RESISTOR", "NW_STOP_SIM", "NW_LOWERING_SPEED", "NW_LOWERING_CHECK", "NW_CYCLE_HEATING"]

CYCLE_HEADER = ["section", "R at ambient [ohm]", "energy per start [J]", "energy per stop [J]", "r.m.s. current [A]",
                "mean power [W]", "rise per start and stop [K]", "verdict"]
LOWERING_HEADER = ["lowering torque [N·m]", "lowering speed [rpm]", "margin to n_max [rpm]", "verdict"]

_DOC = {
    "motor": "Two columns of name/value pairs as for NW_START_SIM (kind, v_supply [V], r_motor [ohm], ...) or, kind wound rotor, as for NW_GRADE_ROTOR",
    "mag_curve": "Series: current [A] and EMF [V] at mag_speed, with its residual EMF at 0 A; blank for shunt",
    "lowering_mode": "DC: dynamic (armature on the resistor); wound rotor: counter-torque (connected to hoist, driven backwards) or regenerative (connected to lower, above synchronous). MORE resistance lowers FASTER [-]",
    "r_external": "Braking resistance outside the motor; wound rotor: per phase, rotor side [ohm]",
    "lowering_torque": "Torque of the descending load on the motor shaft [N·m]; a range gives a column",
    "n_max": "Highest safe speed of motor, gearing and load [rpm]",
    "headers": "Optional TRUE (default) for a first row of labels with units [-]",
}


#: Every name either motor block may hold, to find its kind before it is read.
_BLOCK_NAMES = tuple(dict.fromkeys((*MOTOR_NAMES, *ROTOR_NAMES)))


def _machine(motor, mag_curve) -> dict:
    """The machine from the motor block: the one place that dispatches on its kind (DC block or wound rotor)."""
    kind = name_values("motor", motor, _BLOCK_NAMES).get("kind")
    if isinstance(kind, str) and kind.strip().lower() == ROTOR_KIND:
        machine = wound_rotor_from_cells(motor)  # quasi-steady: no inductance or brush drop
        return dict(motor=machine, v_supply_v=machine.v_line_v, brush_drop_v=0.0, l_circuit_h=None,
                    inertia_kgm2=machine.inertia_kgm2)
    machine, v_supply, drop, l_h, j = motor_from_cells(motor, mag_curve)
    return dict(motor=machine, v_supply_v=v_supply, brush_drop_v=drop, l_circuit_h=l_h, inertia_kgm2=j)


@cell_function(
    mode="dynamic (armature switched onto the resistor) or plugging (armature reversed on the supply) [-]",
    v_supply="Supply voltage; enters plugging only [V]",
    r_armature="Resistance of the motor's armature circuit, series field included [ohm]",
    e_motor="Back-EMF as braking begins [V]",
    i_max="Highest braking current allowed [A]",
)
def NW_BRAKE_RESISTOR(mode, v_supply, r_armature, e_motor, i_max):
    """External braking resistance [ohm] that limits the current to i_max as dynamic braking or plugging begins at back-EMF e_motor."""
    return brake_resistance_ohm(
        option("mode", mode, ("dynamic", "plugging")), number("v_supply", v_supply, "V"),
        number("r_armature", r_armature, "ohm"), number("e_motor", e_motor, "V"), number("i_max", i_max, "A"),
    )


#: Help for the arguments both lowering functions take.
_LOWERING_DOCS = {name: _DOC[key] for name, key in (("motor", "motor"), ("r_external", "r_external"),
                  ("lowering_torque", "lowering_torque"), ("mode", "lowering_mode"), ("mag_curve", "mag_curve"))}


def _lowering(motor, r_external, mode, mag_curve):
    """``torque -> lowering speed`` for the converted cells of a lowering function."""
    machine = _machine(motor, mag_curve)
    r_x, chosen = number("r_external", r_external, "ohm"), option("mode", mode, MODES)
    return lambda t: lowering_speed_rpm(machine["motor"], r_x, t, chosen, machine["brush_drop_v"])


@cell_function(tables=("motor", "mag_curve"), **_LOWERING_DOCS)
def NW_LOWERING_SPEED(motor, r_external, lowering_torque, mode, mag_curve=None):
    """Steady speed [rpm] at which braking on r_external holds an overhauling load of lowering_torque; where none exists the cell says why."""
    return each("lowering_torque", lowering_torque, "N·m", _lowering(motor, r_external, mode, mag_curve))


@cell_function(tables=("motor", "mag_curve"), **_LOWERING_DOCS, n_max=_DOC["n_max"], headers=_DOC["headers"])
def NW_LOWERING_CHECK(motor, r_external, lowering_torque, mode, n_max, mag_curve=None, headers=None):
    """Per lowering torque: lowering speed [rpm], margin to n_max [rpm] and a verdict; a load the braking cannot hold says why."""
    speed_at = _lowering(motor, r_external, mode, mag_curve)
    limit = number("n_max", n_max, "rpm")
    overspeed_margin(0.0, limit)  # checks n_max before any row
    rows = []
    for t in column("lowering_torque", lowering_torque, "N·m"):
        speed = guard(speed_at, t)
        if isinstance(speed, str):
            rows.append([t, speed.removeprefix(ERROR_PREFIX), math.nan, "NOT HELD: no steady lowering speed, see the speed cell"])
        else:
            rows.append([t, speed, *overspeed_margin(speed, limit)])
    rows.append(caution_row(len(LOWERING_HEADER)))
    return spill(LOWERING_HEADER, rows, flag("headers", headers, True))


@cell_function(
    tables=("motor", "load_torque", "mag_curve"),
    motor=_DOC["motor"],
    r_brake="Braking resistance outside the motor; wound rotor: per phase, rotor side [ohm]",
    mode="dynamic (DC: armature onto the resistor, supply off) or plugging (reversed on the supply; wound rotor: plugging only) [-]",
    load_torque="Load torque against motion: a number [N·m] or two columns, speed [rpm] and torque [N·m]; negative overhauls",
    n_start="Speed as braking begins [rpm]",
    n_end="Optional speed the stop is taken to [rpm]; blank: 0 rpm (dynamic braking then needs a load opposing motion)",
    mag_curve=_DOC["mag_curve"],
    headers=_DOC["headers"],
    n_max="Optional highest safe speed [rpm]; gives an overspeed verdict",
)
def NW_STOP_SIM(motor, r_brake, mode, load_torque, n_start, n_end=None, mag_curve=None, headers=None, n_max=None):
    """A braking stop in time: time to n_end [s], revolutions, peak current [A], braking torque [N·m], energies [J], each with its basis."""
    machine = _machine(motor, mag_curve)
    chosen = option("mode", mode, MODES)
    result = simulate_stop(
        r_brake_ohm=number("r_brake", r_brake, "ohm"),
        mode=chosen,
        load=number_or_table("load_torque", load_torque, ("speed", "torque"), ("rpm", "N·m")),
        n_start_rpm=number("n_start", n_start, "rpm"),
        n_end_rpm=optional_number("n_end", n_end, None, "rpm"),
        **machine,
    )
    limit = optional_number("n_max", n_max, None, "rpm")
    return figure_table(_stop_figures(result, chosen, limit, machine["motor"].kind == ROTOR_KIND), headers)


def _stop_figures(result, mode, n_max, rotor) -> list:
    """The rows of NW_STOP_SIM: the stop's figures with their basis, the overspeed verdict where n_max is given."""
    end = f"{result.n_end_rpm:.4g} rpm"
    at_end = ("; at standstill the motor must be disconnected or it starts in reverse"
              if mode == "plugging" else "")
    if rotor:
        return _rotor_stop_figures(result, end, at_end, n_max)
    figures = [
        Figure("time to n_end", result.t_stop_s, "s", f"{mode} braking from the start of braking to {end}{at_end}"),
        Figure("revolutions turned", result.revolutions, "rev", "in that time"),
        Figure("peak current", result.i_peak_a, "A", "highest braking current, circuit inductance included"),
        Figure("highest speed", result.n_peak_rpm, "rpm", "above n_start where an overhauling load speeds the shaft up first"),
        Figure("braking torque at the start", result.torque_start_nm, "N·m",
               "at n_start once the current has built up (inductance neglected)"),
        Figure("braking torque at the end", result.torque_end_nm, "N·m", f"as the speed reaches {end}"),
        Figure("energy in braking resistor", result.energy_brake_j, "J", "r_brake x integral of i² dt"),
        Figure("energy in motor resistance", result.energy_motor_j, "J", "r_motor x integral of i² dt"),
        Figure("energy from the supply", result.energy_supply_j, "J",
               "v_supply x integral of i dt" if mode == "plugging" else "dynamic braking: supply disconnected"),
    ]
    if result.build_up is not None:
        figures += [
            Figure("least build-up current", result.build_up.i_least_a, "A",
                   "series self-excited braking: below it the field rests on residual flux"),
            Figure("critical speed", result.build_up.critical_speed_rpm, "rpm",
                   "below it the braking circuit is above the critical resistance; braking rests on residual flux and the load"),
        ]
    return figures + _overspeed(result, n_max)


def _overspeed(result, n_max) -> list:
    """The overspeed row where n_max is given."""
    if n_max is None:
        return []
    margin, verdict = overspeed_margin(result.n_peak_rpm, n_max)
    return [Figure("overspeed margin", margin, "rpm", f"n_max {n_max:.4g} rpm less the highest speed: {verdict}")]


def _rotor_stop_figures(result, end, at_end, n_max) -> list:
    """The rows of NW_STOP_SIM for a plugged wound-rotor motor (quasi-steady; currents rotor side)."""
    return [
        Figure("time to n_end", result.t_stop_s, "s", f"plugging (two stator phases swapped) to {end}{at_end}; "
               "quasi-steady, rotor transient neglected"),
        Figure("revolutions turned", result.revolutions, "rev", "in that time"),
        Figure("peak rotor current", result.i_peak_a, "A", "rotor side, per phase, as plugging begins (slip 1 + n/n_s)"),
        Figure("braking torque at the start", result.torque_start_nm, "N·m", "at n_start"),
        Figure("braking torque at the end", result.torque_end_nm, "N·m", f"as the speed reaches {end}"),
        Figure("energy in braking resistor", result.energy_brake_j, "J", "its share of the rotor copper loss s x P_ag"),
        Figure("energy in rotor winding", result.energy_motor_j, "J", "the rotor's own share of s x P_ag"),
        Figure("energy from the supply", result.energy_supply_j, "J", "air-gap power plus stator copper loss"),
    ] + _overspeed(result, n_max)


@cell_function(
    tables=("motor", "sections", "load_torque", "switching", "mass", "stop_torque", "mag_curve"),
    motor="Two columns of name/value pairs as for NW_START_SIM (a DC motor block) [-]",
    sections=START_HELP["sections_20c"],
    load_torque="Load torque of the start: a number [N·m] or two columns, speed [rpm] and torque [N·m]",
    switching=START_HELP["switching"],
    alloy=START_HELP["alloy"],
    mass="Mass of resistive element per section: one value for all, or a column [kg]",
    starts_per_hour="Starts per hour [1/h]",
    stop_mode="Braking connection of the stop: dynamic or plugging [-]",
    stop_torque="Load torque against motion during the stop: a number [N·m] or speed/torque columns; negative overhauls",
    n_stop="Speed as braking begins [rpm]",
    stops_per_hour="Braking stops per hour [1/h]",
    brake_from="Optional first section of the braking resistor [-]: the stop's current flows through it and every later section; blank: 1 (the whole grid)",
    n_end="Optional speed the stop is taken to [rpm]; blank: 0 rpm",
    ambient="Optional grid temperature at ambient [°C]; blank: 20 °C",
    mag_curve=START_HELP["mag_curve"],
    headers=_DOC["headers"],
)
def NW_CYCLE_HEATING(motor, sections, load_torque, switching, alloy, mass, starts_per_hour, stop_mode, stop_torque, n_stop,
                     stops_per_hour, brake_from=None, n_end=None, ambient=None, mag_curve=None, headers=None):
    """Per section over a cycle of starts and braking stops: energy per start and per stop [J], rms current [A], mean power [W], adiabatic rise [K], verdict."""
    arguments, r_20 = start_arguments(motor, sections, load_torque, switching, mag_curve)
    chosen_alloy, one_mass, masses = option("alloy", alloy, tuple(ALLOYS)), *number_or_column("mass", mass, "kg")
    r_ambient = resistance_at_c(r_20, optional_number("ambient", ambient, 20.0, "°C"), chosen_alloy)
    first = optional_count("brake_from", brake_from) or 1
    r_brake = braking_grid_ohm(r_ambient, first)
    start = simulate_start(sections_ohm=r_ambient, **arguments)
    stop = simulate_stop(
        motor=arguments["motor"], v_supply_v=arguments["v_supply_v"], r_brake_ohm=r_brake,
        mode=option("stop_mode", stop_mode, MODES), l_circuit_h=arguments["l_circuit_h"],
        inertia_kgm2=arguments["inertia_kgm2"], brush_drop_v=arguments["brush_drop_v"],
        load=number_or_table("stop_torque", stop_torque, ("speed", "torque"), ("rpm", "N·m")),
        n_start_rpm=number("n_stop", n_stop, "rpm"), n_end_rpm=optional_number("n_end", n_end, None, "rpm"),
    )
    per_hour = number("starts_per_hour", starts_per_hour, "1/h"), number("stops_per_hour", stops_per_hour, "1/h")
    duty = cycle_duty(r_ambient, start.i2t_a2s, stop.energy_brake_j / r_brake, first, *per_hour, start.t_accel_s, stop.t_stop_s, one_mass if masses is None else masses, chosen_alloy)
    rows = [[k + 1, r_ambient[k], duty.energy_start_j[k], duty.energy_stop_j[k], duty.i_rms_a[k], duty.power_w[k],
             duty.rise_k[k], duty.verdict[k]] for k in range(r_ambient.size)]
    rows.append([f"the stop's current flows through sections {first} to {r_ambient.size}", *([float("nan")] * 6),
                 "rise: one start then one stop, no cooling between"])
    return spill(CYCLE_HEADER, rows, flag("headers", headers, True))
