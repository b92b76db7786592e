r"""One notch of a DC motor start, integrated fast: a Rosenbrock method on plain floats.

The armature circuit and the shaft on one notch obey [1]_

.. math::

    L\,\frac{di}{dt} = V' - R\,i - k\Phi(i)\,n, \qquad
    \frac{dn}{dt} = \frac{60}{2\pi}\,\frac{T(i) - T_L(n)}{J}, \qquad
    T(i) = \frac{60}{2\pi}\,k\Phi(i)\,i

(:math:`V'` the supply less the brush drop, :math:`n` in rpm). The system has
two states and is mildly stiff (the electrical time constant is tens of
milliseconds against seconds for the shaft), so it is integrated with RODAS3,
the four-stage, third-order, stiffly accurate and L-stable Rosenbrock method of
Sandu et al. [2]_ (its embedded second-order solution gives the error
estimate), in the form of Hairer and Wanner [3]_ (sec. IV.7, Eq. 7.4'), with
the exact 2 x 2 Jacobian. The linear system of each stage, with the matrix
:math:`I/(h\gamma) - J`, is solved by its closed-form inverse; everything in
the step loop is a Python float (tiny numpy arrays cost ten times as much).

The flux characteristic is a piecewise cubic, the shape-preserving
interpolant of the magnetization curve (:class:`FluxCurve`, built once from the
breakpoints and coefficients of ``scipy.interpolate.PchipInterpolator``), and
is evaluated with its derivative by bisection and Horner's rule.

Between accepted steps the solution is the cubic Hermite interpolant of the
end states and slopes [3]_ (sec. II.6, dense output); events (the current
falling to the cut-out value, a peak of current, the shaft coming to rest, the
speed settling) are located on it, and the integrals :math:`\int i\,dt`,
:math:`\int i^2\,dt` and the load work :math:`\int T_L\,\omega\,dt` are
accumulated from it step by step (exactly for :math:`i` and :math:`i^2`, the
load work by three-point Gauss-Legendre quadrature [4]_ where the load depends
on speed).

References
----------
.. [1] A. E. Fitzgerald, C. Kingsley Jr., S. D. Umans, *Electric Machinery*,
   6th ed., McGraw-Hill, 2003, sec. 7.9, Eqs. 7.37-7.40.
.. [2] A. Sandu, J. G. Verwer, J. G. Blom, E. J. Spee, G. R. Carmichael,
   F. A. Potra, "Benchmarking stiff ODE solvers for atmospheric chemistry
   problems II: Rosenbrock solvers," *Atmospheric Environment*, vol. 31,
   no. 20, pp. 3459-3472, 1997 (method RODAS3: gamma = 1/2; coefficients
   a31 = a41 = 2, a43 = 1, c21 = 4, c31 = c41 = 1, c32 = c42 = -1,
   c43 = -8/3, m = (2, 0, 1, 1), error weights e = (0, 0, 0, 1)).
.. [3] E. Hairer and G. Wanner, *Solving Ordinary Differential Equations II:
   Stiff and Differential-Algebraic Problems*, 2nd ed., Springer, 1996,
   sec. IV.7 (Rosenbrock methods, Eq. 7.4' and the step-size control of
   sec. IV.8); E. Hairer, S. P. Norsett and G. Wanner, *Solving Ordinary
   Differential Equations I*, 2nd ed., Springer, 1993, sec. II.6 (Hermite
   dense output).
.. [4] M. Abramowitz and I. A. Stegun, *Handbook of Mathematical Functions*,
   Dover, 1965, Eq. 25.4.29 and Table 25.4 (Gauss-Legendre nodes and weights).
"""

from __future__ import annotations

import math
from bisect import bisect_right
from dataclasses import dataclass, field

import numpy as np
from scipy.interpolate import PchipInterpolator

from .machines import NM_PER_V_A_PER_RPM, RAD_S_PER_RPM
from .errors import InputError, as_float_array, quantity, require_count, require_non_negative, require_positive

__all__ = [
    "FluxCurve",
    "flux_curve",
    "constant_flux",
    "motor_flux",
    "LoadTable",
    "load_table",
    "NotchRun",
    "integrate_notch",
    "cubic_pieces",
    "cubic_evaluator",
    "rosenbrock_step",
    "checked_rtol",
    "STATUSES",
]

