"""Spreadsheet functions for the start in time: notch table, time history, resistor heating, worst case.

The ``motor`` argument of these functions is a two-column range of name/value
pairs (names in any case, in any order):

=============  ========  ==========================================================
name           unit      meaning
=============  ========  ==========================================================
kind           -         shunt (also separately excited), series or compound
v_supply       V         supply voltage at the starter
r_motor        ohm       motor's own circuit resistance (armature plus series field)
l_circuit      H         inductance of the armature circuit
inertia        kg·m²     motor plus load, referred to the motor shaft
k_phi          V/rpm     shunt only: back-EMF per rpm at the working field
mag_speed      rpm       series, compound: speed at which mag_curve was taken
brush_drop     V         optional total brush drop (blank: 0 V)
shunt_at       A         compound only: shunt-field ampere-turns per pole
series_turns   turns     compound only: series-field turns per pole
=============  ========  ==========================================================

A wound-rotor motor (kind ``wound rotor``) is given by the block of
``NW_GRADE_ROTOR`` (``addin/induction.py``: v_line, frequency, poles, the T
circuit, e_rotor, inertia) and started quasi-steadily; its sections are
rotor-side ohm per phase, its currents rotor currents (rotor side), its
energies three phases, and the tables gain a stator-current column last.
"""

from __future__ import annotations

from notchwise.formulas.errors import InputError
from notchwise.formulas.resistors import ALLOYS, cold_hot_start, rise_verdict, section_duty
from notchwise.formulas.start_sim import checked_points, simulate_start, start_history
from notchwise.formulas.worst_case import sweep_corners

from .cells import (
    cell_function, column, flag, name_values, number, number_or_column, number_or_table, option, optional_number, spill,
)
from .induction import ROTOR_KIND, ROTOR_NAMES
from .starters import MOTOR_KINDS, machine_from_cells

__all__ = ["NW_START_SIM", "NW_START_HISTORY", "NW_SECTION_HEATING", "NW_WORST_CASE"]

DC_NAMES = ("v_supply", "r_motor", "l_circuit", "inertia")
#: The names each kind needs besides ``kind`` (one entry per kind of MACHINES); any other name is refused.
KIND_NAMES = {
    "shunt": (*DC_NAMES, "k_phi"),
    "series": (*DC_NAMES, "mag_speed"),
    "compound": (*DC_NAMES, "mag_speed", "shunt_at", "series_turns"),
    ROTOR_KIND: tuple(ROTOR_NAMES),
}
#: Names a kind may give or leave out.
OPTIONAL_NAMES = {"shunt": ("brush_drop",), "series": ("brush_drop",), "compound": ("brush_drop",), ROTOR_KIND: ()}
#: The name of each kind's supply voltage.
SUPPLY_NAMES = {ROTOR_KIND: "v_line"}
MOTOR_NAMES = tuple(dict.fromkeys(("kind", *(n for kind in KIND_NAMES for n in (*KIND_NAMES[kind], *OPTIONAL_NAMES[kind])))))
UNITS = {"v_supply": "V", "r_motor": "ohm", "l_circuit": "H", "inertia": "kg·m²", "k_phi": "V/rpm",
         "mag_speed": "rpm", "brush_drop": "V", "shunt_at": "A", "series_turns": "turns", **ROTOR_NAMES}

START_HEADER = ["notch", "start time [s]", "dwell [s]", "peak current [A]", "switching current [A]",
                "speed at cut-out [rpm]", "energy in starting resistance [J]"]
#: What the figures of the "whole start" row of START_HEADER's table are, column by column (the last for a wound rotor).
WHOLE_START_HEADER = ["", "from [s]", "acceleration time [s]", "highest peak current [A]", "",
                      "final speed [rpm]", "energy in starting resistance, whole start [J]",
                      "highest peak stator current [A]"]
HISTORY_HEADER = ["time [s]", "current [A]", "speed [rpm]", "motor torque [N·m]"]
#: The last column of the start's tables for a wound-rotor motor (a DC machine has no stator: its tables stay as they are).
STATOR_HEADER = "stator current [A]"
STATOR_PEAK_HEADER = "peak stator current [A]"
HEATING_HEADER = ["section", "R cold [ohm]", "R hot [ohm]", "energy per start [J]", "r.m.s. current [A]",
                  "mean power [W]", "rise per start [K]", "peak cold [A]", "peak hot [A]", "verdict"]
