r"""The start of a DC motor in time: current, speed and resistor energy, notch by notch.

The armature circuit and the shaft obey [1]_

.. math::

    L\,\frac{di}{dt} = V - V_b - R_k\,i - k\Phi(i)\,n, \qquad
    J\,\frac{d\omega}{dt} = \frac{60}{2\pi}\,k\Phi(i)\,i - T_L(n), \qquad
    \omega = \frac{2\pi}{60}\,n

with :math:`R_k` the whole circuit resistance on notch :math:`k` (motor plus
the sections still in circuit), :math:`L` the inductance of the armature
circuit (taken constant), :math:`J` the inertia of motor and load referred to
the motor shaft and :math:`T_L(n)` the load torque. The flux :math:`k\Phi(i)`
comes from the motor models of :mod:`formulas.dc_motor` (constant for a shunt
or separately excited motor, from the magnetization curve for series and
compound motors).

Standstill. The load is taken as a reaction at standstill: a shaft at rest
stays at rest while the motor torque is at or below the load torque at 0 rpm
(a hoist brake, static friction, a conveyor's breakaway torque), and a shaft
that slows to rest stays there until the motor torque exceeds it again. The
motor is never driven backwards by the load; an overhauling load is outside
this model. At rest the back-EMF is zero, so the current is the first-order
lag :math:`i = I_\infty + (i_0 - I_\infty)e^{-tR/L}`, :math:`I_\infty = (V-V_b)/R`,
for every kind of motor; the instant of breakaway follows in closed form. No
solver steps across the standstill discontinuity.

Shunt motor with a constant load. Between cuts the equations are linear with
constant coefficients, :math:`\dot x = A x + b`; their solution
:math:`x(t) = x_\infty + e^{At}(x_0 - x_\infty)` is used in closed form (the
2 x 2 matrix exponential, [2]_), the cut-out instant is found by Brent's method
on it, and the integrals of :math:`i`, :math:`i^2` and :math:`n` that give the
energies are exact (a Lyapunov equation for :math:`\int i^2\,dt`, [3]_).

Every other case (series or compound motor, a load table) is integrated by
``scipy.integrate.solve_ivp`` (Radau, an implicit method for stiff systems)
with the cut-out current and the return to standstill as events.

Switching. Current-limit: a notch is cut out when the current, having risen
above the cut-out current, falls back to it. Definite-time: each notch is cut
out a fixed dwell after it began. After the last cut the motor runs on its own
resistance; the start is taken as finished when, after the last cut, the
speed first reaches 98 % of the final speed (:data:`SETTLED_FRACTION`,
common practice, no source) and the current has passed its last peak.

Stall. On notch :math:`k` the current can fall to the cut-out current
:math:`I_c` only if the motor, carrying :math:`I_c`, still out-pulls the load
at the speed that current gives on this notch:
:math:`T(I_c) > T_L(n_k(I_c))` with :math:`n_k(I) = (V - V_b - R_k I)/k\Phi(I)`.
Where it does not, the notch is reported as stalled before any time step is
taken; every notch is further bounded by a time cap (:data:`TIME_CAP_FACTOR`
slow time constants).

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

import math
from dataclasses import dataclass

import numpy as np
from scipy.integrate import solve_ivp
from scipy.optimize import brentq

from .dc_motor import NM_PER_V_A_PER_RPM, SeriesMotor, ShuntMotor, effective_supply_v, torque_nm
from .errors import DesignError, InputError, as_float_array, choose, quantity, require_count, require_positive
from .grading import checked_sections, notch_resistances_ohm

__all__ = [
    "SETTLED_FRACTION",
    "TIME_CAP_FACTOR",
    "LoadTorque",
    "load_torque",
    "StartResult",
    "simulate_start",
    "History",
    "start_history",
    "settling_current_a",
]

#: Fraction of the final speed at which the start counts as finished. Common practice, no source.
SETTLED_FRACTION = 0.98
#: A notch may last at most this many of its slowest time constants before it is called stalled.
TIME_CAP_FACTOR = 60.0
#: Radians per second per rpm.
RAD_S_PER_RPM = 2.0 * math.pi / 60.0
#: Most changes between standstill and motion on one notch before the start is refused.
MAX_PHASES_PER_NOTCH = 8
#: Exponents of the geometric sampling grid on which cut-out instants and peaks are bracketed.
_GRID_STEPS = np.linspace(0.0, 1.0, 240)


@dataclass(frozen=True)
class LoadTorque:
    """Load torque against speed, referred to the motor shaft.

    Attributes
    ----------
    speed_rpm : numpy.ndarray
        Speeds of the table, strictly rising, from 0 rpm or above; one entry
        for a constant load. [rpm]
    torque_nm : numpy.ndarray
        Load torque at each speed, at or above zero. Between points it is
        interpolated linearly; beyond the ends it is held at the end value. [N·m]
    """

    speed_rpm: np.ndarray
    torque_nm: np.ndarray

    @property
    def constant(self) -> bool:
        """True when the load torque does not depend on speed."""
        return bool(np.all(self.torque_nm == self.torque_nm[0]))

    def at(self, n_rpm):
        """Load torque at speed ``n_rpm``. [N·m]"""
        return np.interp(n_rpm, self.speed_rpm, self.torque_nm)

    @property
    def at_rest_nm(self) -> float:
        """Load torque at 0 rpm: the reaction the motor must exceed to break away. [N·m]"""
        return float(self.at(0.0))


def load_torque(torque) -> LoadTorque:
    """A validated load torque from a number or a table of (speed, torque) rows.

    Parameters
    ----------
    torque : float or array_like
        A constant torque [N·m], or rows of (speed [rpm], torque [N·m]) with
        speeds strictly rising from 0 rpm or above.

    Returns
    -------
    LoadTorque
    """
    rows = np.asarray(torque, dtype=object)
    if rows.ndim == 0 or rows.size == 1:
        value = as_float_array("load_torque", torque, "N·m")[0]
        if value < 0.0:
            raise InputError(f"load_torque ({quantity(value, 'N·m')}) must not be negative: an overhauling load is outside this model")
        return LoadTorque(np.array([0.0]), np.array([value]))
    if rows.ndim != 2 or rows.shape[1] < 2:
        raise InputError("load_torque must be a number or two columns: speed [rpm] and torque [N·m]")
    speed = as_float_array("load_torque speed", rows[:, 0], "rpm")
    value = as_float_array("load_torque torque", rows[:, 1], "N·m")
    if speed[0] < 0.0:
        raise InputError(f"load_torque speed ({quantity(speed[0], 'rpm')}) must not be negative")
    if np.any(np.diff(speed) <= 0.0):
        k = int(np.argmax(np.diff(speed) <= 0.0))
        raise InputError(f"load_torque speeds must rise strictly: row {k + 2} ({quantity(speed[k + 1], 'rpm')}) does not exceed row {k + 1}")
    if np.any(value < 0.0):
        k = int(np.argmax(value < 0.0))
        raise InputError(f"load_torque row {k + 1} ({quantity(value[k], 'N·m')}) must not be negative: an overhauling load is outside this model")
    return LoadTorque(speed, value)


@dataclass(frozen=True)
class _Segment:
    """One stretch of the start on which the state is a known function of time."""

    t0_s: float
    t1_s: float
    notch: int
    state_at: object  # callable: times from t0 [s] -> (current [A], speed [rpm])


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


def _motor_torque_nm(motor, i_a):
    """dc_motor.developed_torque_nm without its argument checks: these currents are the solver's own. [N·m]"""
    return torque_nm(motor.k_phi(i_a), i_a)