#: Why an integration stopped: the normal ends, then the ends a caller must report.
STATUSES = ("cut", "settled", "rest", "time", "step cap", "curve end")
_C1 = NM_PER_V_A_PER_RPM
#: Three-point Gauss-Legendre nodes on [0, 1] and weights (Eq. 25.4.29 of [4]).
_GAUSS = ((0.5 - math.sqrt(15.0) / 10.0, 5.0 / 18.0), (0.5, 8.0 / 18.0), (0.5 + math.sqrt(15.0) / 10.0, 5.0 / 18.0))
#: Step-size controller: safety factor and the bounds of one change (sec. IV.8 of [3]).
_SAFETY, _GROW, _SHRINK = 0.9, 5.0, 0.2
#: Least swing of the current the error is weighed against, as a fraction of the starting current (chosen by
#: measurement against LSODA at rtol 1e-10 in tests/test_notch_integrator.py). [-]
_SWING_FLOOR = 0.01


@dataclass(frozen=True)
class FluxCurve:
    r"""Back-EMF per rpm against armature current as a piecewise cubic.

    :math:`k\Phi(i) = P(x_0 + g\,i)`, with :math:`P` a cubic on each interval
    of ``breaks`` and :math:`x_0 + g i` the field excitation. Below zero
    excitation the flux is held at its value there; above the last break the
    last cubic is continued for the solver's trial stages only, and an
    accepted state beyond it ends the integration (status "curve end").

    Attributes
    ----------
    breaks : tuple of float
        Excitations bounding the intervals, strictly rising. [A]
    coefficients : tuple of tuple
        Per interval, the four power-basis coefficients of :math:`P` in
        the excitation measured from the interval's start, highest power
        first, already divided by the curve's speed. [V/rpm/A^k]
    offset_a : float
        Excitation at zero armature current (shunt ampere-turns of a compound
        motor; zero for a series motor). [A]
    gain : float
        Excitation per ampere of armature current (series turns; 1 for a
        series motor). [-]
    """

    breaks: tuple
    coefficients: tuple
    offset_a: float = 0.0
    gain: float = 1.0
    _evaluate: object = field(init=False, repr=False, compare=False)

    def __post_init__(self):
        object.__setattr__(self, "_evaluate", _flux_evaluator(self.breaks, self.coefficients, self.offset_a, self.gain))

    @property
    def i_max_a(self) -> float:
        """Highest armature current the curve covers; inf for a constant flux. [A]"""
        if self.gain == 0.0:
            return math.inf
        return (self.breaks[-1] - self.offset_a) / self.gain

    def k_phi(self, i_a: float) -> float:
        """Back-EMF per rpm at armature current ``i_a``. [V/rpm]"""
        return self._evaluate(float(i_a))[0]

    @property
    def k_phi_and_slope(self):
        """The function ``i [A] -> (kΦ [V/rpm], dkΦ/di [V/(rpm·A)])`` at one float current, for integrators."""
        return self._evaluate


def flux_curve(excitation, emf_v, speed_rpm: float, offset_a: float = 0.0, gain: float = 1.0) -> FluxCurve:
    r"""A :class:`FluxCurve` from a magnetization table, by its PCHIP interpolant.

    Parameters
    ----------
    excitation : array_like
        Field excitation of the table, strictly rising from 0. [A]
    emf_v : array_like
        Open-circuit EMF at each excitation, not falling. [V]
    speed_rpm : float
        Speed at which the table was measured. [rpm]
    offset_a : float, optional
        Excitation at zero armature current (shunt ampere-turns per pole). [A]
    gain : float, optional
        Excitation per ampere of armature current (series turns per pole). [-]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = E_{mag}(x_0 + g\,i) / n_{mag}

    The interpolant is that of Fritsch and Carlson (``PchipInterpolator``),
    the one :class:`notchwise.formulas.dc_motor.MagnetizationCurve` uses.
    """
    x = as_float_array("excitation", excitation, "A", min_length=2)
    e = as_float_array("emf", emf_v, "V", min_length=2)
    if x.size != e.size:
        raise InputError(f"excitation has {x.size} values but emf has {e.size}")
    if np.any(np.diff(x) <= 0.0):
        raise InputError("excitation must rise strictly")
    speed = require_positive("speed", speed_rpm, "rpm")
    offset = require_non_negative("offset", offset_a, "A")
    turns = require_positive("gain", gain)
    return _pieces(PchipInterpolator(x, e), speed, offset, turns)


def _pieces(pchip, speed_rpm, offset_a, gain):
    """The :class:`FluxCurve` of a piecewise cubic in scipy's form (``.x`` breaks, ``.c`` coefficients)."""
    return _scaled(cubic_pieces(pchip), speed_rpm, offset_a, gain)


def _scaled(pieces, speed_rpm, offset_a, gain):
    """The :class:`FluxCurve` of EMF pieces ``(breaks, rows)`` measured at ``speed_rpm``."""
    breaks, rows = pieces
    return FluxCurve(breaks, tuple(tuple(c / speed_rpm for c in row) for row in rows), float(offset_a), float(gain))


