r"""The start of a DC motor in time: current, speed and resistor energy, notch by notch.

The armature circuit and the shaft obey [1]_

.. math::

    L\,\frac{di}{dt} = V - V_b - R_k\,i - k\Phi(i)\,n, \qquad
    J\,\frac{d\omega}{dt} = \frac{60}{2\pi}\,k\Phi(i)\,i - T_L(n), \qquad
    \omega = \frac{2\pi}{60}\,n

with :math:`R_k` the whole circuit resistance on notch :math:`k` (motor plus
the sections still in circuit), :math:`L` the inductance of the armature
circuit (taken constant), :math:`J` the inertia of motor and load referred to
the motor shaft and :math:`T_L(n)` the load torque. The machine enters only
through :class:`notchwise.formulas.machines.Machine`: a DC machine contributes
this 2-state circuit (:mod:`notchwise.formulas.start_dc`), with the flux
:math:`k\Phi(i)` of :mod:`notchwise.formulas.dc_motor`.

Modules. The load model is :mod:`notchwise.formulas.start_load`; the closed
forms (shaft at rest, shunt motor against a constant load) are
:mod:`notchwise.formulas.start_closed_form`; the integrated path is
:mod:`notchwise.formulas.start_integrated`; one notch's circuit, record and
outcomes are :mod:`notchwise.formulas.start_notch`. This module orchestrates
the notches and samples the history.

Standstill. A reactive load (every value at or above zero, the default of
:func:`~notchwise.formulas.start_load.load_torque`) is taken as a reaction at
standstill: a shaft at rest stays at rest while the motor torque is at or
below the load torque at 0 rpm (a hoist brake, static friction, a conveyor's
breakaway torque), and a shaft that slows to rest stays there until the motor
torque exceeds it again; the motor is never driven backwards by it. A
potential load (a signed load with a value below zero: a gravity load being
lowered, motor connected for lowering) drives the shaft: it acts at standstill
too, so the shaft moves from the first instant, and above the no-load speed the
motor's current reverses and it brakes (a shunt or separately excited motor
regenerates); the steady speed is where its braking torque equals the driving
load. A series motor cannot regenerate with its field in series: driven by
the load it runs away, and the start says so. At rest the back-EMF is zero, so the current is the first-order
lag :math:`i = I_\infty + (i_0 - I_\infty)e^{-tR/L}`, :math:`I_\infty = (V-V_b)/R`,
for every kind of motor; the instant of breakaway follows in closed form. No
solver steps across the standstill discontinuity.

Shunt motor with a constant load: closed form (2 x 2 matrix exponential [2]_,
exact energy integrals [3]_). Every other case is integrated by a Rosenbrock
method on plain floats (:mod:`notchwise.formulas.notch_integrator`); with
``method="integrate"`` every case goes through scipy's Radau [4]_ instead, the
independent second method the tests compare with.

Switching. Current-limit: a notch is cut out when the current, having risen
above the switching current, falls back to it. Definite-time: each notch is cut
out a fixed dwell after it began. After the last cut the motor runs on its own
resistance; the start is taken as finished when, after the last cut, the
speed first reaches 98 % of the final speed (:data:`SETTLED_FRACTION`,
common practice, no source) and the current has passed its last peak.

Stall. On notch :math:`k` the current can fall to the switching current
:math:`I_c` only if the motor, carrying :math:`I_c`, still out-pulls the load
at the speed that current gives on this notch:
:math:`T(I_c) > T_L(n_k(I_c))` with :math:`n_k(I) = (V - V_b - R_k I)/k\Phi(I)`.
Where it does not, the notch is reported as stalled before any time step is
taken. Every notch (and the run) is further bounded by a time cap
(:data:`TIME_CAP_FACTOR` slow time constants) and by a number of integrator
evaluations (:data:`MAX_STEPS_PER_NOTCH`); a start that stops says what
happens instead (:class:`StartIncomplete`: stalls, runs steadily below the
switching current, is still accelerating, runs away, or hit the step bound),
on which notch and at what speed. The run after the last cut is never
called a notch.

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.9 (transient analysis of DC machines,
   Eqs. 7.37-7.40).
.. [2] C. Moler and C. Van Loan, "Nineteen dubious ways to compute the
   exponential of a matrix, twenty-five years later," *SIAM Review*, vol. 45,
   no. 1, pp. 3-49, 2003, sec. 2 (closed forms for small matrices).
.. [3] C. F. Van Loan, "Computing integrals involving the matrix exponential,"
   *IEEE Trans. Automatic Control*, vol. 23, no. 3, pp. 395-404, 1978.
.. [4] E. Hairer and G. Wanner, *Solving Ordinary Differential Equations II:
   Stiff and Differential-Algebraic Problems*, 2nd ed., Springer, 1996,
   sec. IV.8 (Radau IIA).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import ClassVar

import numpy as np
from scipy.optimize import brentq

from .dc_motor import effective_supply_v
from .errors import InputError, as_float_array, choose, quantity, require_count, require_positive, shown
from .grading import checked_sections, notch_resistances_ohm
from .machines import Machine, checked_machine
from .rotor_start import simulate_rotor_start
from .notch_integrator import checked_rtol
from .start_load import LoadTorque, load_torque
from .start_notch import (
    MAX_STEPS_PER_NOTCH, SETTLED_FRACTION, TIME_CAP_FACTOR, NotchCircuit, NotchRecord, StartIncomplete,
)

__all__ = [
    "SETTLED_FRACTION",
    "TIME_CAP_FACTOR",
    "MAX_STEPS_PER_NOTCH",
    "MAX_HISTORY_POINTS",
    "LoadTorque",
    "load_torque",
    "StartIncomplete",
    "StartResult",
    "simulate_start",
    "History",
    "checked_points",
    "start_history",
    "settling_current_a",
]

#: Most samples of a history. [-]
MAX_HISTORY_POINTS = 100_000


@dataclass(frozen=True)
class StartResult:
    """A simulated start, one entry per notch (notch 1 = all sections in).

    Attributes
    ----------
    r_total_ohm : numpy.ndarray
        Whole circuit resistance on each notch, motor included. [ohm]
    r_section_ohm : numpy.ndarray
        Section cut out at the end of each notch. [ohm]
    t_start_s, dwell_s : numpy.ndarray
        Instant each notch begins, and how long it lasts. [s]
    i_peak_a : numpy.ndarray
        Highest current on each notch. [A]
    i_cut_a : numpy.ndarray
        Current at the instant each notch is cut out. [A]
    n_cut_rpm : numpy.ndarray
        Speed at that instant. [rpm]
    charge_c : numpy.ndarray
        :math:`\\int i\\,dt` over each notch. [A·s]
    i2t_a2s : numpy.ndarray
        :math:`\\int i^2\\,dt` over each notch. [A²·s]
    work_load_j : numpy.ndarray
        Work done on the load over each notch, :math:`\\int T_L\\,\\omega\\,dt`. [J]
    i_peak_run_a : float
        Highest current after the last cut, on the motor's own resistance. [A]
    t_accel_s : float
        Acceleration time: to the later of the last cut and the first instant
        after it at which the speed reaches :data:`SETTLED_FRACTION` of the final speed. [s]
    n_final_rpm : float
        Steady speed on the motor's own characteristic at the load. [rpm]
    i_final_a : float
        Steady current there. [A]
    segments : tuple
        The pieces of the solution, for :func:`start_history`.
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    t_start_s: np.ndarray
    dwell_s: np.ndarray
    i_peak_a: np.ndarray
    i_cut_a: np.ndarray
    n_cut_rpm: np.ndarray
    charge_c: np.ndarray
    i2t_a2s: np.ndarray
    work_load_j: np.ndarray
    i_peak_run_a: float
    t_accel_s: float
    n_final_rpm: float
    i_final_a: float
    segments: tuple
    #: One armature circuit: a section's energy is its resistance times ``i2t_a2s``.
    phases: ClassVar[int] = 1

    @property
    def notches(self) -> int:
        """Number of notches, equal to the number of sections. [-]"""
        return int(self.r_section_ohm.size)

    @property
    def energy_notch_j(self) -> np.ndarray:
        """Energy dissipated in the starting resistance on each notch, :math:`(R_k - R_m)\\int i^2 dt`. [J]"""
        r_starting = np.cumsum(self.r_section_ohm[::-1])[::-1]
        return r_starting * self.i2t_a2s

    @property
    def energy_total_j(self) -> float:
        """Energy dissipated in the starting resistance over the whole start. [J]"""
        return float(np.sum(self.energy_notch_j))

    @property
    def t_end_s(self) -> float:
        """End of the last computed segment. [s]"""
        return self.segments[-1].t1_s