def settling_current_a(motor, v_eff_v: float, r_ohm: float, load: LoadTorque) -> float:
    r"""Current at which a circuit of resistance ``r_ohm`` settles against the load.

    The root of :math:`T(I) = T_L(n(I))` with :math:`n(I) = (V' - R I)/k\Phi(I)`,
    by Brent's method between 0 A and the standstill current (or the end of the
    magnetization curve).

    Returns
    -------
    float
        The settling current; ``inf`` where the motor cannot turn the load on
        this circuit at all. [A]
    """
    i_top = min(v_eff_v / r_ohm, motor.i_max_a)

    def surplus_nm(i_a: float) -> float:
        k_phi = float(motor.k_phi(i_a))
        speed = (v_eff_v - r_ohm * i_a) / k_phi if k_phi > 0.0 else np.inf
        return float(torque_nm(k_phi, i_a)) - float(load.at(speed))

    if surplus_nm(i_top) <= 0.0:
        return np.inf
    if surplus_nm(0.0) >= 0.0:
        return 0.0
    return brentq(surplus_nm, 0.0, i_top, xtol=1e-10, rtol=1e-13)


def _check_stalls(motor, v_eff, r_notch, load, i_cut):
    """Name the first notch on which the current cannot fall to the cut-out current."""
    for k, r in enumerate(r_notch[:-1]):
        if v_eff / r <= i_cut:
            raise DesignError(
                f"notch {k + 1}: its standstill current ({quantity(v_eff / r, 'A')}) does not rise above the "
                f"cut-out current ({quantity(i_cut, 'A')}), so the current relay would never see it fall: "
                "lower the cut-out current or the resistance in circuit"
            )
        k_phi = float(motor.k_phi(i_cut))
        speed = (v_eff - r * i_cut) / k_phi
        t_motor, t_load = float(torque_nm(k_phi, i_cut)), float(load.at(speed))
        if t_motor <= t_load:
            raise DesignError(
                f"notch {k + 1} stalls: at the cut-out current ({quantity(i_cut, 'A')}) the motor gives "
                f"{quantity(t_motor, 'N·m')}, not more than the load's {quantity(t_load, 'N·m')} at the "
                f"{quantity(speed, 'rpm')} this notch would reach, so the current settles above the cut-out "
                "value: raise the cut-out current or lighten the load"
            )


