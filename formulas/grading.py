r"""Grading of DC starter resistors: uniform current-limit acceleration.

Convention (the classic current-limit starter, [1]_ and [2]_): notch 1 puts all
sections in circuit and limits the standstill current to :math:`I_1` (``i_peak``).
The motor accelerates until the current has fallen to the switching current
:math:`I_2`; then one section is cut out and the current rises back to
:math:`I_1`. Speed does not change across a cut (the shaft's inertia holds it)
and the inductance of the circuit is neglected, so the flux follows the new
current at once. Load torque is taken to be below the torque at :math:`I_2`,
so that every notch reaches its switching current.

With :math:`R_k` the total circuit resistance on notch :math:`k` (motor
included) and :math:`\Phi(I)` the flux at current :math:`I`, speed continuity
across the cut from notch :math:`k` to :math:`k+1` gives

.. math::

    V' - I_1 R_{k+1} = \frac{\Phi(I_1)}{\Phi(I_2)}\,(V' - I_2 R_k),
    \qquad R_1 = V'/I_1, \qquad V' = V - V_b.

For a shunt motor :math:`\Phi` is constant and the resistances form the
geometric series :math:`R_{k+1} = (I_2/I_1) R_k` [1]_; for a series motor with
flux proportional to current every section equals
:math:`V'(1/I_2 - 1/I_1)` [2]_; a real magnetization curve, or a compound
field, gives the general recursion above.

The number of sections is the fewest that keep every switching current at or
above the requested one; the switching current is then raised, by Brent's
method, until the last cut lands exactly on the motor's own resistance. With
the number of notches given, the switching current follows from the same
condition.

References
----------
.. [1] M. G. Say and E. O. Taylor, *Direct Current Machines*, 2nd ed., Pitman,
   1986, chapter on starting and speed control (graded starter, geometric
   law); chapter from memory.
.. [2] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.6 (series-motor characteristics).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from .dc_motor import effective_supply_v
from .errors import DesignError, InputError, as_float_array, quantity, require_below, require_count, require_positive

__all__ = [
    "MAX_NOTCHES",
    "Grading",
    "grade_uniform",
    "checked_sections",
    "notch_resistances_ohm",
    "SectionCheck",
    "check_sections",
    "peak_after_cut_a",
]

#: Most notches accepted; crane and mill controllers use far fewer. Common practice, no source.
MAX_NOTCHES = 30


@dataclass(frozen=True)
class Grading:
    """A graded starter, one entry per notch (notch 1 = all sections in).

    Attributes
    ----------
    r_total_ohm : numpy.ndarray
        Total circuit resistance on each notch, motor included. [ohm]
    r_section_ohm : numpy.ndarray
        Section cut out at the end of each notch. [ohm]
    i_peak_a : numpy.ndarray
        Current at the start of each notch. [A]
    i_switch_a : numpy.ndarray
        Current at which each notch is cut out. [A]
    r_motor_ohm : float
        Resistance left in circuit after the last cut. [ohm]
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    i_peak_a: np.ndarray
    i_switch_a: np.ndarray
    r_motor_ohm: float

    @property
    def notches(self) -> int:
        """Number of notches, equal to the number of sections. [-]"""
        return int(self.r_total_ohm.size)


def _notch_resistances(r_first_ohm, v_eff, i_peak, i_switch, flux_ratio, count):
    """Circuit resistance on notches 1..count+1 at one switching current (module docstring)."""
    r = np.empty(count + 1)
    r[0] = r_first_ohm
    for k in range(count):
        r[k + 1] = (v_eff - flux_ratio * (v_eff - i_switch * r[k])) / i_peak  # speed continuity across a cut
    return r


