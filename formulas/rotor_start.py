r"""The start of a wound-rotor induction motor in time, quasi-steady in its circuit.

One state, the shaft speed [1]_:

.. math::

    J\,\frac{d\omega}{dt} = T(s, R_k') - T_L(n), \qquad s = 1 - \frac{\omega}{\omega_s},

with :math:`T(s, R')` the steady-state torque of the T circuit
(:meth:`WoundRotorMotor.torque_at_slip_nm`), :math:`R_k'` the whole rotor resistance
on step :math:`k`, :math:`J` the inertia of motor and load and :math:`T_L` the
load torque (a number or a speed/torque table, :func:`load_torque`).

Why quasi-steady. The electrical time constants of the stator and rotor
circuits (tens of milliseconds at most, shorter still with resistance in the
rotor) are small against a resistance start of seconds, so each instant sees
the steady-state torque at its slip; designers size rotor grids this way
(common practice, no source). Left out: the stator's switching transient at
each closing (a DC offset and a brief torque pulsation of a few cycles) and
the rotor's transient at each cut. Protection that must ride through the first
cycles needs their asymmetric peak added.

Integration. With the torque an explicit function of slip, the time from slip
:math:`s_a` to :math:`s_b` is a plain integral,

.. math::

    t = \int_{s_b}^{s_a} \frac{J\,\omega_s}{T(s) - T_L(s)}\,ds, \qquad
    E_{rotor} = \int_{s_b}^{s_a} \frac{J\,\omega_s^2\, s\, T(s)}{T(s) - T_L(s)}\,ds,

the second being the energy dissipated in the whole rotor circuit
(:math:`3 I_2'^2 R' = s\,P_{ag} = s\,T\omega_s`, [2]_ sec. 6.4, Eq. 6.26,
from memory), of which the external resistance takes
:math:`R_{ext}/(R_{ext} + R_2)`. Near the step's equilibrium slip
:math:`s_e` (where :math:`T = T_L`) the integrand grows as
:math:`1/(s - s_e)`; the substitution :math:`s = s_e + (s_a - s_e)e^u` makes
it smooth, and a 48-point Gauss-Legendre rule in :math:`u` evaluates it
([3]_, 25.4.29), one panel between each pair of a load table's corners. On no load this gives the law
:math:`E_{rotor} = \tfrac12 J\omega_s^2 (s_a^2 - s_b^2)` whatever the
resistance ([1]_, sec. on energy in starting, from memory).

Switching. Current-limit: each step is cut out when the rotor current (rotor
side) has fallen to ``i_cut_a``; the current is a function of :math:`R'/s`
alone, so the cut-out slip is :math:`R_k'/x_c` with :math:`x_c` in closed form.
A step whose current starts at or below it is cut at once. Definite-time:
each step lasts its dwell, and the value of :math:`u` at its end is found by
Newton's method ([3]_, 3.9.5, from memory) on the time to reach :math:`u`,
whose derivative is the integrand's negative,

.. math::

    t(u) = \int_u^0 \frac{J\,\omega_s\,(s - s_e)}{T(s) - T_L(s)}\,du', \qquad
    \frac{dt}{du} = -\frac{J\,\omega_s\,(s - s_e)}{T(s) - T_L(s)},

kept within a bracket by bisection; a step smaller than :math:`10^{-7}` is
the last and is taken on the rates of time and energy at the point before
(what it leaves is of the order of its square). After the last cut the
motor runs on its own resistance; the start counts as finished when the speed reaches
:data:`SETTLED_FRACTION` of the final speed, or at the last cut if it is
already there.

Stall. A step whose torque meets the load before its switching current is
reached is refused by name; so is a standstill torque at or below the load at
rest (the load is a reaction at rest and never drives the motor backwards).

References
----------
.. [1] W. Leonhard, *Control of Electrical Drives*, 3rd ed., Springer, 2001,
   ch. 2 (mechanics of the drive) and sec. on starting losses of induction
   motors (from memory).
.. [2] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 6.4 (power and torque, Eqs. 6.25-6.27).
.. [3] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
   NBS, 1964, 25.4.29 (Gauss-Legendre quadrature).
.. [4] F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic
   interpolation," *SIAM J. Numer. Anal.*, vol. 17, no. 2, pp. 238-246, 1980.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import ClassVar

import numpy as np
from scipy.interpolate import PchipInterpolator
from scipy.optimize import brentq

from .errors import InputError, as_float_array, quantity, require_positive
from .grading import notch_resistances_ohm
from .induction_motor import WoundRotorMotor, rotor_sections
from .start_load import LoadTorque, load_torque
from .start_notch import SETTLED_FRACTION, StartIncomplete

__all__ = ["RotorStart", "simulate_rotor_start", "QUADRATURE_POINTS"]

#: Gauss-Legendre points per step. [-]
QUADRATURE_POINTS = 48
_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(QUADRATURE_POINTS)
_NODES_FROM_0 = 1.0 + _NODES  # the nodes on [0, 2], so that a panel's start plus its half-width times these are its nodes
#: Gauss-Legendre panels per step on which a history inverts t(s). [-]
HISTORY_PANELS = 64
#: Slips on which a load table's first meeting with the motor torque is bracketed, as fractions of the step's start.
_SCAN = np.linspace(1.0, 0.0, 513)
#: The nearest a step's end comes to its equilibrium in :math:`u`, :math:`s - s_e = 10^{-12}(s_a - s_e)`. [-]
_U_NEAR = math.log(1e-12)
#: Newton's method on a dwell stops when the time it reaches is within this fraction of the dwell. [-]
_DWELL_RTOL = 1e-12
#: A Newton step in u this small is the last one, taken without a new quadrature (it leaves about its square). [-]
_NEWTON_FINISH = 1e-7
#: A bound on the iterations on one dwell (bisection alone needs about 45). [-]
_MAX_ITERATIONS = 100


@dataclass(frozen=True)
class RotorStart:
    """A simulated rotor-resistance start, one entry per step (step 1 = all sections in).

    Attributes
    ----------
    r_total_ohm, r_section_ohm : numpy.ndarray
        Whole rotor resistance on each step and the section cut out at its end, rotor side, per phase. [ohm]
    t_start_s, dwell_s : numpy.ndarray
        Instant each step begins, and how long it lasts. [s]
    i_peak_a, i_cut_a : numpy.ndarray
        Rotor current (rotor side) at the start of each step, its highest, and at its cut-out. [A]
    i_stator_peak_a : numpy.ndarray
        Highest stator current on each step. [A]
    n_cut_rpm, s_cut : numpy.ndarray
        Speed and slip at each cut-out. [rpm], [-]
    energy_rotor_j : numpy.ndarray
        Energy dissipated in the whole rotor circuit (own and external resistance, three phases) on each step. [J]
    energy_notch_j : numpy.ndarray
        Energy dissipated in the external rotor resistance, three phases, on each step. [J]
    i2t_a2s : numpy.ndarray
        :math:`\\int I_2^2\\,dt` of the rotor current (rotor side) in one phase over each step,
        :math:`E_{rotor}/(3 R_k)`; a section's energy is ``phases`` times its resistance times this. [A²·s]
    t_cut_nm : numpy.ndarray
        Motor torque at each cut-out. [N·m]
    i_peak_run_a, i_stator_peak_run_a : float
        Rotor and stator current just after the last cut (the run's highest). [A]
    t_accel_s : float
        Acceleration time (module docstring). [s]
    n_final_rpm : float
        Steady speed on the rotor's own resistance at the load. [rpm]
    steps : tuple
        Each step (and the run) with the slip at its end, for :meth:`sampled`.
    """

    r_total_ohm: np.ndarray
    r_section_ohm: np.ndarray
    t_start_s: np.ndarray
    dwell_s: np.ndarray
    i_peak_a: np.ndarray
    i_cut_a: np.ndarray
    i_stator_peak_a: np.ndarray
    n_cut_rpm: np.ndarray
    s_cut: np.ndarray
    energy_rotor_j: np.ndarray
    energy_notch_j: np.ndarray
    i2t_a2s: np.ndarray
    t_cut_nm: np.ndarray
    i_peak_run_a: float
    i_stator_peak_run_a: float
    t_accel_s: float
    n_final_rpm: float
    steps: tuple = field(repr=False, compare=False)
    #: The rotor circuit has three phases: a section's energy is three times its resistance times ``i2t_a2s``.
    phases: ClassVar[int] = 3

    @property
    def notches(self) -> int:
        """Number of steps, equal to the number of sections. [-]"""
        return int(self.r_section_ohm.size)

    @property
    def energy_total_j(self) -> float:
        """Energy dissipated in the external rotor resistance over the whole start, three phases. [J]"""
        return float(np.sum(self.energy_notch_j))

    @property
    def t_end_s(self) -> float:
        """End of the start: the acceleration time. [s]"""
        return self.t_accel_s

    def sampled(self, times_s):
        r"""Rotor current, speed, torque, stator current and step at the times ``times_s``.

        The slip at a time is :math:`t(s)` of the step (module docstring)
        inverted: the time integral tabulated on a grid of :math:`u`
        (:data:`HISTORY_PANELS` Gauss-Legendre panels, the load table's corners
        among their ends) and :math:`u(t)` interpolated monotonically
        (Fritsch-Carlson, [4]_). Where a cut falls at a sample, the sample
        shows the step that begins there.

        Parameters
        ----------
        times_s : array_like
            Times from closing the stator contactor, 0 to :attr:`t_end_s`. [s]

        Returns
        -------
        tuple of numpy.ndarray
            Rotor current (rotor side) [A], speed [rpm], motor torque [N·m],
            stator current [A], step in circuit (N+1 for the run) [-].
        """
        times = np.asarray(times_s, dtype=float)
        slip = np.empty(times.size)
        r_ref = np.empty(times.size)
        which = np.empty(times.size, dtype=int)
        starts = np.append(self.t_start_s, self.t_start_s[-1] + self.dwell_s[-1])
        index = np.clip(np.searchsorted(starts, times, side="right") - 1, 0, len(self.steps) - 1)
        for k, (step, s_end) in enumerate(self.steps):
            mask = index == k
            if not mask.any():
                continue
            slip[mask] = step.slip_at(times[mask] - starts[k], s_end)
            r_ref[mask], which[mask] = step.r, k + 1
        motor = self.steps[0][0].motor
        currents = motor.currents(slip, r_ref)
        torque = motor.torque_at_slip_nm(slip, r_ref)
        return currents.rotor_a, motor.speed_at_slip_rpm(slip), np.asarray(torque, dtype=float), currents.stator_a, which


class _Step:
    """One step's resistance against the load: its equilibrium slip and its time and energy integrals in :math:`u`."""

    def __init__(self, motor: WoundRotorMotor, load: LoadTorque, r_referred: float, s_start: float, corners: np.ndarray):
        """``corners``: the slips of the load table's speeds, falling; none for a constant load. [-]"""
        self.motor, self.load, self.r, self.s_a = motor, load, r_referred, s_start
        self.constant_load = corners.size == 0
        self.net_start_nm = float(self.net_nm(s_start))
        self.s_eq = self._equilibrium_slip()
        self.width = s_start - self.s_eq
        # The values of u where the integrand has a kink, rising: the load table's corners within the step.
        self.corners_u = self.u_at(corners[(corners > self.s_eq) & (corners < s_start)][::-1]) if corners.size else corners

    def net_nm(self, s):
        """Accelerating torque at slip ``s``. [N·m]"""
        return self.motor.torque_at_slip_nm(s, self.r) - self.load.at(self.motor.speed_at_slip_rpm(s))

    def _equilibrium_slip(self) -> float:
        """The first slip below the step's start at which the motor torque meets the load. [-]"""
        if self.constant_load:
            t_load = float(self.load.torque_nm[0])
            if t_load == 0.0:
                return 0.0
            return self.r / self.motor.r_over_s_at_torque(t_load)  # T(R'/s) = T_L on the stable side
        if self.net_start_nm <= 0.0:
            return self.s_a  # a step that cannot start: simulate_rotor_start refuses it by name
        s = self.s_a * _SCAN
        net = self.net_nm(s[1:])  # at s = 0 the motor gives no torque, so some entry is at or below zero
        meets = int(np.argmax(net <= 0.0))
        return brentq(self.net_nm, s[meets + 1], s[meets], xtol=1e-14, rtol=1e-14) if net[meets] < 0.0 else float(s[meets + 1])

    def u_at(self, s):
        """The variable of integration at slip ``s``, :math:`u = \\ln((s - s_e)/(s_a - s_e))` (module docstring). [-]"""
        return np.log((s - self.s_eq) / self.width)

    def slip_at_u(self, u):
        """Slip at ``u``, :math:`s = s_e + (s_a - s_e)e^u`. [-]"""
        return self.s_eq + self.width * np.exp(u)

    def _panels(self, u_end: float, count: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Ends, Gauss-Legendre nodes and weights of ``count`` equal panels from ``u_end`` to 0. [-]

        The load table's corners are among the ends: the integrand has a kink there.
        """
        inside = self.corners_u[self.corners_u > u_end] if self.corners_u.size else self.corners_u
        if count == 1:
            ends = np.empty(inside.size + 2)
            ends[0], ends[1:-1], ends[-1] = u_end, inside, 0.0
        else:
            ends = np.union1d(np.linspace(u_end, 0.0, count + 1), inside)
        half = 0.5 * (ends[1:] - ends[:-1])[:, None]
        return ends, ends[:-1, None] + half * _NODES_FROM_0, half * _WEIGHTS  # 25.4.29 of [3] on each panel

    def _rates(self, u):
        """Slip [-], motor torque [N·m] and the time's integrand in u, :math:`-dt/du` [s], at the values ``u`` (module docstring)."""
        s = self.slip_at_u(u)
        torque = self.motor.torque_at_slip_nm(s, self.r)
        net = torque - self.load.at(self.motor.speed_at_slip_rpm(s))
        return s, torque, self.motor.inertia_kgm2 * self.motor.omega_sync_rad_s * (s - self.s_eq) / net  # -dt/du = J ws (s - s_e)/(T - T_L)

    def _integrate(self, u_end: float) -> tuple[float, float, float, float]:
        """Time [s] and whole-rotor energy [J] from the step's start to ``u_end``.

        Also their rates there, :math:`-dt/du` [s] and :math:`-dE/du` [J]: the integrands at ``u_end``.
        """
        _, u, weights = self._panels(u_end, 1)
        nodes = np.empty(u.size + 1)
        nodes[:-1], nodes[-1] = u.ravel(), u_end
        s, torque, time_rate = self._rates(nodes)
        energy_rate = self.motor.omega_sync_rad_s * time_rate * s * torque  # 3 I2'^2 R' = s T ws, Eq. 6.26 of [2]
        weights = weights.ravel()
        return float(weights @ time_rate[:-1]), float(weights @ energy_rate[:-1]), float(time_rate[-1]), float(energy_rate[-1])

    def integrals(self, s_end: float) -> tuple[float, float]:
        """Time [s] and whole-rotor energy [J] from the step's start to slip ``s_end`` (module docstring)."""
        return self._integrate(float(self.u_at(s_end)))[:2]

    def slip_at(self, elapsed_s, s_end: float):
        """Slips at the times ``elapsed_s`` from the step's start, up to the step's end at ``s_end`` (:meth:`RotorStart.sampled`). [-]"""
        if s_end >= self.s_a:
            return np.full(np.shape(elapsed_s), self.s_a)
        ends, u, weights = self._panels(float(self.u_at(s_end)), HISTORY_PANELS)
        panel_t = np.sum(weights * self._rates(u)[2], axis=1)
        elapsed_at_ends = np.concatenate((np.cumsum(panel_t[::-1])[::-1], [0.0]))  # t(u) = integral from u to 0
        u_of_t = PchipInterpolator(elapsed_at_ends[::-1], ends[::-1])  # [4]
        return self.slip_at_u(u_of_t(np.clip(elapsed_s, 0.0, elapsed_at_ends[0])))

    def end_after(self, dwell: float) -> tuple[float, float, float]:
        """Slip [-] reached after ``dwell`` seconds on this step, and the time [s] and whole-rotor energy [J] to it.

        Newton's method in :math:`u` on :math:`t(u) = ` ``dwell``, whose derivative is the integrand's
        negative (module docstring), kept within a bracket by bisection.
        """
        if dwell == 0.0:
            return self.s_a, 0.0, 0.0
        low, high, low_seen = _U_NEAR, 0.0, False  # t(low) > dwell >= t(high) once low is seen
        # The tangent at the start, where t = 0 and -dt/du = J ws (s_a - s_e)/(T - T_L).
        u = max(-dwell * self.net_start_nm / (self.motor.inertia_kgm2 * self.motor.omega_sync_rad_s * self.width), _U_NEAR)
        for _ in range(_MAX_ITERATIONS):
            time, energy, time_rate, energy_rate = self._integrate(u)
            if abs(time - dwell) <= _DWELL_RTOL * dwell:
                break
            if time <= dwell and u == _U_NEAR:
                # Settled on this step before the timer runs out: the rotor runs on at s_e, its circuit
                # dissipating s P_ag = s T ws (Eq. 6.26 of [2]) for the rest of the dwell.
                slip, torque, _ = self._rates(np.array([u]))
                power_w = self.motor.omega_sync_rad_s * float(slip[0] * torque[0])
                return float(slip[0]), dwell, energy + power_w * (dwell - time)
            if time > dwell:
                low, low_seen = u, True
            else:
                high = u
            step = (time - dwell) / time_rate  # -f/f' with f = t(u) - dwell, f' = -time_rate: Newton's method, 3.9.5 of [3]
            if low < u + step < high and abs(step) <= _NEWTON_FINISH:
                # Newton's last step, taken on the rates at u: what it leaves is of the order of its square.
                return float(self.slip_at_u(u + step)), dwell, energy - energy_rate * step
            following = u + step if low < u + step < high else 0.5 * (low + high) if low_seen else _U_NEAR
            if following == u:
                break  # no further step in floating point
            u = following
        return float(self.slip_at_u(u)), time, energy


def simulate_rotor_start(motor: WoundRotorMotor, sections_ohm, load, i_cut_a=None, dwell_s=None) -> RotorStart:
    """Simulate a rotor-resistance start step by step, quasi-steady in the circuit.

    Parameters
    ----------
    motor : WoundRotorMotor
        The machine, with the inertia of motor and load. [-]
    sections_ohm : array_like
        Rotor sections, rotor side, per phase, in the order they are cut out. [ohm]
    load : float or array_like
        Load torque on the motor shaft: a number [N·m] or rows of speed [rpm] and torque [N·m].
    i_cut_a : float, optional
        Rotor current (rotor side) at which each step is cut out (current-limit). [A]
    dwell_s : array_like, optional
        Dwell of each step, one per section (definite-time). [s]

    Returns
    -------
    RotorStart
        Currents, speeds, times and energies per step, and the run. [-]

    Notes
    -----
    .. math:: t_k = \\int_{s_{k}}^{s_{k-1}} \\frac{J\\omega_s\\,ds}{T(s, R_k') - T_L(s)}

    (module docstring). Exactly one of ``i_cut_a`` and ``dwell_s`` is given.

    Raises
    ------
    InputError
        Both or neither switching given; dwells not one per section or negative.
    StartIncomplete
        (a DesignError) ``stalls``: standstill torque at or below the load, a
        step that stalls, or a cut after which the motor would slow down; its
        ``notch`` names the step (None for the run).
    DesignError
        Standstill torque at or below the load, a step that stalls, or a cut
        after which the motor would slow down, or
        ``i_cut_a`` above the rotor's short-circuit current at standstill.

    Examples
    --------
    The motor and grading of
    :func:`notchwise.formulas.induction_motor.grade_rotor`'s example against
    2000 N·m, each step cut at 250 A rotor current (invented figures):

    >>> from notchwise.formulas.induction_motor import WoundRotorMotor, grade_rotor
    >>> motor = WoundRotorMotor(0.02, 0.12, 4.0, 0.025, 0.13, 690.0, 50.0, 6, 750.0, 60.0)
    >>> sections = grade_rotor(motor, 6000.0, 3000.0).r_section_ohm
    >>> start = simulate_rotor_start(motor, sections, 2000.0, i_cut_a=250.0)
    >>> [round(float(i)) for i in start.i_peak_a]
    [542, 509, 509, 509]
    >>> round(float(start.t_accel_s), 2), round(float(start.n_final_rpm), 1)
    (2.71, 988.0)
    """
    sections = rotor_sections(sections_ohm)
    torque_load = load if isinstance(load, LoadTorque) else load_torque(load)
    if (i_cut_a is None) == (dwell_s is None):
        raise InputError("give either i_cut (current-limit switching) or dwell (definite-time switching), not both or neither")
    if i_cut_a is not None:
        x_cut = motor.r_over_s_at_rotor_current(require_positive("i_cut", i_cut_a, "A"))
    else:
        dwells = as_float_array("dwell", dwell_s, "s")
        if dwells.size != sections.size:
            raise InputError(f"dwell has {dwells.size} entries but sections has {sections.size}")
        if np.any(dwells < 0.0):
            k = int(np.argmax(dwells < 0.0))
            raise InputError(f"dwell entry {k + 1} ({quantity(dwells[k], 's')}) must not be negative")
    r = notch_resistances_ohm(motor.r_rotor_side_ohm, sections)
    r_ref = motor.to_stator_side_ohm(r)
    count = sections.size
    t_start, dwell, s_cut, e_rotor = (np.empty(count) for _ in range(4))
    s_a, t = 1.0, 0.0
    steps = []
    corners = motor.slip(torque_load.speed_rpm) if not torque_load.constant else np.empty(0)
    for k in range(count + 1):
        step = _Step(motor, torque_load, float(r_ref[k]), s_a, corners)
        net = step.net_start_nm
        if net <= 0.0:
            speed = float(motor.speed_at_slip_rpm(s_a))
            where = "at standstill: the torque" if k == 0 else f"after the cut at {quantity(speed, 'rpm')}: the torque"
            raise StartIncomplete(
                "stalls", k + 1 if k < count else None, speed,
                f"step {k + 1} stalls {where} ({quantity(net + float(torque_load.at(speed)), 'N·m')}) "
                f"is not above the load ({quantity(float(torque_load.at(speed)), 'N·m')})"
            )
        steps.append(step)
        if k == count:
            break
        if i_cut_a is not None:
            s_b = min(s_a, step.r / x_cut)
            if s_b <= step.s_eq:
                raise StartIncomplete(
                    "stalls", k + 1, float(motor.speed_at_slip_rpm(step.s_eq)),
                    f"step {k + 1} stalls: the torque meets the load at {quantity(float(motor.speed_at_slip_rpm(step.s_eq)), 'rpm')} "
                    f"before the rotor current falls to i_cut ({quantity(i_cut_a, 'A')}): raise i_cut or lighten the load"
                )
            dwell[k], e_rotor[k] = step.integrals(s_b) if s_b < s_a else (0.0, 0.0)
        else:
            s_b, dwell[k], e_rotor[k] = step.end_after(float(dwells[k]))
        t_start[k], s_cut[k] = t, s_b
        t, s_a = t + dwell[k], s_b
    run = steps[-1]
    s_settled = 1.0 - SETTLED_FRACTION * (1.0 - run.s_eq)
    t_accel = t + (run.integrals(s_settled)[0] if s_settled < run.s_a else 0.0)
    s_starts = np.array([st.s_a for st in steps])
    at_start = motor.currents(s_starts, r_ref)
    at_end = motor.currents(np.append(s_cut, run.s_eq), r_ref)
    stator_peak = np.maximum(at_start.stator_a, at_end.stator_a)  # falls then rises once along a step (induction_motor.check_rotor)
    i2t = e_rotor / (3.0 * r[:-1])  # E_rotor = 3 R_k int I_2^2 dt, rotor side
    return RotorStart(
        r_total_ohm=r[:-1],
        r_section_ohm=sections,
        t_start_s=t_start,
        dwell_s=dwell,
        i_peak_a=at_start.rotor_a[:-1],
        i_cut_a=at_end.rotor_a[:-1],
        i_stator_peak_a=stator_peak[:-1],
        n_cut_rpm=motor.speed_at_slip_rpm(s_cut),
        s_cut=s_cut,
        energy_rotor_j=e_rotor,
        energy_notch_j=3.0 * (r[:-1] - motor.r_rotor_side_ohm) * i2t,
        i2t_a2s=i2t,
        t_cut_nm=np.asarray(motor.torque_at_slip_nm(s_cut, r_ref[:-1]), dtype=float),
        i_peak_run_a=float(at_start.rotor_a[-1]),
        i_stator_peak_run_a=float(stator_peak[-1]),
        t_accel_s=float(t_accel),
        n_final_rpm=float(motor.speed_at_slip_rpm(run.s_eq)),
        steps=tuple(zip(steps, (*s_cut, min(s_settled, run.s_a)))),
    )