def cubic_pieces(pchip):
    """Breaks and per-interval power-basis rows (highest power first) of a scipy piecewise cubic, as tuples.

    Parameters
    ----------
    pchip : scipy.interpolate.PPoly or PchipInterpolator
        A piecewise cubic (``.x`` breaks, ``.c`` coefficients of shape (4, m)). [-]

    Returns
    -------
    tuple
        ``(breaks, rows)``: the breaks [x units] and, per interval, ``(c3, c2, c1, c0)`` in the variable
        measured from the interval's start. [-]

    Notes
    -----
    .. math:: P(x) = c_3 u^3 + c_2 u^2 + c_1 u + c_0, \\quad u = x - x_k
    """
    return tuple(pchip.x.tolist()), tuple(tuple(row) for row in pchip.c.T.tolist())


def cubic_evaluator(breaks, rows):
    """A function of one float ``x`` giving the piecewise cubic and its slope there: the one fast scalar evaluation.

    Held at its first value (slope 0) at and below the first break; bisection for the interval (the last
    continued above the last break) and Horner's rule; the magnetization curve's scalar values (:class:`~notchwise.formulas.dc_motor.MagnetizationCurve`),
    the integrator's flux and the braking stop all use it.

    Parameters
    ----------
    breaks : sequence of float
        Breaks, strictly rising. [x units]
    rows : sequence of tuple
        Per interval ``(c3, c2, c1, c0)`` as from :func:`cubic_pieces`. [-]

    Returns
    -------
    callable
        ``x -> (P(x), P'(x))``. [-]

    Notes
    -----
    .. math:: P'(x) = (3 c_3 u + 2 c_2) u + c_1
    """
    last = len(rows) - 1
    first, held = breaks[0], rows[0][3]

    def value_and_slope(x):
        if x <= first:  # held at its first value below the first break
            return held, 0.0
        k = bisect_right(breaks, x) - 1
        if k > last:
            k = last
        c3, c2, c1, c0 = rows[k]
        u = x - breaks[k]
        return ((c3 * u + c2) * u + c1) * u + c0, (3.0 * c3 * u + 2.0 * c2) * u + c1

    return value_and_slope


def constant_flux(k_phi_v_per_rpm: float) -> FluxCurve:
    r"""A :class:`FluxCurve` of constant value: a shunt or separately excited motor.

    Parameters
    ----------
    k_phi_v_per_rpm : float
        Back-EMF per rpm at the working field, above zero. [V/rpm]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = k\Phi_0
    """
    k_phi = require_positive("k_phi", k_phi_v_per_rpm, "V/rpm")
    return FluxCurve((0.0, math.inf), ((0.0, 0.0, 0.0, k_phi),), 0.0, 0.0)


def motor_flux(motor) -> FluxCurve:
    r"""The :class:`FluxCurve` of a motor of :mod:`notchwise.formulas.dc_motor`.

    Parameters
    ----------
    motor : ShuntMotor, SeriesMotor or CompoundMotor
        A motor with a ``k_phi_v_per_rpm`` has constant flux; otherwise its
        magnetization ``curve`` (with its speed) is used, at excitation
        ``shunt_at + series_turns * i`` where the motor has those (compound)
        and ``i`` otherwise (series). [-]

    Returns
    -------
    FluxCurve

    Notes
    -----
    .. math:: k\Phi(i) = E_{mag}(F_{sh} + N_{se} i)/n_{mag}
    """
    k_phi = getattr(motor, "k_phi_v_per_rpm", None)
    if k_phi is not None:
        return constant_flux(k_phi)
    curve = getattr(motor, "curve", None)
    if curve is None or curve.speed_rpm is None:
        raise InputError("mag_curve and mag_speed are needed to simulate a series or compound motor")
    # The curve validated its table when it was built and holds the pieces of its interpolant.
    return _scaled(curve.pieces, curve.speed_rpm, getattr(motor, "shunt_at", 0.0), getattr(motor, "series_turns", 1.0))


def _flux_evaluator(breaks, coefficients, offset_a, gain):
    """A function of the armature current giving :math:`k\\Phi` [V/rpm] and its slope [V/(rpm·A)].

    The cubic of :func:`cubic_evaluator`, its pieces carried over once from the excitation
    :math:`x = x_0 + g i` to the armature current (breaks :math:`(x_k - x_0)/g`, coefficients
    :math:`c_m g^m`), so that each evaluation is one call; below zero excitation the flux is held.
    """
    if gain == 0.0:  # constant flux
        constant = (coefficients[0][3], 0.0)
        return lambda i_a: constant
    return cubic_evaluator(tuple((x - offset_a) / gain for x in breaks),
                           tuple((c3 * gain**3, c2 * gain**2, c1 * gain, c0) for c3, c2, c1, c0 in coefficients))


