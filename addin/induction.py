"""Spreadsheet functions for wound-rotor (slip-ring) induction motors: rotor grading, checks, torque, currents, dip.

The ``motor`` argument is a two-column range of name/value pairs (names in any
case, in any order), the per-phase T circuit of the equivalent star:

=============  ========  ==========================================================
name           unit      meaning
=============  ========  ==========================================================
kind           -         wound rotor
v_line         V         stator line voltage
frequency      Hz        supply frequency
poles          -         number of poles
r_stator       ohm       stator resistance per phase
x_stator       ohm       stator leakage reactance per phase
x_magnetizing  ohm       magnetizing reactance per phase
r_rotor        ohm       rotor resistance per phase, referred to the stator
x_rotor        ohm       rotor leakage reactance per phase, referred to the stator
e_rotor        V         rotor open-circuit standstill line voltage (rotor volts)
inertia        kg·m²     motor plus load, referred to the motor shaft
=============  ========  ==========================================================
"""

from __future__ import annotations

from notchwise.formulas.errors import InputError
from notchwise.formulas.induction_motor import WoundRotorMotor, check_rotor, grade_rotor, grade_rotor_plate
from notchwise.formulas.supply import voltage_dip

from .cells import at_once, cell_function, column, flag, name_values, number, optional_count, optional_number, option, spill

__all__ = [
    "NW_GRADE_ROTOR",
    "NW_GRADE_ROTOR_PLATE",
    "NW_CHECK_ROTOR",
    "NW_ROTOR_TORQUE",
    "NW_ROTOR_CURRENTS",
    "NW_VOLTAGE_DIP",
]

ROTOR_KIND = "wound rotor"
#: Block name -> unit; the field of WoundRotorMotor is the name with its unit (``r_stator_ohm``).
ROTOR_NAMES = {
    "v_line": "V", "frequency": "Hz", "poles": "", "r_stator": "ohm", "x_stator": "ohm", "x_magnetizing": "ohm",
    "r_rotor": "ohm", "x_rotor": "ohm", "e_rotor": "V", "inertia": "kg·m²",
}
_FIELDS = {"V": "_v", "Hz": "_hz", "": "", "ohm": "_ohm", "kg·m²": "_kgm2"}
GRADE_HEADER = ["step", "rotor R in circuit [ohm/phase]", "section cut out [ohm/phase]", "peak torque [N·m]",
                "switching torque [N·m]", "speed at cut-out [rpm]", "peak rotor current [A]", "peak stator current [A]"]
PLATE_HEADER = ["step", "R in circuit [ohm/phase]", "section cut out [ohm/phase]", "peak torque [-]",
                "switching torque [-]", "slip at cut-out [-]"]
CHECK_HEADER = ["step", "rotor R in circuit [ohm/phase]", "section cut out [ohm/phase]", "peak torque [N·m]",
                "peak stator current [A]", "verdict"]
CURRENTS_HEADER = ["stator current [A]", "rotor current [A]", "power factor [-]"]

_DOC = {
    "motor": "Two columns of name/value pairs: kind (wound rotor), v_line [V], frequency [Hz], poles, r_stator, x_stator, x_magnetizing, r_rotor, x_rotor [ohm], e_rotor [V], inertia [kg·m²]",
    "t_peak": "Torque at the start of every step, the upper limit [N·m]",
    "t_switch": "Least torque at which a step may be cut out [N·m]",
    "steps": "Optional fixed number of steps [-]; blank: the fewest that keep t_switch",
    "headers": "Optional TRUE (default) for a first row of labels with units [-]",
    "speed": "Shaft speed [rpm]; a range gives a column of results",
    "r_external": "Optional external rotor resistance per phase, rotor side [ohm]; blank: 0 ohm",
}


def wound_rotor_from_values(cells) -> WoundRotorMotor:
    """A wound-rotor motor from a dict of its block's values (every name of ROTOR_NAMES present); the MACHINES builder."""
    return WoundRotorMotor(**{key + _FIELDS[unit]: number(key, cells[key], unit) for key, unit in ROTOR_NAMES.items()})


def wound_rotor_from_cells(motor) -> WoundRotorMotor:
    """A wound-rotor motor from its name/value range; every name is needed, no other is accepted."""
    given = name_values("motor", motor, ("kind", *ROTOR_NAMES))
    for key in ("kind", *ROTOR_NAMES):
        if key not in given:
            unit = f" [{ROTOR_NAMES[key]}]" if ROTOR_NAMES.get(key) else ""
            raise InputError(f"motor needs a row named {key}{unit}; the names are: kind, {', '.join(ROTOR_NAMES)}")
    option("motor kind", given["kind"], (ROTOR_KIND,))
    return wound_rotor_from_values(given)