WORST_HEADER = ["figure", "value", "supply [V]", "tolerance [-]", "grid temperature [°C]", "notch"]

#: Help for the arguments of the start in time, with units; the braking functions reuse it.
START_HELP = {
    "motor": "Name/value pairs: kind; DC: v_supply [V], r_motor [ohm], l_circuit [H], inertia [kg·m²], k_phi [V/rpm] or mag_speed [rpm], ...; wound rotor: the block of NW_GRADE_ROTOR",
    "sections": "Section resistances in the order they are cut out (wound rotor: per phase, rotor side): a column or row [ohm]",
    "load_torque": "Load torque on the motor shaft: a number [N·m] or two columns, speed [rpm] and torque [N·m]; a negative value makes it a gravity load that drives the shaft, even at rest",
    "switching": "Switching current of current-limit switching (wound rotor: rotor current) [A], or a column of dwell times, one per section [s]",
    "mag_curve": "Series: current [A] and EMF [V] at mag_speed; compound: ampere-turns per pole [A] and EMF [V]; blank for shunt",
    "headers": "Optional TRUE (default) for a first row of labels with units [-]",
    "alloy": "Grid alloy [-]: " + ", ".join(ALLOYS),
    "ambient": "Optional temperature of the cold grid [°C]; blank: 20 °C",
    "sections_20c": "Section resistances at 20 °C in the order they are cut out (wound rotor: per phase, rotor side): a column or row [ohm]",
}
#: Help for the four arguments that describe a start, shared by every function here.
_START_DOCS = {name: START_HELP[name] for name in ("motor", "sections", "load_torque", "switching")}
_GRID_DOCS = {**_START_DOCS, "sections": START_HELP["sections_20c"]}


def motor_from_cells(motor, mag_curve):
    """The machine, supply, brush drop, inductance (None for a wound rotor) and inertia from a name/value range."""
    given = name_values("motor", motor, MOTOR_NAMES)
    if "kind" not in given:
        raise _missing("kind")
    kind = option("motor kind", given["kind"], MOTOR_KINDS)
    allowed = ("kind", *KIND_NAMES[kind], *OPTIONAL_NAMES[kind])
    for key in given:
        if key not in allowed:
            raise InputError(f"motor row {key} does not apply to a {kind} motor; the names for it are: {', '.join(allowed)}")
    for key in KIND_NAMES[kind]:
        if key not in given:
            raise _missing(key, kind)
    values = {key: number(key, raw, UNITS[key]) for key, raw in given.items() if key not in ("kind", "brush_drop")}
    machine = machine_from_cells("motor kind", kind, {**values, "mag_curve": mag_curve})
    drop = optional_number("brush_drop", given.get("brush_drop"), 0.0, "V")
    return machine, values[SUPPLY_NAMES.get(kind, "v_supply")], drop, values.get("l_circuit"), values["inertia"]


def _missing(key, kind=None) -> InputError:
    unit = f" [{UNITS[key]}]" if UNITS.get(key) else ""
    for_kind = f" for a {kind} motor" if kind else ""
    return InputError(f"motor needs a row named {key}{unit}{for_kind}")


def start_arguments(motor, sections, load_torque, switching, mag_curve) -> dict:
    """The keyword arguments of a start, converted from its cells."""
    machine, v_supply, drop, l_h, j = motor_from_cells(motor, mag_curve)
    i_cut, dwells = number_or_column("switching", switching, "A or s")
    return dict(
        motor=machine,
        v_supply_v=v_supply,
        l_circuit_h=l_h,
        inertia_kgm2=j,
        load=number_or_table("load_torque", load_torque, ("speed", "torque"), ("rpm", "N·m")),
        i_cut_a=i_cut,
        dwell_s=dwells,
        brush_drop_v=drop,
    ), column("sections", sections, "ohm")


def start_from_cells(motor, sections, load_torque, switching, mag_curve):
    """Convert the cells of a start and simulate it; returns (machine, result)."""
    arguments, resistances = start_arguments(motor, sections, load_torque, switching, mag_curve)
    return arguments["motor"], simulate_start(sections_ohm=resistances, **arguments)