@dataclass(frozen=True)
class LoadTable:
    """Load torque against speed, linear between points and held beyond the ends.

    Attributes
    ----------
    speed_rpm : tuple of float
        Speeds, strictly rising. [rpm]
    torque_nm : tuple of float
        Torque at each speed, at or above zero. [N·m]
    """

    speed_rpm: tuple
    torque_nm: tuple

    @property
    def constant(self) -> bool:
        """True when the torque does not depend on speed."""
        return all(t == self.torque_nm[0] for t in self.torque_nm)


def load_table(speed_rpm, torque_nm) -> LoadTable:
    r"""A validated :class:`LoadTable`; one point for a constant load.

    Parameters
    ----------
    speed_rpm : array_like
        Speeds, strictly rising. [rpm]
    torque_nm : array_like
        Load torque at each speed; below zero where the load drives the
        shaft (a potential load: the caller decides what holds it at rest). [N·m]

    Returns
    -------
    LoadTable

    Notes
    -----
    .. math:: T_L(n) = T_k + (T_{k+1} - T_k)\frac{n - n_k}{n_{k+1} - n_k}, \quad n_k \le n \le n_{k+1}
    """
    n = as_float_array("load speed", speed_rpm, "rpm")
    t = as_float_array("load torque", torque_nm, "N·m")
    if n.size != t.size:
        raise InputError(f"load speed has {n.size} values but load torque has {t.size}")
    if np.any(np.diff(n) <= 0.0):
        raise InputError("load speeds must rise strictly")
    return LoadTable(tuple(float(v) for v in n), tuple(float(v) for v in t))


def _load_and_slope(speeds, torques, n_rpm: float):
    """Load torque [N·m] and its slope [N·m/rpm] at ``n_rpm``, as numpy.interp holds the ends."""
    k = bisect_right(speeds, n_rpm)
    if k == 0:
        return torques[0], 0.0
    if k == len(speeds):
        return torques[-1], 0.0
    n0, n1 = speeds[k - 1], speeds[k]
    slope = (torques[k] - torques[k - 1]) / (n1 - n0)
    return torques[k - 1] + slope * (n_rpm - n0), slope


@dataclass(frozen=True)
class NotchRun:
    r"""The outcome of :func:`integrate_notch` for one running phase of a notch.

    Attributes
    ----------
    status : str
        Why it stopped, one of :data:`STATUSES`: "cut" (the current fell to
        the cut-out value after rising above it), "settled" (the speed reached
        the target with the current past its peak), "rest" (the shaft came to
        rest), "time" (``t_max_s`` reached), "step cap" (``max_steps`` steps
        taken before any of those), "curve end" (the current left the
        magnetization curve).
    message : str
        The reason in words; empty for "cut", "settled", "rest" and "time".
    duration_s : float
        Time from the start of the phase to its end. [s]
    i_end_a, n_end_rpm : float
        State at the end. [A], [rpm]
    i_peak_a, t_peak_s : float
        Highest current on the phase (the start included) and when. [A], [s]
    charge_c : float
        :math:`\int i\,dt`. [A·s]
    i2t_a2s : float
        :math:`\int i^2\,dt`. [A²·s]
    work_load_j : float
        Work done on the load, :math:`\int T_L\,\omega\,dt`. [J]
    steps, rejected : int
        Accepted and rejected steps. [-]
    knots : numpy.ndarray
        Rows (t [s], i [A], n [rpm], di/dt [A/s], dn/dt [rpm/s]) at the step
        ends, for :meth:`state_at`; empty without ``keep_history``.
    """

    status: str
    message: str
    duration_s: float
    i_end_a: float
    n_end_rpm: float
    i_peak_a: float
    t_peak_s: float
    charge_c: float
    i2t_a2s: float
    work_load_j: float
    steps: int
    rejected: int
    knots: np.ndarray

    @property
    def ok(self) -> bool:
        """True for the ends a start expects ("cut", "settled", "rest", "time")."""
        return self.status in STATUSES[:4]

    def state_at(self, t_s):
        """Current [A] and speed [rpm] at times ``t_s`` from the phase's start, by cubic Hermite interpolation."""
        t = np.clip(np.asarray(t_s, dtype=float), 0.0, self.duration_s)
        knots = self.knots
        if knots.shape[0] < 2:
            raise InputError("this run kept no history: integrate with keep_history=True")
        k = np.clip(np.searchsorted(knots[:, 0], t, side="right") - 1, 0, knots.shape[0] - 2)
        t0, h = knots[k, 0], knots[k + 1, 0] - knots[k, 0]
        s = (t - t0) / h
        h00, h10, h01, h11 = 2 * s**3 - 3 * s**2 + 1, s**3 - 2 * s**2 + s, -2 * s**3 + 3 * s**2, s**3 - s**2
        lo, hi = knots[k], knots[k + 1]
        current = h00 * lo[..., 1] + h10 * h * lo[..., 3] + h01 * hi[..., 1] + h11 * h * hi[..., 3]
        speed = h00 * lo[..., 2] + h10 * h * lo[..., 4] + h01 * hi[..., 2] + h11 * h * hi[..., 4]
        return current, speed


