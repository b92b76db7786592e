r"""Worst case of a start over supply band, resistor tolerance and grid temperature.

The corners are every combination of a supply voltage in the band, a
resistance tolerance and a grid temperature between cold and hot; in a corner
every section takes the same tolerance and temperature (one maker's batch on
one grid tends together; common practice, no source), so that a section's
resistance is

.. math:: R_s = R_{s,20}\,(1 + \tau)\,[1 + \alpha(\theta - 20)] .

Each corner is simulated in time (:func:`formulas.start_sim.simulate_start`);
a wound-rotor motor (``Machine.quasi_steady``) is started at the corner's
supply, its torque going with the square of the voltage, and its margin uses
the torque at each cut from its start.
Two figures are kept: the highest current of the start, and the cut-out margin,
the least over the notches of the accelerating torque left at the instant of
cut-out as a fraction of the motor torque,

.. math:: m = \min_k \frac{T(I_{c,k}) - T_L(n_k)}{T(I_{c,k})}, \qquad n_k = \frac{V - V_b - R_k I_{c,k}}{k\Phi(I_{c,k})}.

With current-limit switching :math:`I_{c,k}` is the set switching current and
:math:`n_k` the speed at which notch :math:`k` would carry it; a margin at or
below zero is a stall of that notch, found for all corners at once with numpy
before any corner is simulated. With definite-time switching the current and
speed at each cut come from the simulation.

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, Eqs. 7.7-7.8.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .dc_motor import effective_supply_v
from .errors import DesignError, InputError, as_float, quantity, require_count, require_non_negative
from .resistors import resistance_at_c
from .grading import checked_sections, notch_resistances_ohm
from .start_notch import OUTCOMES, StartIncomplete
from .start_sim import load_torque, simulate_start

__all__ = ["STATUSES", "WorstCase", "sweep_corners", "MAX_CORNERS"]

#: Most corners one sweep accepts; bounds the run time. [-]
MAX_CORNERS = 20_000


#: Status of a corner: ran, or what happened instead (the outcomes of :class:`~notchwise.formulas.start_notch.StartIncomplete`, or failed).
STATUSES = ("ran", *OUTCOMES, "failed")


@dataclass(frozen=True)
class WorstCase:
    """Every corner of a sweep with its outcome, and where the worst figures occur.

    Attributes
    ----------
    v_supply_v, tolerance, temperature_c : numpy.ndarray
        The corner: supply [V], resistance tolerance [-] and grid temperature [°C].
    status : tuple of str
        Per corner, one of :data:`STATUSES`: ``ran``, or what happened instead.
    status_notch : numpy.ndarray
        Notch on which a corner stopped; 0 where it ran or on the run after the last cut. [-]
    reason : tuple of str
        Per corner, the message of what happened (empty where it ran).
    i_peak_a : numpy.ndarray
        Highest current of the start in each corner; NaN where it did not run. [A]
    margin : numpy.ndarray
        Cut-out margin of each corner (module docstring); at or below zero for a
        stall found by the criterion, NaN where the corner did not run for another reason. [-]
    margin_notch : numpy.ndarray
        Notch giving that margin. [-]
    worst_peak, worst_margin : int
        Index of the corner with the highest peak and of the one with the
        smallest margin, both among the corners that ran; -1 where none ran.
    """

    v_supply_v: np.ndarray
    tolerance: np.ndarray
    temperature_c: np.ndarray
    status: tuple
    status_notch: np.ndarray
    reason: tuple
    i_peak_a: np.ndarray
    margin: np.ndarray
    margin_notch: np.ndarray
    worst_peak: int
    worst_margin: int

    def count(self, status: str) -> int:
        """Number of corners with ``status`` (one of :data:`STATUSES`). [-]"""
        return sum(s == status for s in self.status)

    @property
    def stalls(self) -> int:
        """Number of corners in which a notch stalls. [-]"""
        return self.count("stalls")

    def first(self, status: str) -> int:
        """Index of the first corner with ``status``; -1 where none has it. [-]"""
        return next((k for k, s in enumerate(self.status) if s == status), -1)


def _axis(low: float, high: float, count: int) -> np.ndarray:
    """``count`` values from ``low`` to ``high``; one value is the middle of the range."""
    return np.linspace(low, high, count) if count > 1 else np.array([0.5 * (low + high)])


def _margin(motor, v_eff, r_notch, load, i_cut, n_cut=None):
    """Torque margin at cut-out, corners along axis 0 and notches along axis 1."""
    if n_cut is None:
        n_cut = motor.speed_rpm(v_eff[:, None], r_notch, i_cut)  # speed at which each notch carries i_cut, Eq. 7.8 of [1]
    t_motor = np.asarray(motor.torque_nm(i_cut), dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        margin = np.where(t_motor > 0.0, (t_motor - load.at(n_cut)) / t_motor, -np.inf)
    return np.where(n_cut > 0.0, margin, -np.inf)


def sweep_corners(
    motor,
    v_supply_v: float,
    sections_20c_ohm,
    l_circuit_h: float,
    inertia_kgm2: float,
    load,
    v_low: float = -0.1,
    v_high: float = 0.1,
    tolerance: float = 0.05,
    alloy="AISI 304",
    ambient_c: float = 20.0,
    hot_c: float = 20.0,
    points=(3, 3, 2),
    i_cut_a: float | None = None,
    dwell_s=None,
    brush_drop_v: float = 0.0,
) -> WorstCase:
    r"""Sweep supply, resistor tolerance and grid temperature together.

    Parameters
    ----------
    motor : Machine
        The machine, as for :func:`notchwise.formulas.start_sim.simulate_start`. [-]
    v_supply_v : float
        Nominal supply voltage. [V]
    sections_20c_ohm : array_like
        Sections at 20 °C, in the order they are cut out. [ohm]
    l_circuit_h : float
        Inductance of the armature circuit, above zero. [H]
    inertia_kgm2 : float
        Inertia of motor and load referred to the motor shaft, above zero. [kg·m²]
    load : float, array_like or LoadTorque
        Load torque referred to the motor shaft, as for
        :func:`notchwise.formulas.start_sim.simulate_start`: a constant, or
        rows of (speed [rpm], torque). [N·m]
    v_low, v_high : float
        Supply band as fractions of nominal, e.g. -0.1 and +0.1. [-]
    tolerance : float
        Resistance tolerance, a fraction from 0 to 0.5; swept from -tolerance to +tolerance. [-]
    alloy : str or Alloy
        Grid alloy, for the temperature coefficient: a name from
        :data:`notchwise.formulas.resistors.ALLOYS` or an ``Alloy``. [-]
    ambient_c, hot_c : float
        Coldest and hottest grid temperature. [°C]
    points : tuple of 3 int
        Values per axis (supply, tolerance, temperature), each 1 to 100; one
        value is the middle of that range. [-]
    i_cut_a : float, optional
        Switching current of current-limit switching. [A]
    dwell_s : array_like, optional
        Dwell of each notch for definite-time switching, one per section. [s]
    brush_drop_v : float, optional
        Total brush drop. [V]

    Returns
    -------
    WorstCase
        Every corner with its status, peak and margin, and the worst ones. [-]

    Notes
    -----
    .. math:: R_s = R_{s,20}(1 + \tau)[1 + \alpha(\theta - 20)]

    Examples
    --------
    The start of :func:`notchwise.formulas.start_sim.simulate_start`'s example
    at 10 % below and above its 220 V supply, the grid at 20 °C and on its
    nominal values (invented figures): both corners run, the high supply gives
    the highest peak:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> from notchwise.formulas.grading import grade_uniform
    >>> motor = ShuntMotor(0.1, 0.208)
    >>> sections = grade_uniform(motor, 220.0, 200.0, 100.0, brush_drop_v=2.0).r_section_ohm
    >>> sweep = sweep_corners(motor, 220.0, sections, 0.01, 2.0, 150.0, points=(2, 1, 1),
    ...                       i_cut_a=110.0, brush_drop_v=2.0)
    >>> sweep.status, [round(float(i)) for i in sweep.i_peak_a], sweep.worst_peak
    (('ran', 'ran'), [185, 213], 1)
    """
    sections = checked_sections(sections_20c_ohm)
    low, high = as_float("v_low", v_low), as_float("v_high", v_high)
    if not -0.9 <= low <= high <= 0.9:
        raise InputError(f"the supply band ({low:+.3g} to {high:+.3g}) must run from low to high within -0.9 to +0.9 of nominal")
    tol = require_non_negative("tolerance", tolerance)
    if tol > 0.5:
        raise InputError(f"tolerance ({tol:g}) must be at most 0.5")
    cold, hot = as_float("ambient", ambient_c, "°C"), as_float("hot", hot_c, "°C")
    if hot < cold:
        raise InputError(f"hot ({quantity(hot, '°C')}) must not be below ambient ({quantity(cold, '°C')})")
    if len(points) != 3:
        raise InputError("points needs three counts: supply, tolerance, temperature")
    counts = [require_count(f"points {axis}", p, 1, 100) for axis, p in zip(("supply", "tolerance", "temperature"), points)]
    if np.prod(counts) > MAX_CORNERS:
        raise InputError(f"{int(np.prod(counts))} corners asked; at most {MAX_CORNERS} are accepted")
    load = load_torque(load)

    axes = (
        v_supply_v * (1.0 + _axis(low, high, counts[0])),
        _axis(-tol, tol, counts[1]),
        _axis(cold, hot, counts[2]),
    )
    v, tau, theta = (a.ravel() for a in np.meshgrid(*axes, indexing="ij"))
    v_eff = np.array([effective_supply_v(x, brush_drop_v) for x in np.unique(v)])[np.unique(v, return_inverse=True)[1]]
    factor = (1.0 + tau) * resistance_at_c(1.0, theta, alloy)
    scaled = sections[None, :] * factor[:, None]
    r_notch = np.stack([notch_resistances_ohm(motor.r_ohm, s)[:-1] for s in scaled]) if scaled.size else scaled

    peaks = np.full(v.size, np.nan)
    status = ["ran"] * v.size
    status_notch = np.zeros(v.size, dtype=int)
    reason = [""] * v.size
    if i_cut_a is not None and not motor.quasi_steady:  # a quasi-steady machine's margin comes from its start
        margins = _margin(motor, v_eff, r_notch, load, as_float("switching current", i_cut_a, "A"))
        least = np.min(margins, axis=1)
        for c in np.nonzero(~(least > 0.0))[0]:  # these stall by the criterion: no need to simulate them
            status[c], status_notch[c] = "stalls", int(np.argmin(margins[c])) + 1
            reason[c] = f"notch {status_notch[c]} stalls: the motor at the switching current does not out-pull the load"
    else:
        margins = np.full(r_notch.shape, np.nan)
    for c in (k for k in range(v.size) if status[k] == "ran"):
        try:
            result = simulate_start(motor, v[c], scaled[c], l_circuit_h, inertia_kgm2, load, i_cut_a=i_cut_a,
                                    dwell_s=dwell_s, brush_drop_v=brush_drop_v)
        except StartIncomplete as error:
            status[c], status_notch[c], reason[c] = error.outcome, error.notch or 0, str(error)
            margins[c] = -np.inf if error.outcome == "stalls" else np.nan
            continue
        except (DesignError, InputError) as error:  # a corner that cannot be computed is kept as failed, with why
            status[c], reason[c] = "failed", str(error)
            margins[c] = np.nan
            continue
        peaks[c] = max(result.i_peak_a.max(), result.i_peak_run_a)
        if motor.quasi_steady:  # torque at each cut from the start itself, at this corner's supply
            margins[c] = (result.t_cut_nm - load.at(result.n_cut_rpm)) / result.t_cut_nm
        elif i_cut_a is None:
            margins[c] = _margin(motor, v_eff[c:c + 1], r_notch[c], load, result.i_cut_a, result.n_cut_rpm[None, :])[0]
    ran = np.array([s == "ran" for s in status], dtype=bool)
    with np.errstate(invalid="ignore"):
        least = np.min(margins, axis=1) if margins.size else np.full(v.size, np.nan)
    margin_notch = np.where(np.all(np.isnan(margins), axis=1), 0, np.argmin(np.nan_to_num(margins, nan=np.inf), axis=1) + 1) if margins.size else np.zeros(v.size, dtype=int)
    return WorstCase(
        v_supply_v=v,
        tolerance=tau,
        temperature_c=theta,
        status=tuple(status),
        status_notch=status_notch,
        reason=tuple(reason),
        i_peak_a=peaks,
        margin=least,
        margin_notch=margin_notch,
        worst_peak=int(np.nanargmax(np.where(ran, peaks, np.nan))) if ran.any() else -1,
        worst_margin=int(np.argmin(np.where(ran, least, np.inf))) if ran.any() else -1,
    )