def grade_uniform(motor, v_supply_v, i_peak_a, i_switch_a, notches=None, brush_drop_v=0.0) -> Grading:
    """Grade the sections of a current-limit starter.

    Parameters
    ----------
    motor : Machine
        The machine (:mod:`notchwise.formulas.machines`); only its resistance and flux ratios enter. [-]
    v_supply_v : float
        Supply voltage. [V]
    i_peak_a : float
        Current at the start of every notch (the upper limit). [A]
    i_switch_a : float
        Least current at which a notch may be cut out (the lower limit). [A]
    notches : int, optional
        Fixed number of notches; by default the fewest that keep the
        switching current at or above ``i_switch_a``. [-]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    Grading
        Sections, peak and switching currents per notch. [-]

    Raises
    ------
    InputError
        Currents out of order, notches out of range, currents beyond the
        magnetization curve.
    DesignError
        No starter is needed, more than :data:`MAX_NOTCHES` would be, or the
        fixed notch count forces the switching current below ``i_switch_a``.

    Examples
    --------
    A shunt motor of 0.05 ohm on 220 V between 300 A and 150 A (invented
    figures): four notches; the sections fall geometrically by
    :math:`I_2/I_1` (module docstring, [1]_), with the switching current
    raised to land the last cut on the motor:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> grading = grade_uniform(ShuntMotor(0.05, 1.0), 220.0, 300.0, 150.0)
    >>> grading.notches
    4
    >>> [round(float(r), 4) for r in grading.r_section_ohm]
    [0.3586, 0.1832, 0.0936, 0.0478]
    >>> round(float(grading.i_switch_a[0]), 1)
    153.3
    """
    v_eff = effective_supply_v(v_supply_v, brush_drop_v)
    i_peak = require_positive("i_peak", i_peak_a, "A")
    i_switch = require_below("i_switch", require_positive("i_switch", i_switch_a, "A"), "i_peak", i_peak, "A")
    r_motor = motor.r_ohm  # checked when the machine was built
    if i_peak > motor.i_max_a:
        raise InputError(
            f"i_peak ({quantity(i_peak, 'A')}) lies beyond the magnetization curve, "
            f"which ends at {quantity(motor.i_max_a, 'A')}: extend the curve"
        )
    r_first = v_eff / i_peak
    if r_first <= r_motor:
        raise DesignError(
            f"v_supply is too low to drive i_peak ({quantity(i_peak, 'A')}) through the motor: its own "
            f"resistance ({quantity(r_motor, 'ohm')}) limits the standstill current to "
            f"{quantity(v_eff / r_motor, 'A')}, so no starting resistance is needed"
        )

    def flux_ratio(i_sw: float) -> float:
        flux_switch = float(motor.relative_flux(i_sw))
        if flux_switch <= 0.0:
            raise InputError(f"the flux at i_switch ({quantity(i_sw, 'A')}) is zero: the curve needs residual flux or a lower start")
        return float(motor.relative_flux(i_peak)) / flux_switch

    def landing_error_ohm(i_sw: float, count: int) -> float:
        return _notch_resistances(r_first, v_eff, i_peak, i_sw, flux_ratio(i_sw), count)[-1] - r_motor

    if notches is None:
        ratio = flux_ratio(i_switch)
        r = np.array([r_first])
        while r[-1] > r_motor:
            if r.size > MAX_NOTCHES:
                raise DesignError(
                    f"more than {MAX_NOTCHES} notches would be needed: widen the band between "
                    f"i_switch ({quantity(i_switch, 'A')}) and i_peak ({quantity(i_peak, 'A')})"
                )
            r_next = (v_eff - ratio * (v_eff - i_switch * r[-1])) / i_peak
            if r_next >= r[-1]:
                raise DesignError(
                    f"cutting a section at i_switch ({quantity(i_switch, 'A')}) does not lower the "
                    "circuit resistance with this magnetization curve: raise i_peak or lower i_switch"
                )
            r = np.append(r, r_next)
        count = r.size - 1
    else:
        count = require_count("notches", notches, 1, MAX_NOTCHES)
        if landing_error_ohm(i_switch, count) > 0.0:
            needed = grade_uniform(motor, v_supply_v, i_peak, i_switch, None, brush_drop_v).notches
            raise DesignError(
                f"{count} notches cannot keep the switching current at or above i_switch "
                f"({quantity(i_switch, 'A')}); {needed} are needed"
            )
    # The last cut lands on r_motor exactly: raise the switching current to the root.
    i_switch_final = (
        i_switch
        if landing_error_ohm(i_switch, count) == 0.0
        else brentq(landing_error_ohm, i_switch, i_peak * (1.0 - 1e-12), args=(count,), xtol=1e-12, rtol=1e-15)
    )
    r = _notch_resistances(r_first, v_eff, i_peak, i_switch_final, flux_ratio(i_switch_final), count)
    r[-1] = r_motor
    return Grading(
        r_total_ohm=r[:-1],
        r_section_ohm=-np.diff(r),
        i_peak_a=np.full(count, i_peak),
        i_switch_a=np.full(count, i_switch_final),
        r_motor_ohm=r_motor,
    )