def _at(a, s):
    return ((a[3] * s + a[2]) * s + a[1]) * s + a[0]


def _slope(a, s):
    return (3.0 * a[3] * s + 2.0 * a[2]) * s + a[1]


def _root(f, lo, hi, f_lo, f_hi):
    """A root of ``f`` in [lo, hi] where f(lo) and f(hi) differ in sign: the Illinois false position.

    M. Dowell and P. Jarratt, "A modified regula falsi method for computing the root of an equation,"
    *BIT*, vol. 11, pp. 168-174, 1971 (from memory).
    """
    side = 0
    for _ in range(60):
        s = (lo * f_hi - hi * f_lo) / (f_hi - f_lo)
        value = f(s)
        if value == 0.0 or hi - lo < 1e-14:
            return s
        if (value > 0.0) == (f_hi > 0.0):
            hi, f_hi = s, value
            if side == -1:
                f_lo *= 0.5
            side = -1
        else:
            lo, f_lo = s, value
            if side == 1:
                f_hi *= 0.5
            side = 1
    return s


def _slope_zero(a):
    """First s in (0, 1) where the Hermite cubic ``a`` turns from rising to falling; None if it does not."""
    qa, qb, qc = 3.0 * a[3], 2.0 * a[2], a[1]  # its slope is qa s^2 + qb s + qc
    if qa == 0.0:
        return -qc / qb if qb < 0.0 and 0.0 < -qc / qb < 1.0 else None
    disc = qb * qb - 4.0 * qa * qc
    if disc < 0.0:
        return None
    q = -0.5 * (qb + math.copysign(math.sqrt(disc), qb))
    roots = sorted(x for x in (q / qa, qc / q if q != 0.0 else math.inf) if 0.0 < x < 1.0)
    for x in roots:
        if 2.0 * qa * x + qb < 0.0:
            return x
    return None


def rosenbrock_step(i, n, fi, fn, jacobian, h, slopes):
    r"""One RODAS3 step [2]_ of a 2-state system on plain floats: the new state and the error estimate.

    Parameters
    ----------
    i, n : float
        The state at the step's start (current, speed). [A], [rpm]
    fi, fn : float
        Its slopes there. [A/s], [rpm/s]
    jacobian : tuple of float
        ``(j11, j12, j21, j22)``, the exact Jacobian there. [1/s, A/(rpm·s), rpm/(A·s), 1/s]
    h : float
        The step. [s]
    slopes : callable
        ``(i, n) -> (di/dt, dn/dt)``. [A/s], [rpm/s]

    Returns
    -------
    tuple of float
        ``(i1, n1, ei, en)``: the state after the step and the estimate of its local error (the last stage,
        :math:`k_4`). [A], [rpm], [A], [rpm]

    Notes
    -----
    .. math:: (I/(h\gamma) - J)\,k_i = f\Big(y_0 + \sum_j a_{ij} k_j\Big) + \sum_j \frac{c_{ij}}{h}\,k_j,
              \qquad y_1 = y_0 + 2 k_1 + k_3 + k_4, \quad \gamma = 1/2

    References
    ----------
    See the module docstring (Sandu et al. [2]_; Hairer and Wanner [3]_, Eq. 7.4').
    """
    j11, j12, j21, j22 = jacobian
    # Stage matrix I/(h gamma) - J and its closed-form inverse (Eq. 7.4' of [3]).
    g = 2.0 / h  # 1/(h gamma), gamma = 1/2
    a11, a12, a21, a22 = g - j11, -j12, -j21, g - j22
    det = a11 * a22 - a12 * a21
    b11, b12, b21, b22 = a22 / det, -a12 / det, -a21 / det, a11 / det
    inv_h = 1.0 / h
    # RODAS3 stages [2]: k1 = G^-1 f(y0); k2 = G^-1 (f(y0) + 4 k1/h); ...
    k1i = b11 * fi + b12 * fn
    k1n = b21 * fi + b22 * fn
    ri, rn = fi + 4.0 * inv_h * k1i, fn + 4.0 * inv_h * k1n
    k2i = b11 * ri + b12 * rn
    k2n = b21 * ri + b22 * rn
    ui, un = i + 2.0 * k1i, n + 2.0 * k1n
    si, sn = slopes(ui, un)
    ri, rn = si + inv_h * (k1i - k2i), sn + inv_h * (k1n - k2n)
    k3i = b11 * ri + b12 * rn
    k3n = b21 * ri + b22 * rn
    ui, un = ui + k3i, un + k3n
    si, sn = slopes(ui, un)
    ri = si + inv_h * (k1i - k2i - (8.0 / 3.0) * k3i)
    rn = sn + inv_h * (k1n - k2n - (8.0 / 3.0) * k3n)
    k4i = b11 * ri + b12 * rn
    k4n = b21 * ri + b22 * rn
    return ui + k4i, un + k4n, k4i, k4n  # y1 = y0 + 2 k1 + k3 + k4; the error estimate is k4 [2]