def _breakaway_current_a(motor, load, i_top):
    """Current at which the motor torque first equals the load at rest; inf if never below ``i_top``."""
    t_rest = load.at_rest_nm
    if t_rest <= 0.0:
        return 0.0
    i_top = min(i_top, motor.i_max_a)
    if float(_motor_torque_nm(motor, i_top)) <= t_rest:
        return np.inf
    if isinstance(motor, ShuntMotor):
        return t_rest / (NM_PER_V_A_PER_RPM * motor.k_phi_v_per_rpm)
    return brentq(lambda i: float(_motor_torque_nm(motor, i)) - t_rest, 0.0, i_top, xtol=1e-12, rtol=1e-14)


class _Notch:
    """State of one notch being simulated: accumulates its integrals and segments."""

    def __init__(self, index, t0, i0, n0):
        self.index, self.t, self.i, self.n = index, t0, i0, n0
        self.peak = i0
        self.charge = self.i2t = self.work = 0.0
        self.segments = []
        self.cut = False

    def add(self, duration, i1, n1, peak, charge, i2t, work, state_at):
        self.segments.append(_Segment(self.t, self.t + duration, self.index, state_at))
        self.t += duration
        self.i, self.n = i1, n1
        self.peak = max(self.peak, peak)
        self.charge += charge
        self.i2t += i2t
        self.work += work