def settling_current_a(motor: Machine, v_eff_v: float, r_ohm: float, load: LoadTorque) -> float:
    r"""Current at which a circuit of resistance ``r_ohm`` settles against the load.

    The root of :math:`T(I) = T_L(n(I))` with :math:`n(I) = (V' - R I)/k\Phi(I)`
    (the machine's ``speed_rpm``), by Brent's method between 0 A and the
    standstill current (or the end of the machine's data).

    Parameters
    ----------
    motor : Machine
        The machine (:mod:`notchwise.formulas.machines`). [-]
    v_eff_v : float
        Supply less brush drop. [V]
    r_ohm : float
        Whole circuit resistance, machine included. [ohm]
    load : LoadTorque
        Load torque against speed; a potential (driving) load is held by a
        reversed current where the machine's torque reverses with it. [N·m]

    Returns
    -------
    float
        The settling current; ``inf`` where the motor cannot turn the load on
        this circuit at all; ``-inf`` where a driving load is not held even
        by the reversed current ``-v_eff_v/r_ohm`` (twice the no-load speed
        for constant flux), or the machine's torque does not reverse with its
        current (a series field). [A]
    """
    i_top = min(v_eff_v / r_ohm, motor.i_max_a)

    def surplus_nm(i_a: float) -> float:
        return float(motor.torque_nm(i_a)) - float(load.at(motor.speed_rpm(v_eff_v, r_ohm, i_a)))

    if surplus_nm(i_top) <= 0.0:
        return np.inf
    if surplus_nm(0.0) <= 0.0:
        return brentq(surplus_nm, 0.0, i_top, xtol=1e-10, rtol=1e-13)
    if not load.potential:
        return 0.0
    if motor.runs_away_unloaded or not surplus_nm(-i_top) < 0.0:  # a series field reverses with the current
        return -np.inf
    return brentq(surplus_nm, -i_top, 0.0, xtol=1e-10, rtol=1e-13)  # the motor regenerates against the load