@cell_function(
    tables=("motor", "sections", "load_torque", "switching", "mag_curve"),
    **_START_DOCS,
    mag_curve=START_HELP["mag_curve"],
    headers=START_HELP["headers"],
)
def NW_START_SIM(motor, sections, load_torque, switching, mag_curve=None, headers=None):
    """Time-domain resistor start, one row per notch: start [s], dwell [s], peak and switching current [A], speed [rpm], energy [J]; then the run and the whole start."""
    machine, result = start_from_cells(motor, sections, load_torque, switching, mag_curve)
    nan = float("nan")
    rows = [
        [k + 1, result.t_start_s[k], result.dwell_s[k], result.i_peak_a[k], result.i_cut_a[k],
         result.n_cut_rpm[k], result.energy_notch_j[k]]
        for k in range(result.notches)
    ]
    t_last = result.t_start_s[-1] + result.dwell_s[-1]
    rows.append(["run", t_last, nan, result.i_peak_run_a, nan, nan, nan])
    rows.append(["whole start", 0.0, result.t_accel_s, max(result.i_peak_a.max(), result.i_peak_run_a), nan,
                 result.n_final_rpm, result.energy_total_j])
    if not machine.quasi_steady:
        return spill(START_HEADER, rows, flag("headers", headers, True))
    stator = [*result.i_stator_peak_a, result.i_stator_peak_run_a]
    stator.append(max(stator))
    return spill([*START_HEADER, STATOR_PEAK_HEADER], [[*row, i] for row, i in zip(rows, stator)], flag("headers", headers, True))


@cell_function(
    tables=("motor", "sections", "load_torque", "switching", "mag_curve"),
    **_START_DOCS,
    points="Number of evenly spaced times, 2 to 100000 [-]",
    mag_curve=START_HELP["mag_curve"],
    headers=START_HELP["headers"],
)
def NW_START_HISTORY(motor, sections, load_torque, switching, points, mag_curve=None, headers=None):
    """Time history of a resistor start at evenly spaced times: time [s], current [A], speed [rpm], motor torque [N·m]; wound rotor: rotor current, stator current [A] last."""
    count = checked_points(number("points", points))  # cheap checks before the simulation
    machine, result = start_from_cells(motor, sections, load_torque, switching, mag_curve)
    history = start_history(result, machine, count)
    columns = [history.t_s, history.i_a, history.n_rpm, history.torque_nm]
    if history.i_stator_a is None:
        return spill(HISTORY_HEADER, zip(*columns), flag("headers", headers, True))
    return spill([*HISTORY_HEADER, STATOR_HEADER], zip(*columns, history.i_stator_a), flag("headers", headers, True))


@cell_function(
    tables=("motor", "sections", "load_torque", "switching", "mass", "mag_curve"),
    **_GRID_DOCS,
    alloy=START_HELP["alloy"],
    mass="Mass of resistive element per section (wound rotor: its three phases): one value for all, or a column [kg]",
    starts_per_hour="Starts per hour, for r.m.s. current and mean power [1/h]",
    ambient=START_HELP["ambient"],
    hot="Optional hot-grid temperature [°C]; blank: ambient plus each section's rise in one start",
    mag_curve=START_HELP["mag_curve"],
    headers=START_HELP["headers"],
)
def NW_SECTION_HEATING(
    motor, sections, load_torque, switching, alloy, mass, starts_per_hour, ambient=None, hot=None, mag_curve=None,
    headers=None,
):
    """Per section: energy per start [J], rms current [A], mean power [W], adiabatic rise [K], and peaks [A] cold and hot."""
    arguments, resistances = start_arguments(motor, sections, load_torque, switching, mag_curve)
    one_mass, masses = number_or_column("mass", mass, "kg")
    per_hour = number("starts_per_hour", starts_per_hour, "1/h")  # cheap checks before the simulation
    both = cold_hot_start(
        sections_20c_ohm=resistances,
        alloy=option("alloy", alloy, tuple(ALLOYS)),
        mass_kg=one_mass if masses is None else masses,
        ambient_c=optional_number("ambient", ambient, 20.0, "°C"),
        hot_c=optional_number("hot", hot, None, "°C"),
        **arguments,
    )
    cold = both.cold
    duty = section_duty(cold.r_section_ohm, cold.i2t_a2s, per_hour, cold.t_accel_s, cold.phases)
    verdicts = rise_verdict(both.rise_k)
    rows = zip(range(1, cold.notches + 1), both.r_cold_ohm, both.r_hot_ohm, duty.energy_j, duty.i_rms_a, duty.power_w,
               both.rise_k, cold.i_peak_a, both.hot.i_peak_a, verdicts)
    return spill(HEATING_HEADER, rows, flag("headers", headers, True))