def _held_phase(notch, v_eff, r, l_h, i_break, i_cut, t_left):
    """Shaft at rest: closed-form first-order current. Returns True if the notch ended here."""
    tau = l_h / r
    i_inf = v_eff / r
    i0 = notch.i
    deviation = i0 - i_inf
    t_break = -tau * math.log((i_break - i_inf) / deviation) if i0 < i_break < i_inf else np.inf
    cut_here = i_cut is not None and i_inf < i_cut < i0
    t_cut = -tau * math.log((i_cut - i_inf) / deviation) if cut_here else np.inf
    duration = min(t_left, t_break, t_cut)
    if not np.isfinite(duration):
        raise DesignError(
            f"notch {notch.index} stalls at standstill: the motor torque never exceeds the load at rest"
        )
    decay = math.exp(-duration / tau)
    # At breakaway the current is the breakaway current exactly, so that motion begins.
    i1 = i_break if duration == t_break else i_inf + deviation * decay
    charge = i_inf * duration + deviation * tau * (1.0 - decay)
    i2t = (
        i_inf * i_inf * duration
        + 2.0 * i_inf * deviation * tau * (1.0 - decay)
        + deviation * deviation * 0.5 * tau * (1.0 - decay * decay)
    )

    def state_at(t):
        t = np.asarray(t, dtype=float)
        return i_inf + deviation * np.exp(-t / tau), np.zeros_like(t)

    notch.add(duration, i1, 0.0, max(i0, i1), charge, i2t, 0.0, state_at)
    return duration != t_break


class _LinearShunt:
    r"""Closed-form solution of the shunt motor's linear equations on one notch.

    :math:`\dot x = A x + b`, :math:`x = (i, n)`, with constant load torque.
    """

    def __init__(self, r, k_phi, l_h, j, v_eff, t_load, x0):
        c1 = NM_PER_V_A_PER_RPM
        self.a = np.array([[-r / l_h, -k_phi / l_h], [c1 * c1 * k_phi / j, 0.0]])
        i_ss = t_load / (c1 * k_phi)
        self.x_ss = np.array([i_ss, (v_eff - r * i_ss) / k_phi])
        self.t_load = t_load
        self.d = np.asarray(x0, dtype=float) - self.x_ss
        self.s = -0.5 * r / l_h  # half the trace of A
        self.mu2 = self.s * self.s - c1 * c1 * k_phi * k_phi / (l_h * j)  # (A - sI)^2 = mu^2 I
        m = self.a - self.s * np.eye(2)
        self.md = m @ self.d
        self.ad, self.amd = self.a @ self.d, self.a @ self.md
        root = math.sqrt(abs(self.mu2))
        self.root = root
        slow = -self.s - root if self.mu2 > 0.0 else -self.s
        self.t_slow = 1.0 / slow
        self.t_fast = 1.0 / (-self.s + (root if self.mu2 > 0.0 else 0.0))

    def _weights(self, t):
        """e^{st} cosh(mu t) and e^{st} sinh(mu t)/mu (or their oscillating forms)."""
        s, root = self.s, self.root
        if isinstance(t, float):
            return self._scalar_weights(t)
        if self.mu2 > 0.0:
            slow = np.exp((s + root) * t)
            fast = np.exp((s - root) * t)
            spread = 2.0 * root * np.asarray(t, dtype=float)
            # fast * expm1(spread) = slow - fast, without cancellation where spread is small
            difference = np.where(spread < 1.0, fast * np.expm1(np.minimum(spread, 1.0)), slow - fast)
            return 0.5 * (slow + fast), difference / (2.0 * root)
        envelope = np.exp(s * t)
        if root == 0.0:
            return envelope, envelope * t
        return envelope * np.cos(root * t), envelope * np.sin(root * t) / root

    def _scalar_weights(self, t: float):
        """:meth:`_weights` for one time, with the math module (root finding calls it often)."""
        s, root = self.s, self.root
        if self.mu2 > 0.0:
            fast = math.exp((s - root) * t)
            spread = 2.0 * root * t
            difference = fast * math.expm1(spread) if spread < 1.0 else math.exp((s + root) * t) - fast
            return fast + 0.5 * difference, difference / (2.0 * root)
        envelope = math.exp(s * t)
        if root == 0.0:
            return envelope, envelope * t
        return envelope * math.cos(root * t), envelope * math.sin(root * t) / root

    def state(self, t):
        """Current [A] and speed [rpm] at times ``t`` after the notch began."""
        ch, sh = self._weights(t)
        return self.x_ss[0] + ch * self.d[0] + sh * self.md[0], self.x_ss[1] + ch * self.d[1] + sh * self.md[1]

    def current(self, t):
        ch, sh = self._weights(t)
        return self.x_ss[0] + ch * self.d[0] + sh * self.md[0]

    def current_slope(self, t):
        ch, sh = self._weights(t)
        return ch * self.ad[0] + sh * self.amd[0]  # dx/dt = A e^{At} d, and A commutes with e^{At}

    def speed(self, t):
        ch, sh = self._weights(t)
        return self.x_ss[1] + ch * self.d[1] + sh * self.md[1]

    def integrals(self, duration):
        r"""Exact :math:`\int i`, :math:`\int i^2` and :math:`\int n` over ``[0, duration]``."""
        ch, sh = self._weights(duration)
        phi = ch * np.eye(2) + sh * (self.a - self.s * np.eye(2))  # e^{A T}
        x_int = self.x_ss * duration + np.linalg.solve(self.a, (phi - np.eye(2)) @ self.d)
        # W = int e^{A't} e1 e1' e^{At} dt solves A'W + WA = Phi' e1 e1' Phi - e1 e1' [3];
        # W is symmetric, so three unknowns (w11, w12, w22).
        (a, b), (c, d) = self.a
        lyapunov = np.array([[2.0 * a, 2.0 * c, 0.0], [b, a + d, c], [0.0, 2.0 * b, 2.0 * d]])
        q = np.array([phi[0, 0] ** 2 - 1.0, phi[0, 0] * phi[0, 1], phi[0, 1] ** 2])
        w11, w12, w22 = np.linalg.solve(lyapunov, q)
        g_int = x_int[0] - self.x_ss[0] * duration
        quadratic = w11 * self.d[0] ** 2 + 2.0 * w12 * self.d[0] * self.d[1] + w22 * self.d[1] ** 2
        i2t = self.x_ss[0] ** 2 * duration + 2.0 * self.x_ss[0] * g_int + quadratic
        return float(x_int[0]), float(i2t), float(x_int[1])

    def grid(self, horizon):
        """Times from 0 to ``horizon``, spaced geometrically from a thousandth of the fast time constant."""
        first = min(self.t_fast, horizon) * 1e-3
        return np.concatenate(([0.0], first * np.exp(_GRID_STEPS * math.log(horizon / first))))

    def peak(self, times, currents):
        """Time [s] and value [A] of the highest current on the sampled stretch, refined at the zero of di/dt."""
        k = int(np.argmax(currents))
        if 0 < k < times.size - 1:
            a, b = times[k - 1], times[k + 1]
            if self.current_slope(a) > 0.0 > self.current_slope(b):
                t_peak = brentq(self.current_slope, a, b, xtol=1e-15, rtol=1e-13)
                return t_peak, max(float(self.current(t_peak)), float(currents[k]))
        return float(times[k]), float(currents[k])