def _check_stalls(motor, v_eff, r_notch, load, i_cut):
    """Name the first notch on which the current cannot fall to the switching current."""
    for k, r in enumerate(r_notch[:-1]):
        if v_eff / r <= i_cut:
            raise StartIncomplete(
                "steady below cut-out", k + 1, np.nan,
                f"notch {k + 1}: its standstill current ({quantity(v_eff / r, 'A')}) does not rise above the "
                f"switching current ({quantity(i_cut, 'A')}), so the current relay would never see it fall: "
                "lower the switching current or the resistance in circuit",
            )
        speed = float(motor.speed_rpm(v_eff, r, i_cut))
        t_motor, t_load = float(motor.torque_nm(i_cut)), float(load.at(speed))
        if t_motor <= t_load:
            raise StartIncomplete(
                "stalls", k + 1, speed,
                f"notch {k + 1} stalls at {quantity(speed, 'rpm')}: at the switching current ({quantity(i_cut, 'A')}) "
                f"the motor gives {quantity(t_motor, 'N·m')}, not more than the load's {quantity(t_load, 'N·m')} at "
                "that speed, so the current settles above the cut-out value: raise the switching current or lighten the load",
            )


def _switching(i_cut_a, dwell_s, sections):
    """Switching current (or None) and dwell per notch (inf on current limit), checked."""
    if (i_cut_a is None) == (dwell_s is None):
        given = "neither" if i_cut_a is None else f"both (i_cut_a {shown(i_cut_a)}, dwell_s {shown(dwell_s)})"
        raise InputError(f"give either a switching current (current-limit) or dwell times (definite-time): {given} given")
    if i_cut_a is not None:
        return require_positive("switching current", i_cut_a, "A"), np.full(sections, np.inf)
    dwells = as_float_array("dwell", dwell_s, "s")
    if dwells.size != sections:
        raise InputError(f"dwell has {dwells.size} entries but sections has {sections}: one dwell per section")
    if np.any(dwells <= 0.0):
        k = int(np.argmax(dwells <= 0.0))
        raise InputError(f"dwell entry {k + 1} ({quantity(dwells[k], 's')}) must be above zero")
    return None, dwells