def checked_rtol(rtol) -> float:
    r"""A relative tolerance for the Rosenbrock integrator, checked.

    Parameters
    ----------
    rtol : float
        Relative tolerance of the local error, from 1e-12 to 1e-2. [-]

    Returns
    -------
    float
        The tolerance. [-]

    Notes
    -----
    .. math:: 10^{-12} \le \mathrm{rtol} \le 10^{-2}
    """
    value = require_positive("rtol", rtol)
    if not 1e-12 <= value <= 1e-2:
        raise InputError(f"rtol ({value:g}) must lie from 1e-12 to 1e-2")
    return value


def integrate_notch(
    flux: FluxCurve,
    v_eff_v: float,
    r_ohm: float,
    l_h: float,
    inertia_kgm2: float,
    load: LoadTable,
    i0_a: float,
    n0_rpm: float,
    *,
    t_max_s: float,
    i_cut_a: float | None = None,
    n_settle_rpm: float | None = None,
    rtol: float = 5e-5,
    max_steps: int = 20_000,
    keep_history: bool = True,
) -> NotchRun:
    r"""Integrate one running phase of a notch until a cut, rest, settling or a time limit.

    Parameters
    ----------
    flux : FluxCurve
        Back-EMF per rpm against armature current. [V/rpm]
    v_eff_v : float
        Supply voltage less the brush drop, above zero. [V]
    r_ohm : float
        Whole circuit resistance on this notch, above zero. [ohm]
    l_h : float
        Inductance of the armature circuit, above zero. [H]
    inertia_kgm2 : float
        Inertia referred to the motor shaft, above zero. [kg·m²]
    load : LoadTable
        Load torque against speed. [N·m]
    i0_a, n0_rpm : float
        Current and speed at the start; the speed above zero or the current
        able to break away (standstill is the caller's: there the current is a
        first-order lag in closed form). [A], [rpm]
    i_cut_a : float, optional
        Switching current: stop where the current falls to it from above. [A]
    n_settle_rpm : float, optional
        Stop at the first instant the speed is at or above this with the
        current falling (the run after the last cut). [rpm]
    t_max_s : float
        Longest duration, finite (a definite-time dwell or a time cap). [s]
    rtol : float, optional
        Relative tolerance of the local error, 1e-12 to 1e-2. [-]
    max_steps : int, optional
        Most accepted steps, 1 to 10,000,000; reaching it ends the run with
        status "step cap". [-]
    keep_history : bool, optional
        Keep the step ends for :meth:`NotchRun.state_at`. [-]

    Returns
    -------
    NotchRun

    Notes
    -----
    .. math::

        (I/(h\gamma) - J)\,k_i = f\Big(y_0 + \sum_j a_{ij} k_j\Big) + \sum_j \frac{c_{ij}}{h}\,k_j,
        \qquad y_1 = y_0 + \sum_j m_j k_j

    References
    ----------
    See the module docstring.
    """
    v = require_positive("v_eff", v_eff_v, "V")
    r = require_positive("r", r_ohm, "ohm")
    l_h = require_positive("l", l_h, "H")
    j = require_positive("inertia", inertia_kgm2, "kg·m²")
    i = require_non_negative("i0", i0_a, "A")
    n = require_non_negative("n0", n0_rpm, "rpm")
    t_max = require_positive("t_max", t_max_s, "s")
    rtol = checked_rtol(rtol)
    max_steps = require_count("max_steps", max_steps, 1, 10_000_000)
    i_cut = None if i_cut_a is None else require_positive("i_cut", i_cut_a, "A")
    n_settle = None if n_settle_rpm is None else require_positive("n_settle", n_settle_rpm, "rpm")
    if not isinstance(flux, FluxCurve):
        raise InputError("flux must be a FluxCurve (flux_curve, constant_flux or motor_flux)")
    if not isinstance(load, LoadTable):
        raise InputError("load must be a LoadTable (load_table)")

    speeds, torques = load.speed_rpm, load.torque_nm
    constant_load = len(speeds) == 1 or load.constant
    t_const = torques[0]
    i_max = flux.i_max_a
    inv_l, c_j = 1.0 / l_h, _C1 / j
    flux_and_slope = flux._evaluate
    kphi_top = flux_and_slope(min(v / r, i_max))[0]
    i_floor = 1e-3 * v / r  # absolute parts of the error scale: a thousandth of the standstill current
    n_floor = 1e-3 * v / kphi_top if kphi_top > 0.0 else 1.0  # and of a speed below any running speed

    def derivatives(i, n):
        """Slopes di/dt [A/s], dn/dt [rpm/s] and the Jacobian entries at (i, n)."""
        phi, dphi = flux_and_slope(i)
        if constant_load:
            tl, dtl = t_const, 0.0
        else:
            tl, dtl = _load_and_slope(speeds, torques, n)
        return ((v - r * i - phi * n) * inv_l, c_j * (_C1 * phi * i - tl),
                -(r + dphi * n) * inv_l, -phi * inv_l, c_j * _C1 * (phi + dphi * i), -c_j * dtl)

    def slopes(i, n):
        phi = flux_and_slope(i)[0]
        tl = t_const if constant_load else _load_and_slope(speeds, torques, n)[0]
        return (v - r * i - phi * n) * inv_l, c_j * (_C1 * phi * i - tl)

    fi, fn, j11, j12, j21, j22 = derivatives(i, n)
    tau = l_h / r
    h = min(t_max, 0.5 * tau * rtol ** (1.0 / 3.0))
    t = 0.0
    peak, t_peak = i, 0.0
    charge = i2t = work = 0.0
    rose = i_cut is not None and i > i_cut
    # The current's error is weighed against its swing on the phase, not its size: the instant it falls back
    # to the cut-out value moves by the error over the slope, and the slope scales with the swing.
    i_start = i
    swing = _SWING_FLOOR * i
    knots = [(0.0, i, n, fi, fn)] if keep_history else None
    steps = rejected = 0
    status, message = "", ""
    work_per_rpm_s = t_const * RAD_S_PER_RPM
    while True:
        if steps >= max_steps:
            status = "step cap"
            message = (f"the integrator stopped after {max_steps} steps at {quantity(t, 's')} before the notch ended: "
                       "raise max_steps or loosen rtol")
            break
        last = t + h >= t_max
        if last:
            h = t_max - t
        i1, n1, k4i, k4n = rosenbrock_step(i, n, fi, fn, (j11, j12, j21, j22), h, slopes)
        ei = k4i / (rtol * (swing + i_floor))
        en = k4n / (rtol * ((n if n > n1 else n1) + n_floor))
        err = math.sqrt(0.5 * (ei * ei + en * en))
        if err > 1.0 or err != err:
            rejected += 1
            h *= max(_SHRINK, _SAFETY * err ** (-1.0 / 3.0)) if err == err else _SHRINK
            if h < 1e-14 * max(t, tau):
                status, message = "step cap", f"the step size fell below {quantity(h, 's')} at {quantity(t, 's')}"
                break
            continue
        steps += 1
        f1 = derivatives(i1, n1)
        di0, di1, dn0, dn1 = h * fi, h * f1[0], h * fn, h * f1[1]
        pi = (i, di0, 3.0 * (i1 - i) - 2.0 * di0 - di1, 2.0 * (i - i1) + di0 + di1)  # Hermite cubics in s = (t - t0)/h
        pn = (n, dn0, 3.0 * (n1 - n) - 2.0 * dn0 - dn1, 2.0 * (n - n1) + dn0 + dn1)
        # Events on the Hermite cubic of this step: the first one ends the phase.
        s_end, status = 1.0, "time" if last else ""
        if i_cut is not None:
            if rose and i1 <= i_cut:
                s_end, status = _root(lambda s: _at(pi, s) - i_cut, 0.0, 1.0, i - i_cut, i1 - i_cut), "cut"
            elif not rose:
                # Did the current rise past the cut-out value within this step (at its end or at a peak inside)?
                s_up = _slope_zero(pi) if fi > 0.0 >= f1[0] else None
                i_up = i1 if s_up is None else _at(pi, s_up)
                if i_up > i_cut:
                    rose = True
                    if i1 <= i_cut:  # and fell back to it before the step's end
                        s_end, status = _root(lambda s: _at(pi, s) - i_cut, s_up, 1.0, i_up - i_cut, i1 - i_cut), "cut"
        if n1 <= 0.0 and (n > 0.0 or fn < 0.0):
            s_rest = _root(lambda s: _at(pn, s), 0.0, 1.0, n, n1) if n > 0.0 else 0.0
            if s_rest <= s_end:
                s_end, status = s_rest, "rest"
        if n_settle is not None and n1 >= n_settle:
            s_ok = _settle_point(pi, pn, n_settle, rtol * (swing + i_floor))
            if s_ok is not None and s_ok <= s_end:
                s_end, status = s_ok, "settled"
        # A peak inside the step, on its cubic; not where the step spans many electrical time constants: there
        # the current closes exponentially on its quasi-steady value and the cubic overshoots the ends.
        s_peak = _slope_zero(pi) if fi > 0.0 >= f1[0] and -h * j11 < 1.0 else None
        if s_peak is not None and s_peak <= s_end:
            value = _at(pi, s_peak)
            if value > peak:
                peak, t_peak = value, t + s_peak * h
        charge += h * _integral(pi, s_end)
        i2t += h * _square_integral(pi, s_end)
        if constant_load:
            work += work_per_rpm_s * h * _integral(pn, s_end)
        else:
            work += RAD_S_PER_RPM * h * s_end * sum(
                w * _load_and_slope(speeds, torques, _at(pn, s_end * x))[0] * _at(pn, s_end * x) for x, w in _GAUSS)
        if s_end < 1.0:
            h_end = s_end * h
            i1, n1 = _at(pi, s_end), _at(pn, s_end)
            if status == "rest":
                n1 = 0.0
            if status == "cut":
                i1 = i_cut
            f1 = (_slope(pi, s_end) / h, _slope(pn, s_end) / h) + f1[2:]
        else:
            h_end = h
        t += h_end
        i, n = i1, n1
        if abs(i - i_start) > swing:
            swing = abs(i - i_start)
        fi, fn, j11, j12, j21, j22 = f1
        if i > peak:
            peak, t_peak = i, t
        if keep_history:
            knots.append((t, i, n, fi, fn))
        if status:
            break
        if i > i_max * (1.0 + 1e-12):
            status = "curve end"
            message = (f"the current ({quantity(i, 'A')}) left the magnetization curve, which ends at "
                       f"{quantity(i_max, 'A')}, at {quantity(t, 's')}: extend the curve")
            break
        h *= min(_GROW, max(_SHRINK, _SAFETY * err ** (-1.0 / 3.0))) if err > 0.0 else _GROW
    return NotchRun(status, message, t, i, n, peak, t_peak, charge, i2t, work, steps, rejected,
                    np.array(knots if keep_history else np.empty((0, 5)), dtype=float).reshape(-1, 5))


