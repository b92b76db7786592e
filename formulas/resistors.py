r"""Starting-resistor sections: energy per start, duty, heating and resistance at temperature.

A section cut out at the end of notch :math:`s` carries the armature current on
notches 1 to :math:`s`, so per start it absorbs

.. math:: E_s = R_s \sum_{k \le s} \int_{notch\,k} i^2\,dt .

At :math:`z` starts per hour the r.m.s. current and mean power of the section
are :math:`I_{rms} = \sqrt{(z/3600)\sum_{k\le s}\int i^2 dt}` and
:math:`P = (z/3600)\,E_s` (the definition of the r.m.s. value over the hour).
The temperature-rise limits used for the check are those recalled from [1]_. One start is short against the cooling time of
a grid, so its temperature rise is taken as adiabatic, :math:`m c\,\Delta\theta = E_s`
[2]_, and the resistance follows the alloy's linear law
:math:`R(\theta) = R_{20}\,[1 + \alpha(\theta - 20\,^{\circ}C)]` [2]_. The resistance
is held at its value at the start of a start (its own rise during the start is
left out, which for the low-coefficient alloys is well under 1 %).

References
----------
.. [1] IEEE Std 32-1972, *IEEE Standard Requirements, Terminology, and Test
   Procedure for Neutral Grounding Devices*, section on resistors, table of
   allowable temperature rises for time ratings. Figures and clause from memory.
.. [2] ASM International, *ASM Handbook*, vol. 2, *Properties and Selection:
   Nonferrous Alloys and Special-Purpose Materials*, 10th ed., 1990, section on
   electrical resistance alloys; and vol. 1 for AISI 304. Figures from memory.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .errors import (
    DesignError, InputError, as_float, as_float_array, choose, quantity, require_count, require_non_negative, require_positive,
)
from .grading import checked_sections
from .machines import checked_machine
from .start_sim import StartResult, simulate_start

__all__ = [
    "Alloy",
    "ALLOYS",
    "REFERENCE_C",
    "TEMPERATURE_RISE_LIMITS_K",
    "section_energy_j",
    "section_duty",
    "SectionDuty",
    "adiabatic_rise_k",
    "resistance_at_c",
    "rise_verdict",
    "ColdHotStart",
    "cold_hot_start",
    "braking_grid_ohm",
    "CycleDuty",
    "cycle_duty",
]

#: Temperature at which resistivity and section values are quoted. [°C]
REFERENCE_C = 20.0


@dataclass(frozen=True)
class Alloy:
    """Resistor alloy data, with where each figure comes from.

    Attributes
    ----------
    name : str
        Trade description.
    resistivity_ohm_m : float
        Resistivity at 20 °C. [ohm·m]
    specific_heat_j_per_kg_k : float
        Specific heat near room temperature. [J/(kg·K)]
    alpha_per_k : float
        Temperature coefficient of resistance, mean over 20-500 °C. [1/K]
    source : str
        Source of the figures and how sure they are.
    """

    name: str
    resistivity_ohm_m: float
    specific_heat_j_per_kg_k: float
    alpha_per_k: float
    source: str


#: A small table of grid alloys. Every figure is recalled, none verified here: "from memory".
ALLOYS = {
    "AISI 304": Alloy(
        "AISI 304 stainless steel",
        72e-8,  # 72 µΩ·cm: ASM Handbook vol. 1, 10th ed., wrought stainless steels table; from memory
        500.0,  # 500 J/(kg·K) at 0-100 °C: same table; from memory
        0.00094,  # resistivity rises to about 116 µΩ·cm at 650 °C, a mean 0.00094/K; from memory
        "ASM Handbook vol. 1, 10th ed., 1990 (wrought stainless steels, physical properties); from memory",
    ),
    "NiCr 80/20": Alloy(
        "80/20 nickel-chromium",
        108e-8,  # 108 µΩ·cm: ASM Handbook vol. 2, 10th ed., electrical resistance alloys; from memory
        450.0,  # about 450 J/(kg·K): same section; from memory
        0.00008,  # about 80 ppm/K over 20-500 °C: same section; from memory
        "ASM Handbook vol. 2, 10th ed., 1990 (electrical resistance alloys); from memory",
    ),
    "CuNi 44": Alloy(
        "copper-nickel 44 (constantan type)",
        49e-8,  # 49 µΩ·cm: ASM Handbook vol. 2, 10th ed., electrical resistance alloys; from memory
        410.0,  # about 410 J/(kg·K): same section; from memory
        0.00002,  # near zero, within about ±40 ppm/K: same section; from memory
        "ASM Handbook vol. 2, 10th ed., 1990 (electrical resistance alloys); from memory",
    ),
}

#: Temperature-rise limits of power resistors after IEEE Std 32-1972 (neutral grounding resistors):
#: short-time rating (10 s and 60 s) 760 K, extended-time 610 K, continuous 385 K. Recalled, the
#: standard itself was not checked: from memory.
#: Used as defaults for a check; a starter resistor's own standard or maker's rating prevails.
TEMPERATURE_RISE_LIMITS_K = {"short time": 760.0, "extended": 610.0, "continuous": 385.0}


def section_energy_j(r_section_ohm, i2t_a2s, phases: int = 1) -> np.ndarray:
    r"""Energy each section absorbs in one start.

    Parameters
    ----------
    r_section_ohm : array_like
        Sections in the order they are cut out (per phase). [ohm]
    i2t_a2s : array_like
        :math:`\int i^2 dt` over each notch in one phase (``StartResult.i2t_a2s``). [A²·s]
    phases : int
        Phases of the section, all carrying that current: 1 for a DC
        armature circuit, 3 for a wound rotor (``result.phases``). [-]

    Returns
    -------
    numpy.ndarray
        :math:`E_s = p\,R_s \sum_{k\le s} \int i^2 dt` with :math:`p` phases. [J]

    Examples
    --------
    Three sections and the :math:`\int i^2 dt` of three notches (invented
    figures): the first section is in circuit on notch 1 only, the last on all
    three, :math:`0.1 \cdot (1000 + 500 + 250)`:

    >>> [round(float(e), 1) for e in section_energy_j([0.4, 0.2, 0.1], [1000.0, 500.0, 250.0])]
    [400.0, 300.0, 175.0]
    """
    r = as_float_array("r_section", r_section_ohm, "ohm")
    i2t = as_float_array("i2t", i2t_a2s, "A²·s")
    if r.size != i2t.size:
        raise InputError(f"r_section has {r.size} entries but i2t has {i2t.size}")
    return phases * r * np.cumsum(i2t)  # section s is in circuit on notches 1..s


@dataclass(frozen=True)
class SectionDuty:
    """Duty of each section at a number of starts per hour.

    Attributes
    ----------
    energy_j : numpy.ndarray
        Energy per start. [J]
    i_rms_a : numpy.ndarray
        r.m.s. current over the hour. [A]
    power_w : numpy.ndarray
        Mean power over the hour. [W]
    """

    energy_j: np.ndarray
    i_rms_a: np.ndarray
    power_w: np.ndarray


def section_duty(r_section_ohm, i2t_a2s, starts_per_hour: float, start_time_s: float, phases: int = 1) -> SectionDuty:
    r"""r.m.s. current (per phase) and mean power (all phases) of each section at a start rate.

    Parameters
    ----------
    r_section_ohm, i2t_a2s, phases : array_like
        As for :func:`section_energy_j`. [ohm], [A²·s], [-]
    starts_per_hour : float
        Starts per hour, above zero. [1/h]
    start_time_s : float
        Duration of one start; the starts must fit in the hour. [s]

    Returns
    -------
    SectionDuty
        Energy per start, r.m.s. current and mean power of each section. [-]

    Notes
    -----
    .. math:: I_{rms} = \sqrt{\frac{z}{3600}\sum_{k\le s}\int i^2 dt}, \qquad P = \frac{z}{3600} E_s

    Examples
    --------
    The sections of :func:`section_energy_j`'s example at 36 starts of 5 s an
    hour: :math:`P = 0.01 E_s`, :math:`I_{rms} = \sqrt{0.01 \cdot 1000}` for the first:

    >>> duty = section_duty([0.4, 0.2, 0.1], [1000.0, 500.0, 250.0], 36.0, 5.0)
    >>> [round(float(p), 2) for p in duty.power_w], round(float(duty.i_rms_a[0]), 3)
    ([4.0, 3.0, 1.75], 3.162)
    """
    z = require_positive("starts_per_hour", starts_per_hour, "1/h")
    duration = require_positive("start time", start_time_s, "s")
    if z * duration > 3600.0:
        raise DesignError(
            f"{z:g} starts per hour of {quantity(duration, 's')} each do not fit in an hour: "
            f"at most {3600.0 / duration:.4g} are possible"
        )
    energy = section_energy_j(r_section_ohm, i2t_a2s, phases)
    i2t_in_circuit = np.cumsum(as_float_array("i2t", i2t_a2s, "A²·s"))
    return SectionDuty(energy, np.sqrt(z / 3600.0 * i2t_in_circuit), z / 3600.0 * energy)  # r.m.s. over the hour


def _alloy(alloy) -> Alloy:
    return alloy if isinstance(alloy, Alloy) else ALLOYS[choose("alloy", alloy, tuple(ALLOYS))]


def adiabatic_rise_k(energy_j, mass_kg, alloy):
    r"""Temperature rise of an element heated without losing heat.

    Parameters
    ----------
    energy_j : float or array_like
        Energy absorbed, at or above zero. [J]
    mass_kg : float or array_like
        Mass of the resistive element, above zero. [kg]
    alloy : str or Alloy
        A name from :data:`ALLOYS` or an :class:`Alloy`. [-]

    Returns
    -------
    float or numpy.ndarray
        :math:`\Delta\theta = E/(m c)`. [K]

    References
    ----------
    .. [1] F. P. Incropera, D. P. DeWitt, T. L. Bergman, A. S. Lavine,
       *Fundamentals of Heat and Mass Transfer*, 6th ed., Wiley, 2007, ch. 5,
       the lumped capacitance method (energy balance of a body at one
       temperature), here with no heat lost to the surroundings; section
       numbers from memory.

    Examples
    --------
    50 kJ into 2 kg of stainless steel of 500 J/(kg·K) (invented figures):

    >>> round(float(adiabatic_rise_k(50000.0, 2.0, "AISI 304")), 1)
    50.0
    """
    c = _alloy(alloy).specific_heat_j_per_kg_k
    as_float_array("energy", energy_j, "J"), as_float_array("mass", mass_kg, "kg")  # finite numbers, by name
    energy, mass = np.asarray(energy_j, dtype=float), np.asarray(mass_kg, dtype=float)
    if np.any(energy < 0.0):
        raise InputError(f"energy ({quantity(float(energy.min()), 'J')}) must not be negative")
    if np.any(mass <= 0.0):
        raise InputError(f"mass ({quantity(float(mass.min()), 'kg')}) must be above zero")
    return (energy / (mass * c))[()]  # m c dT = E


def resistance_at_c(r20_ohm, temperature_c, alloy):
    r"""Resistance of an element at a temperature, from its value at 20 °C.

    Parameters
    ----------
    r20_ohm : float or array_like
        Resistance at 20 °C, above zero. [ohm]
    temperature_c : float or array_like
        Element temperature, from -60 °C up. [°C]
    alloy : str or Alloy
        A name from :data:`ALLOYS` or an :class:`Alloy`. [-]

    Returns
    -------
    float or numpy.ndarray
        :math:`R = R_{20}[1 + \alpha(\theta - 20)]`. [ohm]

    Examples
    --------
    A 2 ohm copper-nickel section at 320 °C, :math:`2 (1 + 0.00002 \cdot 300)`:

    >>> round(float(resistance_at_c(2.0, 320.0, "CuNi 44")), 4)
    2.012
    """
    alpha = _alloy(alloy).alpha_per_k
    as_float_array("r20", r20_ohm, "ohm"), as_float_array("temperature", temperature_c, "°C")  # finite numbers, by name
    r, theta = np.asarray(r20_ohm, dtype=float), np.asarray(temperature_c, dtype=float)
    if np.any(r <= 0.0):
        raise InputError(f"r20 ({quantity(float(np.min(r)), 'ohm')}) must be above zero")
    if np.any(theta < -60.0):
        raise InputError(f"temperature ({quantity(float(np.min(theta)), '°C')}) must be -60 °C or above")
    return (r * (1.0 + alpha * (theta - REFERENCE_C)))[()]  # linear law of [2]


def rise_verdict(rise_k, limit: str = "short time") -> tuple:
    """``ok`` or the excess, per section, against a limit of :data:`TEMPERATURE_RISE_LIMITS_K`.

    Parameters
    ----------
    rise_k : float or array_like
        Temperature rise of each section, at or above zero. [K]
    limit : str, optional
        Which limit of :data:`TEMPERATURE_RISE_LIMITS_K`: ``"short time"``,
        ``"extended"`` or ``"continuous"``. [-]

    Returns
    -------
    tuple of str
        ``ok`` or the limit broken, per section. [-]

    Examples
    --------
    >>> rise_verdict([300.0, 800.0])
    ('ok', 'rise over the short time limit (760 K, IEEE Std 32, from memory)')
    """
    limit_k = TEMPERATURE_RISE_LIMITS_K[choose("limit", limit, tuple(TEMPERATURE_RISE_LIMITS_K))]
    rises = as_float_array("temperature rise", rise_k, "K")
    require_non_negative("temperature rise", float(rises.min()), "K")
    return tuple(
        "ok" if r <= limit_k else f"rise over the {limit} limit ({quantity(limit_k, 'K')}, IEEE Std 32, from memory)"
        for r in rises
    )


@dataclass(frozen=True)
class ColdHotStart:
    """The same start with the grid cold and hot.

    Attributes
    ----------
    cold, hot : StartResult
        Start with the sections at ambient, and at their hot temperatures.
    rise_k : numpy.ndarray
        Adiabatic rise of each section in the cold start. [K]
    hot_c : numpy.ndarray
        Temperature of each section in the hot start. [°C]
    r_cold_ohm, r_hot_ohm : numpy.ndarray
        Section resistances cold and hot. [ohm]
    """

    cold: StartResult
    hot: StartResult
    rise_k: np.ndarray
    hot_c: np.ndarray
    r_cold_ohm: np.ndarray
    r_hot_ohm: np.ndarray


def cold_hot_start(
    motor, v_supply_v, sections_20c_ohm, l_circuit_h, inertia_kgm2, load, alloy, mass_kg,
    ambient_c=20.0, hot_c=None, i_cut_a=None, dwell_s=None, brush_drop_v=0.0,
) -> ColdHotStart:
    r"""Peak currents and heating of a start with a cold grid against a hot one.

    Parameters
    ----------
    motor : Machine
        The machine, as for :func:`notchwise.formulas.start_sim.simulate_start`. [-]
    v_supply_v : float
        Supply voltage. [V]
    sections_20c_ohm : array_like
        Section resistances at 20 °C, in the order they are cut out. [ohm]
    l_circuit_h : float
        Inductance of the armature circuit, above zero. [H]
    inertia_kgm2 : float
        Inertia of motor and load referred to the motor shaft, above zero. [kg·m²]
    load : float, array_like or LoadTorque
        Load torque referred to the motor shaft, as for
        :func:`notchwise.formulas.start_sim.simulate_start`: a constant, or
        rows of (speed [rpm], torque). [N·m]
    alloy : str or Alloy
        Grid alloy, a name from :data:`ALLOYS`. [-]
    mass_kg : float or array_like
        Mass of resistive element of each section, all its phases (one value for all, or one per section). [kg]
    ambient_c : float
        Temperature of the cold grid. [°C]
    hot_c : float, optional
        Temperature of the hot grid; by default each section's ambient plus
        its adiabatic rise in the cold start (the second of two starts in a row). [°C]
    i_cut_a : float, optional
        Switching current of current-limit switching. [A]
    dwell_s : array_like, optional
        Dwell of each notch for definite-time switching, one per section. [s]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    ColdHotStart
        Both starts, the rises, the hot temperatures and the resistances. [-]

    Notes
    -----
    .. math:: R(\theta) = R_{20}[1 + \alpha(\theta - 20)], \qquad \Delta\theta = E_s/(m c)
    """
    checked_machine(motor)
    sections = checked_sections(sections_20c_ohm)
    masses = _section_masses(mass_kg, sections.size)
    ambient = as_float("ambient", ambient_c, "°C")
    hot = None if hot_c is None else as_float("hot", hot_c, "°C")
    if hot is not None and hot < ambient:  # checked before any simulation runs
        raise InputError(f"hot ({quantity(hot, '°C')}) must not be below ambient ({quantity(ambient, '°C')})")
    r_cold = resistance_at_c(sections, ambient, alloy)
    run = dict(brush_drop_v=brush_drop_v, i_cut_a=i_cut_a, dwell_s=dwell_s)
    cold = simulate_start(motor, v_supply_v, r_cold, l_circuit_h, inertia_kgm2, load, **run)
    rise = np.atleast_1d(adiabatic_rise_k(section_energy_j(cold.r_section_ohm, cold.i2t_a2s, cold.phases), masses, alloy))
    hot_temperature = ambient + rise if hot is None else np.full(sections.size, hot)
    r_hot = resistance_at_c(sections, hot_temperature, alloy)
    hot = simulate_start(motor, v_supply_v, r_hot, l_circuit_h, inertia_kgm2, load, **run)
    return ColdHotStart(cold, hot, rise, hot_temperature, np.atleast_1d(r_cold), np.atleast_1d(r_hot))


def _brake_from(r_section_ohm, brake_from) -> tuple[np.ndarray, int]:
    """The sections and the checked first braking section (1-based)."""
    r = as_float_array("r_section", r_section_ohm, "ohm")
    first = require_count("brake_from", brake_from, 1, r.size)
    return r, first


def braking_grid_ohm(r_section_ohm, brake_from: int = 1) -> float:
    r"""Braking resistance made of the grid's sections ``brake_from`` to the last (those in circuit on that notch).

    Parameters
    ----------
    r_section_ohm : array_like
        Sections in the order they are cut out. [ohm]
    brake_from : int, optional
        First section of the braking resistor, 1 (the whole grid) to the number of sections. [-]

    Returns
    -------
    float
        :math:`R_b = \sum_{s \ge b} R_s`. [ohm]
    """
    r, first = _brake_from(r_section_ohm, brake_from)
    return float(np.sum(r[first - 1:]))  # the sections still in circuit on notch b


@dataclass(frozen=True)
class CycleDuty:
    """Duty of each section over a cycle of starts and braking stops.

    Attributes
    ----------
    energy_start_j, energy_stop_j : numpy.ndarray
        Energy per start, and per stop (0 J in a section outside the braking resistor). [J]
    i_rms_a : numpy.ndarray
        r.m.s. current over the hour, starts and stops together. [A]
    power_w : numpy.ndarray
        Mean power over the hour. [W]
    rise_k : numpy.ndarray
        Adiabatic rise of one start followed by one stop, no cooling between. [K]
    verdict : tuple of str
        :func:`rise_verdict` of ``rise_k``. [-]
    """

    energy_start_j: np.ndarray
    energy_stop_j: np.ndarray
    i_rms_a: np.ndarray
    power_w: np.ndarray
    rise_k: np.ndarray
    verdict: tuple


def _section_masses(mass_kg, sections: int) -> np.ndarray:
    """The grid masses [kg]: one for all sections or one per section, checked before anything is computed."""
    masses = as_float_array("mass", mass_kg, "kg")
    if masses.size not in (1, sections):
        raise InputError(f"mass has {masses.size} entries; give one for all sections or one per section ({sections})")
    return masses


def cycle_duty(r_section_ohm, i2t_start_a2s, i2t_stop_a2s: float, brake_from: int, starts_per_hour: float,
               stops_per_hour: float, start_time_s: float, stop_time_s: float, mass_kg, alloy) -> CycleDuty:
    r"""Energy, r.m.s. current, mean power and adiabatic rise of each section over a cycle of starts and stops.

    Parameters
    ----------
    r_section_ohm : array_like
        Sections in the order they are cut out. [ohm]
    i2t_start_a2s : array_like
        :math:`\int i^2 dt` over each notch of one start (``StartResult.i2t_a2s``). [A²·s]
    i2t_stop_a2s : float
        :math:`\int i^2 dt` of one braking stop, at or above zero. [A²·s]
    brake_from : int
        The braking current flows through sections ``brake_from`` to the last
        (:func:`braking_grid_ohm`). [-]
    starts_per_hour, stops_per_hour : float
        Operations per hour, above zero. [1/h]
    start_time_s, stop_time_s : float
        Duration of one start and of one stop; together they must fit in the hour. [s]
    mass_kg : float or array_like
        Mass of resistive element per section. [kg]
    alloy : str or Alloy
        Grid alloy. [-]

    Returns
    -------
    CycleDuty

    Notes
    -----
    .. math::

        I_{rms}^2 = \frac{z_a}{3600}\sum_{k\le s}\int_{start} i^2 dt + \frac{z_b}{3600}[s \ge b]\int_{stop} i^2 dt,
        \qquad P = \frac{z_a E_a + z_b E_b}{3600}, \qquad \Delta\theta = \frac{E_a + E_b}{m c}

    the r.m.s. over the hour (its definition) and the first law of a body
    without losses; the verdict is against IEEE Std 32's limits as
    :func:`rise_verdict` states them.
    """
    r, first = _brake_from(r_section_ohm, brake_from)
    z_a = require_positive("starts_per_hour", starts_per_hour, "1/h")
    z_b = require_positive("stops_per_hour", stops_per_hour, "1/h")
    t_a, t_b = require_positive("start time", start_time_s, "s"), require_positive("stop time", stop_time_s, "s")
    if z_a * t_a + z_b * t_b > 3600.0:
        raise DesignError(
            f"{z_a:g} starts of {quantity(t_a, 's')} and {z_b:g} stops of {quantity(t_b, 's')} per hour do not fit in an hour"
        )
    masses = _section_masses(mass_kg, r.size)
    stop_i2t = np.zeros(r.size)
    stop_i2t[first - 1] = require_non_negative("i2t of the stop", i2t_stop_a2s, "A²·s")  # in circuit from notch b on
    start, stop = section_duty(r, i2t_start_a2s, z_a, t_a), section_duty(r, stop_i2t, z_b, t_b)
    rise = adiabatic_rise_k(start.energy_j + stop.energy_j, masses, alloy)
    return CycleDuty(start.energy_j, stop.energy_j, np.hypot(start.i_rms_a, stop.i_rms_a), start.power_w + stop.power_w,
                     rise, rise_verdict(rise))