def simulate_start(
    motor: Machine,
    v_supply_v: float,
    sections_ohm,
    l_circuit_h: float,
    inertia_kgm2: float,
    load,
    i_cut_a: float | None = None,
    dwell_s=None,
    brush_drop_v: float = 0.0,
    method: str = "auto",
    rtol: float | None = None,
) -> StartResult:
    r"""Simulate a resistor start in time, notch by notch.

    Parameters
    ----------
    motor : Machine
        The machine (:mod:`notchwise.formulas.machines`); series and compound
        motors need a magnetization curve with its speed, a shunt motor its k_phi. [-]
    v_supply_v : float
        Supply voltage. [V]
    sections_ohm : array_like
        Section resistances in the order they are cut out. [ohm]
    l_circuit_h : float
        Inductance of the armature circuit (armature, fields, resistor), above zero. [H]
    inertia_kgm2 : float
        Inertia of motor and load referred to the motor shaft, above zero. [kg·m²]
    load : float, array_like or LoadTorque
        Load torque referred to the motor shaft: a constant [N·m] or rows of
        (speed [rpm], torque [N·m]); negative values make it a potential
        load that drives the shaft (module docstring). [N·m]
    i_cut_a : float, optional
        Switching current of current-limit switching. [A]
    dwell_s : array_like, optional
        Dwell of each notch for definite-time switching, one per section. [s]
    brush_drop_v : float, optional
        Total brush drop. [V]
    method : {"auto", "integrate"}
        "auto" uses the closed form where it applies (shunt motor, constant
        load) and the fast Rosenbrock integrator elsewhere; "integrate"
        always integrates with the general solver (Radau: an independent
        second method, for checks). [-]
    rtol : float, optional
        Relative tolerance of the integrator, from 1e-12 to 1e-2; by default
        2e-5 for the fast integrator (peaks, dwells and energies within
        0.05 %) and 1e-7 for the general solver. [-]

    Returns
    -------
    StartResult or RotorStart
        A quasi-steady machine (``Machine.quasi_steady``, the wound-rotor
        motor) is started by :func:`notchwise.formulas.rotor_start.simulate_rotor_start`
        at ``v_supply_v`` less ``brush_drop_v`` (its rotor current in the
        current fields, three phases, ``l_circuit_h`` not used) and gives its
        :class:`~notchwise.formulas.rotor_start.RotorStart`. [-]

    Raises
    ------
    StartIncomplete
        The start does not reach a switching current or its steady speed; its
        ``outcome``, ``notch`` and ``speed_rpm`` say what happens instead.

    Notes
    -----
    .. math:: L\frac{di}{dt} = V - V_b - R_k i - k\Phi(i) n,\quad J\frac{d\omega}{dt} = T(i) - T_L(n)

    References
    ----------
    See the module docstring.

    Examples
    --------
    The 220 V, 1000 rpm shunt motor of
    :func:`notchwise.formulas.dc_motor.k_phi_from_rating`'s example, graded
    between 200 A and 100 A, started against 150 N·m with 0.01 H and 2 kg·m²,
    each notch cut at 110 A (invented figures). The inductance keeps the peaks
    below the 200 A of the grading; the final speed is
    :math:`(218 - 0.1 I_f)/0.208` with :math:`I_f = 150/(9.549 \cdot 0.208)`:

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> from notchwise.formulas.grading import grade_uniform
    >>> motor = ShuntMotor(0.1, 0.208)
    >>> sections = grade_uniform(motor, 220.0, 200.0, 100.0, brush_drop_v=2.0).r_section_ohm
    >>> start = simulate_start(motor, 220.0, sections, 0.01, 2.0, 150.0, i_cut_a=110.0, brush_drop_v=2.0)
    >>> start.notches, [round(float(i)) for i in start.i_peak_a]
    (4, [193, 185, 170, 146])
    >>> round(float(start.n_final_rpm), 1), round(float(start.t_accel_s), 2)
    (1011.8, 1.55)
    """
    checked_machine(motor)
    v_eff = effective_supply_v(v_supply_v, brush_drop_v)
    sections = checked_sections(sections_ohm)
    j = require_positive("inertia", inertia_kgm2, "kg·m²")
    motor.require_dynamics()
    load = load_torque(load, signed=True)
    i_cut, dwells = _switching(i_cut_a, dwell_s, sections.size)
    if motor.quasi_steady:  # the circuit steady at every instant, the shaft the one state (Machine.quasi_steady)
        return simulate_rotor_start(motor.with_supply(v_eff, j), sections, load, i_cut, dwells if i_cut is None else None)
    l_h = require_positive("l_circuit", l_circuit_h, "H")
    method = choose("method", method, ("auto", "integrate"))
    rtol = None if rtol is None else checked_rtol(rtol)

    r_motor = motor.r_ohm
    r_notch = notch_resistances_ohm(r_motor, sections)
    i_final = settling_current_a(motor, v_eff, r_motor, load)
    if i_final == -np.inf:
        raise StartIncomplete(
            "runs away", None, np.inf,
            f"the overhauling load runs the {motor.kind} motor away: driven beyond its no-load speed, the motor "
            "cannot brake it (a series field reverses with the current; a shunt motor would need more than twice "
            "its no-load speed); lower it with a braking connection (NW_LOWERING_SPEED)",
        )
    if not np.isfinite(i_final):
        i_stall = min(v_eff / r_motor, motor.i_max_a)
        raise StartIncomplete(
            "stalls", 1, 0.0,
            f"the load is above the motor's capability: even on its own resistance the motor gives only "
            f"{quantity(float(motor.torque_nm(i_stall)), 'N·m')} at standstill, not more than the load's "
            f"{quantity(load.at_rest_nm, 'N·m')}",
        )
    n_final = float(motor.speed_rpm(v_eff, r_motor, i_final))
    if not np.isfinite(n_final) or (i_final == 0.0 and motor.runs_away_unloaded):
        raise StartIncomplete(
            "runs away", None, np.inf,
            f"the {motor.kind} motor runs away: the load torque vanishes at speed, so the motor has no steady "
            "speed; give the load torque the motor must always carry",
        )
    if i_cut is not None:
        _check_stalls(motor, v_eff, r_notch, load, i_cut)
    t_mech = motor.mechanical_time_constant_s(r_notch[0], j, i_final if i_cut is None else i_cut)  # notch 1
    t_cap = TIME_CAP_FACTOR * (t_mech + l_h / r_motor)

    notches = []
    t, i, n = 0.0, 0.0, 0.0
    for k, r in enumerate(r_notch):
        last = k == sections.size
        notch = NotchRecord(k + 1, t, i, n, sections.size)
        circuit = NotchCircuit(v_eff, r, l_h, j, load, rtol, fast=method == "auto")
        motor.advance_notch(notch, circuit, None if last else i_cut, np.inf if last else dwells[k], t_cap,
                            n_final if last else None)
        notches.append(notch)
        t, i, n = notch.t, notch.i, notch.n

    cut = notches[:-1]
    run = notches[-1]
    return StartResult(
        r_total_ohm=r_notch[:-1],
        r_section_ohm=sections,
        t_start_s=np.array([x.segments[0].t0_s for x in cut]),
        dwell_s=np.array([x.t - x.segments[0].t0_s for x in cut]),
        i_peak_a=np.array([x.peak for x in cut]),
        i_cut_a=np.array([x.i for x in cut]),
        n_cut_rpm=np.array([x.n for x in cut]),
        charge_c=np.array([x.charge for x in cut]),
        i2t_a2s=np.array([x.i2t for x in cut]),
        work_load_j=np.array([x.work for x in cut]),
        i_peak_run_a=run.peak,
        t_accel_s=run.t,
        n_final_rpm=n_final,
        i_final_a=float(i_final),
        segments=tuple(s for x in notches for s in x.segments),
    )