def _settle_point(pi, pn, n_target, flat):
    """First s in [0, 1] with the speed at or above the target and the current not rising; None if none.

    A rise of the current over the step below ``flat`` (its error tolerance [A]) is noise, not a rise: with a
    tiny inductance the slope of a current at its steady value has either sign.
    """
    n_end = _at(pn, 1.0)
    if n_end < n_target or _slope(pi, 1.0) > flat:
        return None
    n_start = pn[0]
    s_speed = 0.0 if n_start >= n_target else _root(lambda s: _at(pn, s) - n_target, 0.0, 1.0, n_start - n_target, n_end - n_target)
    if _slope(pi, s_speed) <= flat:
        return s_speed
    s_peak = _slope_zero(pi)
    return 1.0 if s_peak is None else max(s_speed, s_peak)


def _integral(a, s):
    """:math:`\\int_0^s p` of the cubic ``a``, in units of the step. [-]"""
    return s * (a[0] + s * (a[1] / 2.0 + s * (a[2] / 3.0 + s * a[3] / 4.0)))


def _square_integral(a, s):
    """:math:`\\int_0^s p^2` of the cubic ``a``, exactly. [-]"""
    a0, a1, a2, a3 = a
    return s * (a0 * a0 + s * (a0 * a1 + s * ((a1 * a1 + 2.0 * a0 * a2) / 3.0 + s * (0.5 * (a0 * a3 + a1 * a2) + s * (
        (a2 * a2 + 2.0 * a1 * a3) / 5.0 + s * (a2 * a3 / 3.0 + s * a3 * a3 / 7.0))))))