def peak_after_cut_a(motor, v_eff_v: float, r_before_ohm: float, r_after_ohm: float, i_cut_a: float) -> float:
    r"""Current just after a section is cut out at current ``i_cut_a``.

    Parameters
    ----------
    motor : Machine
        The machine (:mod:`notchwise.formulas.machines`). [-]
    v_eff_v : float
        Supply less brush drop. [V]
    r_before_ohm, r_after_ohm : float
        Total circuit resistance before and after the cut. [ohm]
    i_cut_a : float
        Current at the instant of the cut. [A]

    Returns
    -------
    float
        The current :math:`I` that solves
        :math:`V' - I R_{after} = \frac{\Phi(I)}{\Phi(I_{cut})}(V' - I_{cut} R_{before})`
        (speed continuous, inductance neglected; module docstring). [A]

    Examples
    --------
    With constant flux (a shunt motor) the EMF holds across the cut, so
    :math:`I = I_{cut} R_{before}/R_{after} = 150 \cdot 0.75/0.35`:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> round(peak_after_cut_a(ShuntMotor(0.05, 1.0), 220.0, 0.75, 0.35, 150.0), 1)
    321.4
    """
    emf_v = v_eff_v - i_cut_a * r_before_ohm
    i_ceiling = v_eff_v / r_after_ohm
    flux_cut = float(motor.relative_flux(i_cut_a))

    def surplus_v(i_a: float) -> float:
        return v_eff_v - i_a * r_after_ohm - emf_v * float(motor.relative_flux(i_a)) / flux_cut

    i_top = min(i_ceiling, motor.i_max_a)
    if surplus_v(i_top) > 0.0:
        raise InputError(
            f"the current after a cut rises beyond the magnetization curve, which ends at "
            f"{quantity(motor.i_max_a, 'A')}: extend the curve"
        )
    if surplus_v(i_cut_a) <= 0.0:
        return i_cut_a
    return brentq(surplus_v, i_cut_a, i_top, xtol=1e-10, rtol=1e-13)


def checked_sections(sections_ohm) -> np.ndarray:
    """Section resistances as an array, each above zero, at most :data:`MAX_NOTCHES`. [ohm]

    Parameters
    ----------
    sections_ohm : array_like
        Section resistances, as the user gives them. [ohm]

    Returns
    -------
    numpy.ndarray
        The sections as floats. [ohm]
    """
    sections = as_float_array("sections", sections_ohm, "ohm")
    if sections.size > MAX_NOTCHES:
        raise InputError(f"sections has {sections.size} entries; at most {MAX_NOTCHES} are accepted")
    if np.any(sections <= 0.0):
        k = int(np.argmax(sections <= 0.0))
        raise InputError(f"sections entry {k + 1} ({quantity(sections[k], 'ohm')}) must be above zero")
    return sections


def notch_resistances_ohm(r_motor_ohm: float, sections_ohm) -> np.ndarray:
    """Whole circuit resistance on notches 1..N and on the run (N+1 values). [ohm]

    Parameters
    ----------
    r_motor_ohm : float
        Resistance of the motor's own circuit. [ohm]
    sections_ohm : array_like
        Section resistances in the order they are cut out. [ohm]

    Returns
    -------
    numpy.ndarray
        Total resistance on each notch, then the motor alone on the run. [ohm]

    Examples
    --------
    >>> [round(float(r), 4) for r in notch_resistances_ohm(0.05, [0.4, 0.2, 0.1])]
    [0.75, 0.35, 0.15, 0.05]
    """
    sections = np.asarray(sections_ohm, dtype=float)
    return r_motor_ohm + np.concatenate((np.cumsum(sections[::-1])[::-1], [0.0]))