def checked_points(points) -> int:
    """Number of history samples, a whole number from 2 to :data:`MAX_HISTORY_POINTS`. [-]

    Parameters
    ----------
    points : int or float
        Number of samples asked for (a whole float from a cell is accepted). [-]

    Returns
    -------
    int
        The number of samples. [-]
    """
    return require_count("points", points, 2, MAX_HISTORY_POINTS)


@dataclass(frozen=True)
class History:
    """The start sampled in time.

    Attributes
    ----------
    t_s : numpy.ndarray
        Times from closing the line contactor. [s]
    i_a : numpy.ndarray
        Armature current. [A]
    n_rpm : numpy.ndarray
        Speed. [rpm]
    torque_nm : numpy.ndarray
        Developed motor torque. [N·m]
    notch : numpy.ndarray
        Notch in circuit at each time; N+1 is the run on the motor alone. [-]
    i_stator_a : numpy.ndarray or None
        Stator current of a wound-rotor motor (``i_a`` is then its rotor
        current, rotor side); None for a DC machine, which has no stator. [A]
    """

    t_s: np.ndarray
    i_a: np.ndarray
    n_rpm: np.ndarray
    torque_nm: np.ndarray
    notch: np.ndarray
    i_stator_a: np.ndarray | None = None


def start_history(result: StartResult, motor, points: int = 200, t_end_s: float | None = None) -> History:
    """Current, speed and torque of a simulated start at evenly spaced times.

    Parameters
    ----------
    result : StartResult or RotorStart
        From :func:`simulate_start`. [-]
    motor : Machine
        The same machine, for the torque (:mod:`notchwise.formulas.machines`). [-]
    points : int
        Number of times, 2 to 100000. [-]
    t_end_s : float, optional
        Last time; by default the end of the start. [s]

    Returns
    -------
    History
        Where a cut falls between samples, the sample shows the state of the
        notch in circuit at that time. [-]

    Examples
    --------
    The start of :func:`simulate_start`'s example at three times: at rest, half
    way (on notch 2) and at the end (notch 5, the run on the motor alone):

    >>> from notchwise.formulas.dc_motor import ShuntMotor
    >>> from notchwise.formulas.grading import grade_uniform
    >>> motor = ShuntMotor(0.1, 0.208)
    >>> sections = grade_uniform(motor, 220.0, 200.0, 100.0, brush_drop_v=2.0).r_section_ohm
    >>> start = simulate_start(motor, 220.0, sections, 0.01, 2.0, 150.0, i_cut_a=110.0, brush_drop_v=2.0)
    >>> history = start_history(start, motor, points=3)
    >>> history.notch.tolist(), [round(float(n)) for n in history.n_rpm]
    ([1, 2, 5], [0, 525, 992])
    """
    count = checked_points(points)
    t_end = result.t_end_s if t_end_s is None else require_positive("t_end", t_end_s, "s")
    t_end = min(t_end, result.t_end_s)
    times = np.linspace(0.0, t_end, count)
    if motor.quasi_steady:
        rotor, speed, torque, stator, step = result.sampled(times)
        return History(times, rotor, speed, torque, step, stator)
    current = np.empty(count)
    speed = np.empty(count)
    notch = np.empty(count, dtype=int)
    starts = np.array([s.t0_s for s in result.segments])
    which = np.clip(np.searchsorted(starts, times, side="right") - 1, 0, len(result.segments) - 1)
    for k in np.unique(which):
        segment = result.segments[k]
        mask = which == k
        current[mask], speed[mask] = segment.state_at(times[mask] - segment.t0_s)
        notch[mask] = segment.notch
    return History(times, current, speed, np.asarray(motor.torque_nm(np.clip(current, 0.0, None)), dtype=float), notch)