@cell_function(
    tables=("motor", "sections", "load_torque", "switching", "points", "mag_curve"),
    **_GRID_DOCS,
    v_low="Low end of the supply band as a fraction of v_supply, e.g. -0.1 [-]",
    v_high="High end of the supply band as a fraction of v_supply, e.g. 0.1 [-]",
    tolerance="Resistor tolerance, swept from -tolerance to +tolerance, e.g. 0.05 [-]",
    alloy=START_HELP["alloy"],
    hot="Hottest grid temperature [°C]",
    points="Values per axis: one number for all, or three (supply, tolerance, temperature) [-]",
    ambient=START_HELP["ambient"],
    mag_curve=START_HELP["mag_curve"],
    headers=START_HELP["headers"],
)
def NW_WORST_CASE(
    motor, sections, load_torque, switching, v_low, v_high, tolerance, alloy, hot, points, ambient=None,
    mag_curve=None, headers=None,
):
    """Worst corner of supply band, resistor tolerance and grid temperature: the highest peak current [A] and the smallest cut-out margin [-]."""
    arguments, resistances = start_arguments(motor, sections, load_torque, switching, mag_curve)
    single, several = number_or_column("points", points, "-")
    counts = (single,) * 3 if several is None else tuple(several)
    sweep = sweep_corners(
        sections_20c_ohm=resistances,
        v_low=number("v_low", v_low),
        v_high=number("v_high", v_high),
        tolerance=number("tolerance", tolerance),
        alloy=option("alloy", alloy, tuple(ALLOYS)),
        ambient_c=optional_number("ambient", ambient, 20.0, "°C"),
        hot_c=number("hot", hot, "°C"),
        points=counts,
        **arguments,
    )
    return spill(WORST_HEADER, worst_case_rows(sweep), flag("headers", headers, True))


def worst_case_rows(sweep):
    """The rows of NW_WORST_CASE: figures over the corners that ran, then a count of every outcome."""
    nan = float("nan")

    def corner(label, value, index, notch):
        return [label, value, sweep.v_supply_v[index], sweep.tolerance[index], sweep.temperature_c[index], notch]

    rows = []
    runaway = sweep.first("runs away")
    if runaway >= 0:
        rows.append(corner("RUNAWAY [-]", sweep.reason[runaway], runaway, nan))
    if sweep.worst_peak < 0:
        rows.append(["highest peak current [A]", "no corner ran: see the counts below", nan, nan, nan, nan])
        rows.append(["smallest cut-out margin [-]", "no corner ran: no margin", nan, nan, nan, nan])
    else:
        rows.append(corner("highest peak current [A]", sweep.i_peak_a[sweep.worst_peak], sweep.worst_peak, nan))
        rows.append(corner("smallest cut-out margin [-]", sweep.margin[sweep.worst_margin],
                           sweep.worst_margin, sweep.margin_notch[sweep.worst_margin]))
    rows.append(["corners [-]", sweep.v_supply_v.size, nan, nan, nan, nan])
    for status, label in _STATUS_LABELS.items():
        count = sweep.count(status)
        if status == "stalls" or count:  # the other outcomes are listed where they occur
            rows.append([f"corners {label} [-]", count, nan, nan, nan, nan])
    for status in ("stalls", "steady below cut-out", "accelerating", "step bound", "failed"):
        first = sweep.first(status)
        if first >= 0:
            rows.append(corner(f"first corner {_STATUS_LABELS[status]} [-]", sweep.reason[first], first,
                               sweep.status_notch[first] or nan))
    return rows


#: Words for each outcome of a corner other than "ran" (formulas.worst_case.STATUSES), after "corners".
_STATUS_LABELS = {
    "stalls": "in which a notch stalls",
    "steady below cut-out": "that run steadily below the switching current",
    "accelerating": "still accelerating at the time cap",
    "runs away": "that run away",
    "step bound": "stopped at the step bound",
    "failed": "that failed",
}