@cell_function(
    tables=("motor",),
    motor=_DOC["motor"],
    t_peak=_DOC["t_peak"],
    t_switch=_DOC["t_switch"],
    steps=_DOC["steps"],
    headers=_DOC["headers"],
)
def NW_GRADE_ROTOR(motor, t_peak, t_switch, steps=None, headers=None):
    """Graded rotor resistance of a wound-rotor motor, one row per step: R in circuit and section [ohm/phase, rotor side], torques [N·m], speed [rpm], currents [A]."""
    g = grade_rotor(
        wound_rotor_from_cells(motor), number("t_peak", t_peak, "N·m"), number("t_switch", t_switch, "N·m"),
        optional_count("steps", steps),
    )
    rows = zip(range(1, g.steps + 1), g.r_total_ohm, g.r_section_ohm, g.t_peak_nm, g.t_switch_nm, g.n_cut_rpm,
               g.i_rotor_peak_a, g.i_stator_peak_a)
    return spill(GRADE_HEADER, rows, flag("headers", headers, True))


@cell_function(
    e_rotor="Rotor open-circuit standstill line voltage, the rating plate's rotor volts [V]",
    i_rotor="Rated rotor current [A]",
    s_rated="Rated slip, e.g. 0.02 [-]",
    t_peak="Torque at the start of every step as a fraction of rated torque, e.g. 2 [-]",
    t_switch="Least torque at cut-out as a fraction of rated torque, e.g. 1.1 [-]",
    steps=_DOC["steps"],
    headers=_DOC["headers"],
)
def NW_GRADE_ROTOR_PLATE(e_rotor, i_rotor, s_rated, t_peak, t_switch, steps=None, headers=None):
    """Rotor resistance graded from the rating plate alone (torque proportional to slip over resistance, reactance neglected): one row per step [ohm/phase, -]."""
    g = grade_rotor_plate(
        number("e_rotor", e_rotor, "V"), number("i_rotor", i_rotor, "A"), number("s_rated", s_rated),
        number("t_peak", t_peak), number("t_switch", t_switch), optional_count("steps", steps),
    )
    rows = zip(range(1, g.steps + 1), g.r_total_ohm, g.r_section_ohm, g.t_peak, g.t_switch, g.s_cut)
    return spill(PLATE_HEADER, rows, flag("headers", headers, True))


@cell_function(
    tables=("motor", "sections"),
    motor=_DOC["motor"],
    sections="Rotor sections per phase, rotor side, in the order they are cut out: a column or row [ohm]",
    t_switch="Torque at which each step is cut out [N·m]",
    t_limit="Highest torque the drive allows: shaft, gearing, couplings [N·m]",
    i_limit="Highest stator current the supply and protection allow [A]",
    headers=_DOC["headers"],
)
def NW_CHECK_ROTOR(motor, sections, t_switch, t_limit, i_limit, headers=None):
    """A contractor's rotor sections checked per step and for the run: R in circuit [ohm/phase], peak torque [N·m], peak stator current [A] and a verdict."""
    result = check_rotor(
        wound_rotor_from_cells(motor), column("sections", sections, "ohm"), number("t_switch", t_switch, "N·m"),
        number("t_limit", t_limit, "N·m"), number("i_limit", i_limit, "A"),
    )
    steps = [*range(1, result.r_total_ohm.size), "run"]
    rows = zip(steps, result.r_total_ohm, result.r_section_ohm, result.t_peak_nm, result.i_stator_peak_a, result.verdict)
    return spill(CHECK_HEADER, rows, flag("headers", headers, True))


@cell_function(tables=("motor",), motor=_DOC["motor"], speed=_DOC["speed"], r_external=_DOC["r_external"])
def NW_ROTOR_TORQUE(motor, speed, r_external=None):
    """Air-gap torque of a wound-rotor motor at a speed with an external rotor resistance [N·m]; a column of speeds gives a column."""
    machine = wound_rotor_from_cells(motor)
    r_ext = optional_number("r_external", r_external, 0.0, "ohm")
    return at_once("speed", speed, "rpm", lambda n_rpm: machine.torque_at(n_rpm, r_ext))


@cell_function(
    tables=("motor",), motor=_DOC["motor"], speed=_DOC["speed"], r_external=_DOC["r_external"], headers=_DOC["headers"],
)
def NW_ROTOR_CURRENTS(motor, speed, r_external=None, headers=None):
    """Stator current [A], rotor current [A, rotor side] and power factor [-] of a wound-rotor motor, one row per speed."""
    machine = wound_rotor_from_cells(motor)
    result = machine.currents_at(column("speed", speed, "rpm"), optional_number("r_external", r_external, 0.0, "ohm"))
    rows = zip(result.stator_a, result.rotor_a, result.power_factor)
    return spill(CURRENTS_HEADER, rows, flag("headers", headers, True))


@cell_function(
    v_line="Supply line voltage at no load [V]",
    fault_level="Three-phase short-circuit level at the motor's bus [MVA]",
    x_over_r="X/R ratio of the source impedance [-]",
    current="Line current the motor draws at full voltage, e.g. per step [A]; a range gives a column",
    power_factor="Lagging power factor of that current [-]",
)
def NW_VOLTAGE_DIP(v_line, fault_level, x_over_r, current, power_factor):
    """Fractional voltage dip at the motor terminals, the motor as a constant impedance against the source's (impedance method) [-]."""
    v = number("v_line", v_line, "V")
    mva = number("fault_level", fault_level, "MVA")
    ratio = number("x_over_r", x_over_r)
    pf = number("power_factor", power_factor)
    return at_once("current", current, "A", lambda i_a: voltage_dip(v, mva, ratio, i_a, pf))