def _linear_running_phase(notch, lin, i_cut, t_left, final_speed=None):
    """Advance a notch on the closed form; returns (ended, ok). ``ok`` False asks for the integrator."""
    horizon = min(t_left, TIME_CAP_FACTOR * lin.t_slow)
    times = lin.grid(horizon)
    currents, speeds = lin.state(times)
    if final_speed is not None:
        # The run after the last cut: until the current has peaked and the speed has settled.
        settled = np.nonzero(speeds >= SETTLED_FRACTION * final_speed)[0]
        if settled.size == 0:
            return False, False
        j = int(settled[0])
        target = SETTLED_FRACTION * final_speed
        duration = 0.0 if j == 0 else brentq(lambda t: lin.speed(t) - target, times[j - 1], times[j], xtol=1e-15, rtol=1e-13)
        duration = max(duration, lin.peak(times, currents)[0])
        ended = True
    elif i_cut is not None:
        above = currents > i_cut
        falls = np.nonzero(above[:-1] & ~above[1:])[0]
        if falls.size == 0:
            return False, False
        j = int(falls[0])
        duration = brentq(lambda t: lin.current(t) - i_cut, times[j], times[j + 1], xtol=1e-15, rtol=1e-13)
        ended = True
    else:
        duration = t_left
        ended = True
        if horizon < t_left:
            times = lin.grid(t_left)
            currents, speeds = lin.state(times)
    keep = times <= duration
    if np.any(speeds[keep] < -1e-9 * abs(lin.x_ss[1])):
        return False, False  # the shaft would come to rest: the integrator handles the return
    i1, n1 = (float(v) for v in lin.state(duration))
    charge, i2t, n_int = lin.integrals(duration)
    peak = lin.peak(np.append(times[keep], duration), np.append(currents[keep], i1))[1]
    notch.add(duration, i1, n1, peak, charge, i2t, lin.t_load * RAD_S_PER_RPM * n_int, lin.state)
    return ended, True


