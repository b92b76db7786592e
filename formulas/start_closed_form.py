r"""Closed forms of the start in time: the shaft held at rest, and a shunt motor against a constant load.

At rest the back-EMF is zero, so the current is the first-order lag
:math:`i = I_\infty + (i_0 - I_\infty)e^{-tR/L}`, :math:`I_\infty = V'/R`,
for every DC machine; the instant of breakaway follows in closed form.

A shunt motor with a constant load obeys linear equations with constant
coefficients between cuts, :math:`\dot x = A x + b`, whose solution
:math:`x(t) = x_\infty + e^{At}(x_0 - x_\infty)` is used in closed form (the
2 x 2 matrix exponential, [1]_); the cut-out instant is found by Brent's
method on it, and the integrals of :math:`i`, :math:`i^2` and :math:`n` that
give the energies are exact (a Lyapunov equation for :math:`\int i^2\,dt`, [2]_).

References
----------
.. [1] C. Moler and C. Van Loan, "Nineteen dubious ways to compute the
   exponential of a matrix, twenty-five years later," *SIAM Review*, vol. 45,
   no. 1, pp. 3-49, 2003, sec. 2 (closed forms for small matrices).
.. [2] C. F. Van Loan, "Computing integrals involving the matrix exponential,"
   *IEEE Trans. Automatic Control*, vol. 23, no. 3, pp. 395-404, 1978.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import brentq

from .machines import NM_PER_V_A_PER_RPM, RAD_S_PER_RPM
from .start_notch import SETTLED_FRACTION, TIME_CAP_FACTOR

__all__ = ["held_phase", "LinearShunt", "linear_running_phase"]

#: Exponents of the geometric sampling grid on which cut-out instants and peaks are bracketed.
_GRID_STEPS = np.linspace(0.0, 1.0, 240)


def held_phase(notch, v_eff, r, l_h, i_break, i_cut, t_left):
    r"""Shaft at rest: closed-form first-order current. Returns True if the notch ended here.

    Parameters
    ----------
    notch : NotchRecord
        The notch at its present state (:mod:`notchwise.formulas.start_notch`);
        the stretch at rest is added to it. [-]
    v_eff : float
        Supply less brush drop. [V]
    r : float
        Whole circuit resistance on the notch, machine included. [ohm]
    l_h : float
        Inductance of the circuit. [H]
    i_break : float
        Breakaway current, at which the motor torque first exceeds the load at
        rest; ``inf`` where it never does. [A]
    i_cut : float or None
        Switching current; None on definite time and on the run. [A]
    t_left : float
        Time left on a definite-time notch; ``inf`` otherwise. [s]

    Returns
    -------
    bool
        True when the notch ended at rest (cut or dwell over); False at
        breakaway, where motion begins. [-]

    Notes
    -----
    .. math:: i(t) = I_\infty + (i_0 - I_\infty)e^{-tR/L}, \qquad I_\infty = V'/R
    """
    tau = l_h / r
    i_inf = v_eff / r
    i0 = notch.i
    deviation = i0 - i_inf
    t_break = -tau * math.log((i_break - i_inf) / deviation) if i0 < i_break < i_inf else np.inf
    cut_here = i_cut is not None and i_inf < i_cut < i0
    t_cut = -tau * math.log((i_cut - i_inf) / deviation) if cut_here else np.inf
    duration = min(t_left, t_break, t_cut)
    if not np.isfinite(duration):
        raise notch.incomplete("stalls", "stalls at standstill: the motor torque never exceeds the load at rest")
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


class LinearShunt:
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


def linear_running_phase(notch, lin, i_cut, t_left, final_speed=None):
    r"""Advance a notch to its end on the closed form; False (nothing added) asks for the integrator.

    Parameters
    ----------
    notch : NotchRecord
        The notch at its present state (:mod:`notchwise.formulas.start_notch`);
        the stretch is added to it. [-]
    lin : LinearShunt
        The closed form of the notch, from its present state. [-]
    i_cut : float or None
        Switching current; None on definite time and on the run. [A]
    t_left : float
        Time left on a definite-time notch; ``inf`` otherwise. [s]
    final_speed : float, optional
        On the run after the last cut: the steady speed it settles towards. [rpm]

    Returns
    -------
    bool
        True when the notch ended on the closed form; False where the shaft
        would come back to rest or the end is not reached, and the integrator
        takes over. [-]

    Notes
    -----
    .. math:: x(t) = x_\infty + e^{At}(x_0 - x_\infty), \qquad x = (i, n)

    References
    ----------
    See the module docstring.
    """
    horizon = min(t_left, TIME_CAP_FACTOR * lin.t_slow)
    times = lin.grid(horizon)
    currents, speeds = lin.state(times)
    if final_speed is not None:
        # The run after the last cut: until the current has peaked and the speed has settled.
        settled = np.nonzero(speeds >= SETTLED_FRACTION * final_speed)[0]
        if settled.size == 0:
            return False
        j = int(settled[0])
        target = SETTLED_FRACTION * final_speed
        duration = 0.0 if j == 0 else brentq(lambda t: lin.speed(t) - target, times[j - 1], times[j], xtol=1e-15, rtol=1e-13)
        duration = max(duration, lin.peak(times, currents)[0])
    elif i_cut is not None:
        above = currents > i_cut
        falls = np.nonzero(above[:-1] & ~above[1:])[0]
        if falls.size == 0:
            return False
        j = int(falls[0])
        duration = brentq(lambda t: lin.current(t) - i_cut, times[j], times[j + 1], xtol=1e-15, rtol=1e-13)
    else:
        duration = t_left
        if horizon < t_left:
            times = lin.grid(t_left)
            currents, speeds = lin.state(times)
    keep = times <= duration
    if np.any(speeds[keep] < -1e-9 * abs(lin.x_ss[1])):
        return False  # the shaft would come to rest: the integrator handles the return
    i1, n1 = (float(v) for v in lin.state(duration))
    charge, i2t, n_int = lin.integrals(duration)
    peak = lin.peak(np.append(times[keep], duration), np.append(currents[keep], i1))[1]
    notch.add(duration, i1, n1, peak, charge, i2t, lin.t_load * RAD_S_PER_RPM * n_int, lin.state)
    return True
