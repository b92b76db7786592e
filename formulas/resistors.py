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

from .errors import DesignError, InputError, as_float, as_float_array, choose, quantity, require_non_negative, require_positive
from .grading import checked_sections
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
#: short-time rating (10 s and 60 s) 760 K, extended-time 610 K, continuous 385 K. Recalled; a resistor
#: maker's published summary of IEEE Std 32-1972 gives the same three figures, the standard itself was
#: not checked: from memory.
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

    Notes
    -----
    .. math:: I_{rms} = \sqrt{\frac{z}{3600}\sum_{k\le s}\int i^2 dt}, \qquad P = \frac{z}{3600} E_s
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
        A name from :data:`ALLOYS` or an :class:`Alloy`.

    Returns
    -------
    float or numpy.ndarray
        :math:`\Delta\theta = E/(m c)`. [K]

    References
    ----------
    .. [1] Any heat-transfer text, the first law for a closed body without losses.
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
        A name from :data:`ALLOYS` or an :class:`Alloy`.

    Returns
    -------
    float or numpy.ndarray
        :math:`R = R_{20}[1 + \alpha(\theta - 20)]`. [ohm]
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
    """``ok`` or the excess, per section, against a limit of :data:`TEMPERATURE_RISE_LIMITS_K`."""
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
    motor, v_supply_v, l_circuit_h, inertia_kgm2, load, i_cut_a, dwell_s, brush_drop_v
        As for :func:`formulas.start_sim.simulate_start`.
    sections_20c_ohm : array_like
        Section resistances at 20 °C, in the order they are cut out. [ohm]
    alloy : str or Alloy
        Grid alloy, a name from :data:`ALLOYS`.
    mass_kg : float or array_like
        Mass of resistive element of each section, all its phases (one value for all, or one per section). [kg]
    ambient_c : float
        Temperature of the cold grid. [°C]
    hot_c : float, optional
        Temperature of the hot grid; by default each section's ambient plus
        its adiabatic rise in the cold start (the second of two starts in a row). [°C]

    Returns
    -------
    ColdHotStart

    Notes
    -----
    .. math:: R(\theta) = R_{20}[1 + \alpha(\theta - 20)], \qquad \Delta\theta = E_s/(m c)
    """
    sections = checked_sections(sections_20c_ohm)
    masses = as_float_array("mass", mass_kg, "kg")
    if masses.size not in (1, sections.size):
        raise InputError(f"mass has {masses.size} entries; give one for all sections or one per section ({sections.size})")
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