def _integrated_running_phase(notch, motor, v_eff, r, l_h, j, load, i_cut, t_left, t_cap, rtol, final_speed=None):
    """Advance a notch with solve_ivp until a cut, a return to rest, or the end of its time.

    Returns (ended, at_rest).
    """
    c1 = NM_PER_V_A_PER_RPM
    k_phi = motor.k_phi

    def rhs(t, y):
        i, n = y[0], y[1]
        flux = float(k_phi(i))
        t_load = float(load.at(n))
        return [(v_eff - r * i - flux * n) / l_h, c1 * (c1 * flux * i - t_load) / j, i, i * i, t_load * n * RAD_S_PER_RPM]

    def jacobian(t, y):
        # Given, because the quadrature rows never feed back and scipy's difference Jacobian
        # then grows its step without bound. Slopes of flux and load by backward differences.
        i, n = y[0], y[1]
        flux = float(k_phi(i))
        step_i, step_n = 1e-6 * max(abs(i), 1.0), 1e-6 * max(abs(n), 1.0)
        dflux = (flux - float(k_phi(max(i - step_i, 0.0)))) / (i - max(i - step_i, 0.0)) if i > 0.0 else 0.0
        t_load = float(load.at(n))
        dload = (t_load - float(load.at(n - step_n))) / step_n
        jac = np.zeros((5, 5))
        jac[0, 0], jac[0, 1] = -(r + dflux * n) / l_h, -flux / l_h
        jac[1, 0], jac[1, 1] = c1 * c1 * (flux + dflux * i) / j, -c1 * dload / j
        jac[2, 0], jac[3, 0] = 1.0, 2.0 * i
        jac[4, 1] = RAD_S_PER_RPM * (t_load + n * dload)
        return jac

    def to_rest(t, y):
        return y[1]

    to_rest.terminal, to_rest.direction = True, -1.0

    def current_peak(t, y):
        return rhs(t, y)[0]

    current_peak.direction = -1.0
    events = [to_rest, current_peak]
    if final_speed is not None:
        def settled_after_peak(t, y):
            # Positive once the speed has settled and the current is falling: the start is over.
            return min(y[1] - SETTLED_FRACTION * final_speed, -rhs(t, y)[0])

        settled_after_peak.terminal, settled_after_peak.direction = True, 1.0
        events.append(settled_after_peak)
    elif i_cut is not None:
        def falls_to_cut(t, y):
            return y[0] - i_cut

        falls_to_cut.terminal, falls_to_cut.direction = True, -1.0
        events.append(falls_to_cut)
    span = t_left if np.isfinite(t_left) else t_cap
    i_scale = max(abs(notch.i), v_eff / r * 1e-3)
    scale = np.array([i_scale, max(abs(notch.n), 1.0), i_scale * span, i_scale * i_scale * span, 1.0])
    solution = solve_ivp(
        rhs, (0.0, span), [notch.i, notch.n, 0.0, 0.0, 0.0], method="Radau", rtol=rtol,
        atol=rtol * 1e-3 * scale, events=events, dense_output=True, jac=jacobian,
    )
    if solution.status < 0:
        raise DesignError(f"notch {notch.index}: the integrator failed ({solution.message})")
    y1 = solution.y[:, -1]
    duration = float(solution.t[-1])
    peaks = [notch.i, y1[0], *solution.y_events[1][:, 0]] if solution.y_events[1].size else [notch.i, y1[0]]
    dense = solution.sol

    def state_at(t):
        y = dense(np.clip(t, 0.0, duration))
        return y[0], y[1]

    at_rest = solution.status == 1 and solution.t_events[0].size > 0
    notch.add(duration, float(y1[0]), 0.0 if at_rest else float(y1[1]), max(peaks), float(y1[2]), float(y1[3]), float(y1[4]), state_at)
    if at_rest:
        return False, True
    if solution.status == 1 or np.isfinite(t_left):
        return True, False
    raise DesignError(
        f"notch {notch.index}: the current did not fall to the cut-out value within "
        f"{quantity(t_cap, 's')} (the time cap): the notch is as good as stalled"
    )