@dataclass(frozen=True)
class SectionCheck:
    """Currents of a given set of sections, one entry per step.

    Step k (1..n) is notch k with sections k..n in circuit; step n+1 is the
    run with the motor alone, where only the peak after the last cut applies.

    Attributes
    ----------
    r_total_ohm : numpy.ndarray
        Total circuit resistance on each step. [ohm]
    r_section_ohm : numpy.ndarray
        Section cut out at the end of each step; NaN on the run. [ohm]
    i_peak_a : numpy.ndarray
        Current at the start of each step. [A]
    i_switch_a : numpy.ndarray
        Current at which each notch is cut out; NaN on the run. [A]
    verdict : tuple of str
        Plain words per step: ``ok`` or what limit the step breaks.
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    i_peak_a: np.ndarray
    i_switch_a: np.ndarray
    verdict: tuple

    @property
    def passes(self) -> bool:
        """True when every step is ``ok``."""
        return all(v == "ok" for v in self.verdict)


def check_sections(
    motor, v_supply_v, sections_ohm, i_switch_a, i_limit_a, i_commutation_a, brush_drop_v=0.0
) -> SectionCheck:
    """Peak current per notch of a given set of sections, with a verdict.

    Each notch is cut out when the current has fallen to ``i_switch_a``
    (a notch whose peak is already at or below it is cut at once, at its
    peak); the peak after each cut follows from :func:`peak_after_cut_a`.

    Parameters
    ----------
    motor : Machine
        The machine (:mod:`notchwise.formulas.machines`). [-]
    v_supply_v : float
        Supply voltage. [V]
    sections_ohm : array_like
        Section resistances in the order they are cut out. [ohm]
    i_switch_a : float
        Current at which each notch is cut out. [A]
    i_limit_a : float
        Highest peak the design allows (drive, gearing, supply). [A]
    i_commutation_a : float
        Highest current the motor commutates without damage. [A]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    SectionCheck
        Resistance, currents and verdict per step. [-]

    Examples
    --------
    Three sections on the shunt motor of :func:`grade_uniform`'s example
    (invented figures): the standstill current is :math:`220/0.75` A, and every
    later peak breaks the 300 A limit:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> check = check_sections(ShuntMotor(0.05, 1.0), 220.0, [0.4, 0.2, 0.1], 150.0, 300.0, 400.0)
    >>> [round(float(i), 1) for i in check.i_peak_a]
    [293.3, 321.4, 350.0, 450.0]
    >>> check.passes, check.verdict[0]
    (False, 'ok')
    """
    v_eff = effective_supply_v(v_supply_v, brush_drop_v)
    sections = checked_sections(sections_ohm)
    i_switch = require_positive("i_switch", i_switch_a, "A")
    i_limit = require_positive("i_limit", i_limit_a, "A")
    i_commutation = require_positive("i_commutation", i_commutation_a, "A")
    r_motor = motor.r_ohm  # checked when the machine was built
    r = notch_resistances_ohm(r_motor, sections)
    peaks = np.empty(r.size)
    peaks[0] = v_eff / r[0]
    if peaks[0] > motor.i_max_a:
        raise InputError(
            f"the standstill current ({quantity(peaks[0], 'A')}) lies beyond the magnetization curve, "
            f"which ends at {quantity(motor.i_max_a, 'A')}: extend the curve"
        )
    cuts = np.empty(sections.size)
    for k in range(sections.size):
        cuts[k] = min(i_switch, peaks[k])
        peaks[k + 1] = peak_after_cut_a(motor, v_eff, r[k], r[k + 1], cuts[k])
    verdict = tuple(_verdict(p, i_limit, i_commutation, cut) for p, cut in zip(peaks, np.append(cuts, np.nan)))
    return SectionCheck(r, np.append(sections, np.nan), peaks, np.append(cuts, np.nan), verdict)


def _verdict(i_peak: float, i_limit: float, i_commutation: float, i_cut: float) -> str:
    faults = []
    if i_peak > i_limit:
        faults.append(f"peak over i_limit ({quantity(i_limit, 'A')})")
    if i_peak > i_commutation:
        faults.append(f"peak over i_commutation ({quantity(i_commutation, 'A')})")
    if i_cut == i_peak:
        faults.append("peak at or below i_switch: cut at once")
    return "; ".join(faults) or "ok"