def simulate_start(
    motor,
    v_supply_v: float,
    sections_ohm,
    l_circuit_h: float,
    inertia_kgm2: float,
    load,
    i_cut_a: float | None = None,
    dwell_s=None,
    brush_drop_v: float = 0.0,
    method: str = "auto",
    rtol: float = 1e-7,
) -> StartResult:
    r"""Simulate a resistor start in time, notch by notch.

    Parameters
    ----------
    motor : ShuntMotor, SeriesMotor or CompoundMotor
        The machine; series and compound motors need a magnetization curve
        with its speed.
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
        (speed [rpm], torque [N·m]).
    i_cut_a : float, optional
        Cut-out current of current-limit switching. [A]
    dwell_s : array_like, optional
        Dwell of each notch for definite-time switching, one per section. [s]
    brush_drop_v : float, optional
        Total brush drop. [V]
    method : {"auto", "integrate"}
        "auto" uses the closed form where it applies (shunt motor, constant
        load) and the integrator elsewhere; "integrate" always integrates
        (a second method, for checks).
    rtol : float
        Relative tolerance of the integrator. [-]

    Returns
    -------
    StartResult

    Notes
    -----
    .. math:: L\frac{di}{dt} = V - V_b - R_k i - k\Phi(i) n,\quad J\frac{d\omega}{dt} = T(i) - T_L(n)

    References
    ----------
    See the module docstring.
    """
    v_eff = effective_supply_v(v_supply_v, brush_drop_v)
    sections = checked_sections(sections_ohm)
    l_h = require_positive("l_circuit", l_circuit_h, "H")
    j = require_positive("inertia", inertia_kgm2, "kg·m²")
    r_motor = require_positive("r_motor", motor.r_ohm, "ohm")
    curve = getattr(motor, "curve", None)
    if not isinstance(motor, ShuntMotor) and (curve is None or curve.speed_rpm is None):
        raise InputError("mag_curve and mag_speed are needed to simulate a series or compound motor")
    if isinstance(motor, ShuntMotor):
        require_positive("k_phi", motor.k_phi_v_per_rpm, "V/rpm")
    load = load if isinstance(load, LoadTorque) else load_torque(load)
    if (i_cut_a is None) == (dwell_s is None):
        raise InputError("give either a cut-out current (current-limit) or dwell times (definite-time), not both")
    if i_cut_a is not None:
        i_cut = require_positive("cut-out current", i_cut_a, "A")
        dwells = np.full(sections.size, np.inf)
    else:
        i_cut = None
        dwells = as_float_array("dwell", dwell_s, "s")
        if dwells.size != sections.size:
            raise InputError(f"dwell has {dwells.size} entries but sections has {sections.size}: one dwell per section")
        if np.any(dwells <= 0.0):
            k = int(np.argmax(dwells <= 0.0))
            raise InputError(f"dwell entry {k + 1} ({quantity(dwells[k], 's')}) must be above zero")
    method = choose("method", method, ("auto", "integrate"))
    rtol = require_positive("rtol", rtol)

    r_notch = notch_resistances_ohm(r_motor, sections)
    i_final = settling_current_a(motor, v_eff, r_motor, load)
    if not np.isfinite(i_final):
        i_stall = min(v_eff / r_motor, motor.i_max_a)
        raise DesignError(
            f"the load is above the motor's capability: even on its own resistance the motor gives only "
            f"{quantity(float(_motor_torque_nm(motor, i_stall)), 'N·m')} at standstill, not more than the load's "
            f"{quantity(load.at_rest_nm, 'N·m')}"
        )
    k_phi_final = float(motor.k_phi(i_final))
    if k_phi_final <= 0.0 or (i_final == 0.0 and isinstance(motor, SeriesMotor)):
        raise DesignError(
            "the load torque vanishes at speed, so the motor has no steady speed: a series motor runs away "
            "unloaded; give the load torque the motor must always carry"
        )
    n_final = (v_eff - r_motor * i_final) / k_phi_final
    if i_cut is not None:
        _check_stalls(motor, v_eff, r_notch, load, i_cut)
    closed = method == "auto" and isinstance(motor, ShuntMotor) and load.constant
    k_mech = float(motor.k_phi(i_final if i_cut is None else i_cut))
    t_mech = r_notch[0] * j / (NM_PER_V_A_PER_RPM**2 * k_mech**2)  # mechanical time constant of notch 1
    t_cap = TIME_CAP_FACTOR * (t_mech + l_h / r_motor)

    notches = []
    t, i, n = 0.0, 0.0, 0.0
    for k, r in enumerate(r_notch):
        last = k == sections.size
        notch = _Notch(k + 1, t, i, n)
        i_break = _breakaway_current_a(motor, load, v_eff / r)
        t_left = np.inf if last else dwells[k]
        for _ in range(MAX_PHASES_PER_NOTCH):
            remaining = t_left - (notch.t - t)
            if notch.n <= 0.0 and notch.i < i_break:
                if _held_phase(notch, v_eff, r, l_h, i_break, None if last else i_cut, remaining):
                    break
                continue
            ok = False
            if closed:
                lin = _LinearShunt(r, motor.k_phi_v_per_rpm, l_h, j, v_eff, load.at_rest_nm, (notch.i, notch.n))
                ended, ok = _linear_running_phase(notch, lin, None if last else i_cut, remaining, n_final if last else None)
                if ok and ended:
                    break
            if not ok:
                ended, at_rest = _integrated_running_phase(
                    notch, motor, v_eff, r, l_h, j, load, None if last else i_cut, remaining,
                    t_cap, rtol, n_final if last else None,
                )
                if ended:
                    break
        else:
            raise DesignError(f"notch {k + 1}: the shaft keeps stopping and starting; check the load at rest")
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
        n_final_rpm=float(n_final),
        i_final_a=float(i_final),
        segments=tuple(s for x in notches for s in x.segments),
    )


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
    """

    t_s: np.ndarray
    i_a: np.ndarray
    n_rpm: np.ndarray
    torque_nm: np.ndarray
    notch: np.ndarray


def start_history(result: StartResult, motor, points: int = 200, t_end_s: float | None = None) -> History:
    """Current, speed and torque of a simulated start at evenly spaced times.

    Parameters
    ----------
    result : StartResult
        From :func:`simulate_start`.
    motor : ShuntMotor, SeriesMotor or CompoundMotor
        The same machine, for the torque.
    points : int
        Number of times, 2 to 100000. [-]
    t_end_s : float, optional
        Last time; by default the end of the start. [s]

    Returns
    -------
    History
        Where a cut falls between samples, the sample shows the state of the
        notch in circuit at that time.
    """
    count = require_count("points", points, 2, 100_000)
    t_end = result.t_end_s if t_end_s is None else require_positive("t_end", t_end_s, "s")
    t_end = min(t_end, result.t_end_s)
    times = np.linspace(0.0, t_end, count)
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
    return History(times, current, speed, np.asarray(_motor_torque_nm(motor, np.clip(current, 0.0, None)), dtype=float), notch)
